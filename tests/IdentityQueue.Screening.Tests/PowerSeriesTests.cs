using System.Text.Json;
using IdentityQueue.Algebra.Compile;

namespace IdentityQueue.Screening.Tests;

/// <summary>
/// Truncated power series identities (<c>up to q^N</c>): infinite sums and products cut where their terms vanish mod
/// q^(N+1), screened in F[q]/(q^(N+1)); a refutation names the first coefficient that differs.
/// </summary>
public class PowerSeriesTests
{
    private static JsonElement Fixture() =>
        JsonDocument.Parse(File.ReadAllText(Path.Combine(AppContext.BaseDirectory, "fixtures", "series-coefficients.json"))).RootElement;

    private static string Polynomial(IEnumerable<long> coefficients, int order) =>
        string.Join(" + ", coefficients.Take(order + 1).Select((c, k) => $"{c}*q^{k}"));

    // Euler's pentagonal number theorem (Andrews, The Theory of Partitions (1976), Cor. 1.7 [memory]), the two halves of
    // the sum over all integers k written over k ≥ 0 and k ≥ 1.
    [Fact]
    public void PentagonalNumberTheorem_HoldsToQ40_AndAWrongPentagonalFails()
    {
        var r = Some.Screen("prod(n in 1..inf: 1 - q^n) = sum(k in 0..inf: (-1)^k*q^(k*(3*k-1)/2)) + sum(k in 1..inf: (-1)^k*q^(k*(3*k+1)/2)) up to q^40");
        Assert.Equal(Verdict.Survived, r.Verdict);
        Assert.StartsWith(ExactDecision.SeriesPrefix, r.Message);
        // with k(3k+1)/2 replaced by k(3k+1) the first difference is at q^2: the product has −1, the sum 0 (q^2 = the k = 1 term of the second half)
        var f = Some.Screen("prod(n in 1..inf: 1 - q^n) = sum(k in 0..inf: (-1)^k*q^(k*(3*k-1)/2)) + sum(k in 1..inf: (-1)^k*q^(k*(3*k+1))) up to q^40");
        Assert.Equal(Verdict.Refuted, f.Verdict);
        Assert.Equal($"{ExactDecision.SeriesPrefix}: coefficients of q^2 (lhs -1, rhs 0) differ", f.Message);
    }

    // The Rogers–Ramanujan identities (Andrews, The Theory of Partitions, Cor. 7.6 and 7.7 [memory]), to q^40; swapping
    // the two products makes them false (first at q^1: 1 on the left, 0 on the right for the first).
    [Fact]
    public void RogersRamanujan_BothIdentities_HoldToQ40()
    {
        const string first = "sum(n in 0..inf: q^(n^2)/prod(k in 1..n: 1 - q^k))";
        const string second = "sum(n in 0..inf: q^(n^2+n)/prod(k in 1..n: 1 - q^k))";
        const string p14 = "prod(n in 0..inf: 1/((1 - q^(5*n+1))*(1 - q^(5*n+4))))";
        const string p23 = "prod(n in 0..inf: 1/((1 - q^(5*n+2))*(1 - q^(5*n+3))))";
        Assert.Equal(Verdict.Survived, Some.Screen($"{first} = {p14} up to q^40").Verdict);
        Assert.Equal(Verdict.Survived, Some.Screen($"{second} = {p23} up to q^40").Verdict);
        var swapped = Some.Screen($"{first} = {p23} up to q^40");
        Assert.Equal(Verdict.Refuted, swapped.Verdict);
        Assert.Contains("coefficients of q^1 (lhs 1, rhs 0)", swapped.Message);
    }

    // Jacobi's triple product (Andrews, The Theory of Partitions, Thm 2.8 [memory]) with z a second variable: the
    // coefficients of q^k are Laurent polynomials in z, screened at random z; the sum over all integers n is written as
    // n ≥ 0 plus n ≥ 1 with (1/z)^n.
    [Fact]
    public void JacobiTripleProduct_SurvivesToQ30_AndAShiftedExponentIsRefutedWithTheCoefficient()
    {
        const string product = "prod(n in 1..inf: (1 - q^(2*n))*(1 + z*q^(2*n-1))*(1 + q^(2*n-1)/z))";
        var r = Some.Screen($"{product} = sum(n in 0..inf: z^n*q^(n^2)) + sum(n in 1..inf: (1/z)^n*q^(n^2)) up to q^30");
        Assert.Equal(Verdict.Survived, r.Verdict);
        Assert.True(r.ErrorBoundLog2 <= -64);
        Assert.All(r.Trials, t => Assert.DoesNotContain(t.Point, v => v.Name == "q")); // q is the series variable, not a point
        var f = Some.Screen($"{product} = sum(n in 0..inf: z^n*q^(n^2)) + sum(n in 1..inf: (1/z)^n*q^(n^2+1)) up to q^30");
        Assert.Equal(Verdict.Refuted, f.Verdict);
        Assert.StartsWith("coefficient of q^1 (lhs ", f.Witness!.Entry);
        // the witness is re-checked from its modulus and point alone
        Assert.True(WitnessChecker.Recheck(Some.Compiled($"{product} = sum(n in 0..inf: z^n*q^(n^2)) + sum(n in 1..inf: (1/z)^n*q^(n^2+1)) up to q^30"),
            f.Witness.Field, f.Witness.Point).Refutes);
    }

