using System.Text.Json;
using static IdentityQueue.Cli.Tests.StoreFolder;

namespace IdentityQueue.Cli.Tests;

/// <summary>
/// Published identities written with the constructs of issue 13 (negative and huge exponents, integer functions, number
/// functions, definitions), screened end to end by <c>idq check</c>; each survives, and a perturbed copy is refuted.
/// </summary>
public class CheckPublishedIdentitiesTests
{
    private static string Verdict(string output) => JsonDocument.Parse(output).RootElement.GetProperty("verdict").GetString()!;

    private static string Family(string output) =>
        JsonDocument.Parse(output).RootElement.TryGetProperty("instances", out var instances)
            ? string.Join(",", instances.EnumerateArray().Select(i => i.GetProperty("verdict").GetString()).Distinct())
            : Verdict(output);

    [Theory]
    // Cassini's identity F(n−1)F(n+1) − F(n)² = (−1)^n, for negative n too (Knuth, TAOCP vol. 1, 1.2.8 (14) [memory]).
    [InlineData("fib(n-1)*fib(n+1) - fib(n)^2 = (-1)^n for n in -10..40", "fib(n-1)*fib(n+1) - fib(n)^2 = (-1)^(n+1) for n in 1..3")]
    // Bell numbers: Σ_k {n,k} = ϖ(n) with ϖ(n+1) = Σ_j binom(n, j) ϖ(j) (Concrete Mathematics (6.7) and ex. 7.15 [memory]).
    [InlineData("sum(k in 0..n+1: stirling2(n+1, k)) = sum(j in 0..n: binom(n, j)*sum(k in 0..j: stirling2(j, k))) for n in 0..15",
        "sum(k in 0..n+1: stirling2(n+1, k)) = sum(j in 0..n: binom(n, j)*sum(k in 0..j: stirling1(j, k))) for n in 2..3")]
    // The same as one line against the table: Bell(10) = 115975, Bell(15) = 1382958545 (sympy's bell; OEIS A000110).
    [InlineData("sum(k in 0..10 + 5*m: stirling2(10 + 5*m, k)) = when(m = 0, 115975, 1382958545) for m in 0..1",
        "sum(k in 0..15: stirling2(15, k)) = 1382958544")]
    // x^n = Σ_k {n,k} x(x−1)…(x−k+1) and x(x+1)…(x+n−1) = Σ_k [n,k] x^k (Concrete Mathematics (6.10), (6.11) [memory]).
    [InlineData("x^n = sum(k in 0..n: stirling2(n, k)*fact(k)*binom(x, k)) for n in 0..12",
        "x^n = sum(k in 0..n: stirling1(n, k)*fact(k)*binom(x, k)) for n in 3..3")]
    [InlineData("prod(i in 0..n-1: x + i) = sum(k in 0..n: stirling1(n, k)*x^k) for n in 0..12",
        "prod(i in 0..n-1: x + i) = sum(k in 0..n: stirling2(n, k)*x^k) for n in 3..3")]
    // Σ_{k≤n} H_k = (n+1)H_n − n (Concrete Mathematics (2.36) [memory]).
    [InlineData("sum(k in 1..n: harmonic(k)) = (n+1)*harmonic(n) - n for n in 0..40", "sum(k in 1..n: harmonic(k)) = n*harmonic(n) - n for n in 2..2")]
    // Faulhaber with B(1) = −1/2: Σ_{k<m} k^p = Σ_j binom(p+1, j) B(j) m^(p+1−j)/(p+1) (Concrete Mathematics (6.78) [memory]).
    [InlineData("sum(k in 0..m-1: k^p) = sum(j in 0..p: binom(p+1, j)*bernoulli(j)*m^(p+1-j))/(p+1) for p in 0..10, m in 1..6",
        "sum(k in 0..m-1: k^p) = sum(j in 0..p: binom(p+1, j)*bernoulli(j)*m^(p+1-j))/(p+1) + iverson(p = 7) for p in 7..7, m in 2..2")]
    // Segner's recurrence C(n+1) = Σ C(i)C(n−i), and C(n) = binom(2n, n)/(n+1) (Stanley, Catalan Numbers, 2015, (1.1), (1.3) [memory]).
    [InlineData("catalan(n+1) = sum(i in 0..n: catalan(i)*catalan(n-i)) for n in 0..60", "catalan(n+1) = sum(i in 0..n: catalan(i)*catalan(n-i)) + delta(n, 9) for n in 9..9")]
    // L(n) = F(n−1) + F(n+1) and F(2n) = F(n)L(n) (Vajda 1989, (6) and (13) [memory]).
    [InlineData("lucas(n)*fib(n) = fib(2*n) + 0*(lucas(n) - fib(n-1) - fib(n+1)) for n in -20..60", "lucas(n) = fib(n-1) + fib(n) for n in 4..4")]
    // The multinomial theorem, a polynomial identity in a, b, c.
    [InlineData("(a+b+c)^n = sum(i in 0..n: sum(j in 0..n-i: multinomial(i, j, n-i-j)*a^i*b^j*c^(n-i-j))) for n in 0..8",
        "(a+b+c)^n = sum(i in 0..n: sum(j in 0..n-i: multinomial(i, j, n-i)*a^i*b^j*c^(n-i-j))) for n in 4..4")]
    // F(n+1) = Σ_{k ≤ n/2} binom(n−k, k): floor in a range (Concrete Mathematics (6.130) [memory]).
    [InlineData("fib(n+1) = sum(k in 0..floor(n/2): binom(n-k, k)) for n in 0..40", "fib(n+1) = sum(k in 0..ceil(n/2): binom(n-k+1, k)) for n in 5..5")]
    // Σ_k binom(n, 2k) x^(2k) = ((1+x)^n + (1−x)^n)/2: floor in a range of a polynomial identity (binomial theorem).
    [InlineData("sum(k in 0..floor(n/2): binom(n, 2*k)*x^(2*k)) = ((1+x)^n + (1-x)^n)/2 for n in 0..20",
        "sum(k in 0..floor(n/2): binom(n, 2*k)*x^(2*k)) = ((1+x)^n + (1-x)^n)/2 + x^mod(n, 5) for n in 7..7")]
    // Vandermonde's convolution with min in the range: Σ_k binom(m, k) binom(n, k) = binom(m+n, n).
    [InlineData("sum(k in 0..min(m, n): binom(m, k)*binom(n, k)) = binom(m+n, n) for m in 0..10, n in 0..10",
        "sum(k in 0..max(m, n): binom(m, k)*binom(n, k)) = binom(m+n, n) + 1 for m in 2..2, n in 3..3")]
    // Hermite's identity Σ_{k<m} ⌊x + k/m⌋ = ⌊mx⌋ at rational x = a/b (Concrete Mathematics (3.24) [memory]).
    [InlineData("sum(k in 0..m-1: floor(a/b + k/m)) = floor(m*a/b) for a in -7..7, b in 1..4, m in 1..5",
        "sum(k in 0..m-1: ceil(a/b + k/m)) = floor(m*a/b) for a in 1..1, b in 2..2, m in 2..2")]
    // A triangular matrix written with an Iverson bracket has the product of its diagonal as determinant.
    [InlineData("det(matrix(i in 1..n, j in 1..n: iverson(j <= i)*x[i]^j + delta(i, j))) = prod(i in 1..n: x[i]^i + 1) for n in 1..6",
        "det(matrix(i in 1..n, j in 1..n: iverson(j < i + 1)*x[i]^j + delta(i, j))) = prod(i in 1..n: x[i]^i) for n in 2..2")]
    // Gauss' inversion of the q-binomial, [n,k] at 1/q = q^(−k(n−k))·[n,k] (Kac and Cheung, Quantum Calculus, 2002, ch. 6 [memory]);
    // k runs past n and below 0, where qbinom = 0 and the power of q is a reciprocal or not.
    [InlineData("qbinom(n, k, 1/q) = q^(-k*(n-k))*qbinom(n, k, q) for n in 0..8, k in -1..10",
        "qbinom(n, k, 1/q) = q^(k*(n-k))*qbinom(n, k, q) for n in 3..3, k in 1..1")]
    [InlineData("qbinom(m, j, q)*q^(j-m) = qbinom(m, j, q)/q^(m-j) + when(j > m, 0, 0) for m in 0..5, j in 0..8",
        "qbinom(m, j, q)*q^(j-m) = qbinom(m, j, q)*q^(m-j) for m in 3..3, j in 1..1")]
    // binom(n, k) = n!/(k!(n−k)!) for 0 ≤ k ≤ n and 0 otherwise (common practice): a condition with 'and'; fact is never
    // evaluated at a negative argument, because only when's chosen branch is.
    [InlineData("binom(n, k) = when(k >= 0 and k <= n, fact(n)/(fact(k)*fact(n-k)), 0) for n in 0..10, k in -2..12",
        "binom(n, k) = when(k >= 0 and k <= n, fact(n)/(fact(k)*fact(n-k)), 0) + iverson(k = n and n = 3 or k > 99) for n in 3..3, k in 3..3")]
    // (−1)^k for negative k, and x^(−k) = 1/x^k (common practice).
    [InlineData("(-1)^k*x^(-k)*(x^2 + x)^k = (-x - 1)^k for k in -6..6", "(-1)^k*x^(-k)*(x^2 + x)^k = (x + 1)^k for k in -3..-3")]
    public void PublishedIdentity_Survives_AndItsPerturbation_IsRefuted(string identity, string perturbed)
    {
        var (code, output, error) = Run("check", identity, "--json", "--seed", "13");
        Assert.True(code == 0, $"{identity}: exit {code}, {Family(output)} {error}");
        var (wrongCode, wrongOutput, wrongError) = Run("check", perturbed, "--json", "--seed", "13");
        Assert.True(wrongCode == 1, $"{perturbed}: exit {wrongCode}, {Family(wrongOutput)} {wrongError}");
    }

