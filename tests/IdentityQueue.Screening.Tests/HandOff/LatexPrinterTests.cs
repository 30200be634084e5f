using IdentityQueue.Algebra.Syntax;
using IdentityQueue.Screening.HandOff;

namespace IdentityQueue.Screening.Tests.HandOff;

/// <summary>Expressions as LaTeX math: amsmath's commands, and parentheses only where the tree needs them.</summary>
public sealed class LatexPrinterTests
{
    private static string Latex(string expression)
    {
        var parsed = CatalogueParser.ParseExpression(expression);
        Assert.True(parsed.Success, parsed.Error?.ToString());
        return LatexPrinter.Print(parsed.Value);
    }

    [Theory]
    [InlineData("x[i]^2/(1 + y)", @"\frac{x_{i}^{2}}{1 + y}")]
    [InlineData("a*(b + c)", @"a \cdot \left(b + c\right)")]
    [InlineData("a - (b - c)", @"a - \left(b - c\right)")]
    [InlineData("a - (-b)", @"a - \left(-b\right)")]
    [InlineData("-x^2", @"-x^{2}")]
    [InlineData("(-x)^2", @"\left(-x\right)^{2}")]
    [InlineData("(a/b)^2", @"\left(\frac{a}{b}\right)^{2}")]
    [InlineData("a[i,j+1]", @"a_{i,j + 1}")]
    [InlineData("binom(n, k)", @"\binom{n}{k}")]
    [InlineData("fact(n + 1)", @"\left(n + 1\right)!")]
    [InlineData("qint(n, q)", @"[n]_{q}")]
    [InlineData("qbinom(n, k, q)", @"\binom{n}{k}_{q}")]
    [InlineData("sum(k in 1..n: k^2)", @"\sum_{k=1}^{n} k^{2}")]
    [InlineData("prod(k in 1..n: (1 + q^k))", @"\prod_{k=1}^{n} \left(1 + q^{k}\right)")]
    [InlineData("det([[a, b], [c, d]])", @"\begin{vmatrix} a & b \\ c & d \end{vmatrix}")]
    [InlineData("tr(transpose(M) * M)", @"\operatorname{tr}\left(M^{\mathsf{T}} \cdot M\right)")]
    [InlineData("det(matrix(i in 1..n, j in 1..n: x[i]^(j - 1)))", @"\det \left(x_{i}^{j - 1}\right)_{1 \le i \le n,\; 1 \le j \le n}")]
    [InlineData("id(2)", @"I_{2}")]
    [InlineData("a*b/c*d", @"\frac{a \cdot b}{c} \cdot d")]
    [InlineData("a/b/c - d", @"\frac{\frac{a}{b}}{c} - d")]
    [InlineData("(a + b)*c/d", @"\frac{\left(a + b\right) \cdot c}{d}")]
    [InlineData("a - b + c - -d", @"a - b + c - \left(-d\right)")]
    [InlineData("zero(2, 3)", @"0_{2\times 3}")]
    [InlineData("prod(n in 1..inf: 1 - q^n)", @"\prod_{n=1}^{\infty} \left(1 - q^{n}\right)")]
    [InlineData("sum(k in -inf..inf: q^(k^2))", @"\sum_{k=-\infty}^{\infty} q^{k^{2}}")]
    [InlineData("inv(M)", @"M^{-1}")]
    [InlineData("adj(M)", @"\operatorname{adj}\left(M\right)")]
    [InlineData("(A*B)[i, j]", @"\left(A \cdot B\right)_{i,j}")]
    [InlineData("diag(a, b)", @"\operatorname{diag}\left(a, b\right)")]
    [InlineData("minor(M, [1, 3..n], [2])", @"\det M_{\{1, 3, \ldots, n\},\{2\}}")]
    [InlineData("alpha + α + x1", @"\mathit{alpha} + \alpha + x_{1}")]
    [InlineData("q^-1", @"q^{-1}")]
    [InlineData("fib(n - 1) + lucas(n) + harmonic(n) + bernoulli(2*n) + catalan(n)", @"F_{n - 1} + L_{n} + H_{n} + B_{2 \cdot n} + C_{n}")]
    [InlineData("stirling1(n, k) - stirling2(n, k)", @"\left[{n \atop k}\right] - \left\{{n \atop k}\right\}")]
    [InlineData("multinomial(a, b, c)", @"\binom{a + b + c}{a, b, c}")]
    [InlineData("min(a, b) + gcd(n, k)", @"\min\left(a, b\right) + \gcd\left(n, k\right)")]
    [InlineData("floor(n/2) + ceil(n/3)", @"\left\lfloor \frac{n}{2} \right\rfloor + \left\lceil \frac{n}{3} \right\rceil")]
    [InlineData("abs(n) + mod(n, 3) + delta(i, j)", @"\left|n\right| + \left(n \bmod 3\right) + \delta_{i,j}")]
    [InlineData("iverson(k <= n)*x", @"\left[k \le n\right] \cdot x")]
    [InlineData("iverson(0 <= k and k <= n or n < 0)", @"\left[0 \le k \wedge k \le n \vee n < 0\right]")]
    [InlineData("when(n != 0, x, y)", @"\begin{cases} x & \text{if } n \ne 0 \\ y & \text{otherwise} \end{cases}")]
    public void PrintsReadableMath(string expression, string expected) => Assert.Equal(expected, Latex(expression));

    [Fact]
    public void FlatSumOfFiftyThousandTermsIsWrittenInOneLoop()
    {
        // Issue #18: a chain is one n-ary node; a per-term recursion would exhaust the stack here.
        var text = string.Join(" - ", Enumerable.Range(1, 50_000).Select(i => $"{i}*x^{i % 7}/y"));
        var latex = Latex(text);
        Assert.StartsWith(@"\frac{1 \cdot x^{1}}{y} - \frac{2 \cdot x^{2}}{y}", latex);
        Assert.EndsWith(@"\frac{50000 \cdot x^{6}}{y}", latex);
    }

    [Fact]
    public void Escape_QuotesTheSpecialCharacters()
    {
        Assert.Equal(@"a\_b \& c\% \#1 \$ \{x\} \textasciitilde{}\textasciicircum{}\textbackslash{}", LatexPrinter.Escape(@"a_b & c% #1 $ {x} ~^\"));
    }
}