    // MacMahon: the plane partitions of k are counted by the coefficients of prod 1/(1 − q^n)^n (Stanley, EC2, Cor. 7.20.3
    // [memory]); the coefficients to q^40 from python3-sympy (tests/fixtures/series-coefficients.json). A wrong coefficient
    // is named with both values.
    [Fact]
    public void MacMahonPlanePartitions_MatchSympyToQ40_AndAWrongCoefficientIsNamed()
    {
        var plane = Fixture().GetProperty("plane_partitions").EnumerateArray().Select(x => x.GetInt64()).ToList();
        Assert.Equal(Verdict.Survived, Some.Screen($"prod(n in 1..inf: 1/(1 - q^n)^n) = {Polynomial(plane, 40)} up to q^40").Verdict);
        var wrong = plane.ToList();
        wrong[17] += 1;
        var f = Some.Screen($"prod(n in 1..inf: 1/(1 - q^n)^n) = {Polynomial(wrong, 40)} up to q^40");
        Assert.Equal(Verdict.Refuted, f.Verdict);
        Assert.Equal($"{ExactDecision.SeriesPrefix}: coefficients of q^17 (lhs {plane[17]}, rhs {plane[17] + 1}) differ", f.Message);
    }

    // Euler: prod 1/(1 − q^n) = Σ p(k) q^k, p from sympy.npartitions (fixture); and with a variable, the
    // generating function of partitions by number of parts, prod 1/(1 − z q^n) = Σ q^k z^k/((1−q)…(1−q^k)) (Andrews,
    // Thm 2.1 [memory]), screened at random z.
    [Fact]
    public void PartitionGeneratingFunctions_MatchSympy_AndEulersIdentityWithAVariable()
    {
        var p = Fixture().GetProperty("partitions").EnumerateArray().Select(x => x.GetInt64()).ToList();
        Assert.Equal(Verdict.Survived, Some.Screen($"prod(n in 1..inf: 1/(1 - q^n)) = {Polynomial(p, 40)} up to q^40").Verdict);
        Assert.Equal(Verdict.Survived, Some.Screen("prod(n in 1..inf: 1/(1 - z*q^n)) = sum(k in 0..inf: z^k*q^k/prod(j in 1..k: 1 - q^j)) up to q^30").Verdict);
        Assert.Equal(Verdict.Refuted, Some.Screen("prod(n in 1..inf: 1/(1 - z*q^n)) = sum(k in 0..inf: z^k*q^k/prod(j in 1..k: 1 + q^j)) up to q^30").Verdict);
    }

    // Where the terms do not vanish, or their valuation bound does not grow, the entry is invalid with the reason.
    [Theory]
    [InlineData("sum(n in 0..inf: z^n) = 1/(1 - z) up to q^5", "must be 0 at q = 0")]
    [InlineData("prod(n in 1..inf: 1 - q) = 0 up to q^5", "does not grow")]
    [InlineData("sum(n in 1..inf: q^n) = q/(1 - q)", "an infinite range needs a truncated power series entry")]
    public void TermsThatDoNotVanish_AreCompileErrors(string line, string message)
    {
        var compiled = IdentityCompiler.Compile(Some.Entry(line));
        Assert.False(compiled.Success);
        Assert.Contains(message, compiled.Error!.Message);
    }

    // The cut: for 1 − q^n up to q^10 the factors n = 1..10 matter (the root bound of n − 11 is 12; the terms n = 11, 12
    // are ≡ 1 and left out), so the product is the finite one (common practice).
    [Fact]
    public void InfiniteProduct_KeepsTheTermsBelowTheOrder()
    {
        Assert.Equal(Verdict.Survived, Some.Screen("prod(n in 1..inf: 1 - q^n) = prod(n in 1..10: 1 - q^n) up to q^10").Verdict);
        Assert.Equal(Verdict.Refuted, Some.Screen("prod(n in 1..inf: 1 - q^n) = prod(n in 1..9: 1 - q^n) up to q^10").Verdict);
    }

    [Fact]
    public void SeriesClause_IsPartOfTheStoredField()
    {
        var entry = Some.Entry("prod(n in 1..inf: 1 - q^n) = 1 - q - q^2 over GF(7) up to q^3");
        Assert.Equal("GF(7) up to q^3", entry.Field.ToString());
        var field = Algebra.Syntax.CatalogueParser.ParseField("GF(7) up to q^3");
        Assert.True(field.Success, field.Error?.ToString());
        Assert.Equal(entry.Field, field.Value);
    }
}