    [Fact]
    public void HugeExponent_SurvivesOnALargeEnoughRung_AndAPerturbationIsRefuted()
    {
        // (x+1)^(2^70) = ((x+1)^2)^(2^69): degree 2^70 needs a field of more than 70 + 16 bits, so the trials run on the 127-bit rung.
        var (code, output, _) = Run("check", "(x+1)^(2^70) = (x^2+2*x+1)^(2^69)", "--json", "--seed", "7");
        Assert.Equal(0, code);
        var j = JsonDocument.Parse(output).RootElement;
        Assert.Equal("1180591620717411303424", j.GetProperty("degreeBound").GetString()); // 2^70, as a string (> 2^53)
        Assert.All(j.GetProperty("trialsByField").EnumerateArray(), f => Assert.True(f.GetProperty("fieldBits").GetInt32() >= 127));
        Assert.True(j.GetProperty("errorBoundLog2").GetDouble() <= -64);

        var (wrongCode, wrongOutput, _) = Run("check", "(x+1)^(2^70) = (x^2+2*x+2)^(2^69)", "--json", "--seed", "7");
        Assert.Equal(1, wrongCode);
        Assert.Equal("refuted", Verdict(wrongOutput));
        // The limit is named: 2^600 has 601 bits, over MaxExponentBits (512).
        var (tooBig, tooBigOutput, _) = Run("check", "x^(2^600) = 1", "--json");
        Assert.Equal(2, tooBig);
        Assert.Contains("MaxExponentBits", JsonDocument.Parse(tooBigOutput).RootElement.GetProperty("message").GetString());
    }

