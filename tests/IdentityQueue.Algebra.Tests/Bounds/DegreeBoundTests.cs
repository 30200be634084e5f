using System.Numerics;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Tests.Bounds;

/// <summary>Tightness of D on the usual forms: products, powers, sums, determinants, Pfaffians, rational functions.</summary>
public class DegreeBoundTests
{
    private static CompiledIdentity Compile(string line, Dictionary<string, BigInteger>? parameters = null)
    {
        var parsed = CatalogueParser.ParseIdentity(line);
        Assert.True(parsed.Success, parsed.Error?.ToString());
        var compiled = IdentityCompiler.Compile(parsed.Value, parameters);
        Assert.True(compiled.Success, compiled.Error?.ToString());
        return compiled.Value!;
    }

    [Theory]
    [InlineData("(x+y)^10 = 0", 10)]
    [InlineData("x^3*y^4 = x", 7)]
    [InlineData("prod(i in 1..6: x[i] - 1) = 0", 6)]
    [InlineData("sum(k in 0..9: x^k) = 0", 9)]
    [InlineData("qint(5, q) = 0", 4)]
    [InlineData("qfact(4, q) = 0", 6)]
    [InlineData("qbinom(6, 3, q) = 0", 9)]
    [InlineData("binom(x, 4) = 0", 4)]
    [InlineData("(x^2-1)/(x-1) = x + 1", 2)]   // cleared: x²−1 − (x+1)(x−1), degree 2
    [InlineData("1/x + 1/y = 0", 1)]           // (y + x)/(xy)
    [InlineData("det(matrix(i in 1..5, j in 1..5: x[i]^(j-1))) = 0", 10)]
    [InlineData("det(matrix(i in 1..4, j in 1..4: a[i,j])) = 0", 4)]
    [InlineData("perm(matrix(i in 1..4, j in 1..4: a[i,j])) = 0", 4)]
    [InlineData("pf([[0, a, b, c], [-a, 0, d, e], [-b, -d, 0, f], [-c, -e, -f, 0]]) = 0", 2)]
    [InlineData("det([[x^5, 1], [1, y]]) = 0", 6)]     // rows: 5 + 1; columns: 5 + 1
    [InlineData("det([[x^5, x^5], [1, 1]]) = 0", 5)]   // rows 5 + 0 = 5 < columns 5 + 5
    [InlineData("[[a, b], [c, d]]^3 = 0", 3)]
    [InlineData("27^5 + 84^5 = 144^5", 0)]
    public void DegreeBound_IsExactOnUsualForms(string line, int degree) =>
        Assert.Equal(degree, (int)Compile(line).Bounds.Degree);

    // Cauchy's double alternant: det[1/(x_i + y_j)] has numerator degree n(n−1) over the denominator Π(x_i + y_j) of degree n².
    [Fact]
    public void CauchyDeterminant_TracksNumeratorAndDenominator()
    {
        var c = Compile("det(matrix(i in 1..3, j in 1..3: 1/(x[i] + y[j]))) = 0");
        // N over the product of the 9 entry denominators: 9 + (−1)·3 = 6 = n(n−1)
        Assert.Equal(6, (int)c.Bounds.Degree);
        Assert.Equal(9, (int)c.Bounds.DivisorDegree);
    }

    [Fact]
    public void HeightBound_OfAConstant_IsItsLog()
    {
        var c = Compile("2^100 = 0");
        Assert.InRange(c.Bounds.HeightLog2, 100, 100.001);
    }

    [Fact]
    public void HugeExponent_KeepsAnExactDegree()
    {
        var c = Compile("x^(2^64) = 1");
        Assert.Equal(BigInteger.Pow(2, 64), c.Bounds.Degree);
    }
}