    [Fact]
    public void Definitions_FromAFile_AreUsedByCheck()
    {
        using var folder = new StoreFolder();
        // Cayley–Hamilton for a 3×3 matrix, A used ten times: A³ − tr(A)A² + c₂A − det(A)I = 0 with c₂ = (tr(A)² − tr(A²))/2.
        var file = folder.Write("defs.idq", """
            # a generic 3×3 matrix and the second coefficient of its characteristic polynomial
            let A = matrix(i in 1..3, j in 1..3: a[i,j])
            let c2(M) = (tr(M)^2 - tr(M^2))/2
            not-a-definition: x = x
            """);
        var (code, output, error) = Run("check", "A^3 - tr(A)*A^2 + c2(A)*A - det(A)*id(3) = 0", "--definitions", file, "--json", "--seed", "3");
        Assert.True(code == 0, output + error);
        Assert.Equal(3, JsonDocument.Parse(output).RootElement.GetProperty("degreeBound").GetInt32());
        var (wrong, _, _) = Run("check", "A^3 - tr(A)*A^2 - c2(A)*A - det(A)*id(3) = 0", "--definitions", file, "--json", "--seed", "3");
        Assert.Equal(1, wrong);
        // Without the file, A is a plain variable and c2 an unknown function.
        var (without, _, withoutError) = Run("check", "A^3 - tr(A)*A^2 + c2(A)*A - det(A)*id(3) = 0");
        Assert.Equal(2, without);
        Assert.Contains("unknown function 'c2'", withoutError);
        // A bad definition names the file, its line and column.
        var bad = folder.Write("bad.idq", "let f(x) = x +\n");
        var (badCode, _, badError) = Run("check", "f(1) = 1", "--definitions", bad);
        Assert.Equal(2, badCode);
        Assert.Contains("--definitions bad.idq: line 1, column", badError);
    }

    [Fact]
    public void Import_WritesDefinitionsOut_AndTheRunScreensThem()
    {
        using var folder = new StoreFolder();
        Assert.Equal(0, Run("init", "--db", folder.Db).Code);
        var file = folder.Write("jt.idq", """
            let h(k) = sum(a in 0..k: sum(b in 0..k - a: x[1]^a*x[2]^b*x[3]^(k - a - b)))
            let lam(i) = when(i = 1, 3, when(i = 2, 1, 0))
            jacobi-trudi: det(matrix(i in 1..3, j in 1..3: h(lam(i) - i + j))) = det(matrix(i in 1..3, j in 1..3: x[j]^(lam(i) + 3 - i)))/det(matrix(i in 1..3, j in 1..3: x[j]^(3 - i)))
            jacobi-trudi-wrong: det(matrix(i in 1..3, j in 1..3: h(lam(i) - i + j) + delta(i, j))) = det(matrix(i in 1..3, j in 1..3: x[j]^(lam(i) + 3 - i)))/det(matrix(i in 1..3, j in 1..3: x[j]^(3 - i)))
            cassini: fib(n-1)*fib(n+1) - fib(n)^2 = (-1)^n for n in 1..5
            let h(k) = k
            """);
        var (code, output, _) = Run("import", file, "--db", folder.Db, "--seed", "4");
        Assert.Equal(0, code);
        Assert.Contains("3 entries, 7 instances, 1 rejection", output);
        Assert.Contains("'h' is already defined on line 1", output);
        // The stored side is the written-out text: it parses alone, with no definitions.
        var (_, stored, _) = Run("sql", "select lhs from candidate where label = 'jacobi-trudi'", "--db", folder.Db, "--csv");
        Assert.Contains("det(matrix(i in 1..3, j in 1..3: sum(a in 0..when(i = 1, 3, when(i = 2, 1, 0)) - i + j:", stored);
        Assert.Equal(0, Run("run", "--db", folder.Db).Code); // every candidate reached a final state
        var (_, states, _) = Run("sql", "select label, state from verdicts order by label", "--db", folder.Db, "--csv");
        Assert.Contains("jacobi-trudi,survived", states);
        Assert.Contains("jacobi-trudi-wrong,refuted", states);
        Assert.Contains("cassini[n=5],survived", states);
    }

    // A refutation says where and how the identity fails: (x+y)^2 = x^2 + 2xy + y^2 (the binomial theorem), so
    // "(x+y)^2 = x^2 + y^2" misses 2xy; its least counterexample is x = 1, y = 1 (lhs 4, rhs 2).
    [Fact]
    public void Refuted_NamesTheSmallestCounterexampleAndTheDifference()
    {
        var (code, text, _) = Run("check", "(x+y)^2 = x^2 + y^2");
        Assert.Equal(1, code);
        Assert.Contains("counterexample fails at x = 1, y = 1: lhs = 4, rhs = 2 (the least: every smaller point was tried)", text);
        Assert.Contains("difference     lhs - rhs = 2*x*y (1 term, total degree 2)", text);
        var (_, json, _) = Run("check", "(x+y)^2 = x^2 + y^2", "--json");
        using var doc = System.Text.Json.JsonDocument.Parse(json);
        var counterexample = doc.RootElement.GetProperty("counterexample");
        Assert.Equal("fails at x = 1, y = 1: lhs = 4, rhs = 2", counterexample.GetProperty("text").GetString());
        Assert.True(counterexample.GetProperty("exhaustive").GetBoolean());
        Assert.Equal("2*x*y", doc.RootElement.GetProperty("difference").GetProperty("text").GetString());
    }
}
