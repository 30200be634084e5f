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
    [InlineData("q^(-3) + q = 0", 4)]                   // (1 + q^4)/q^3
    [InlineData("x^(k - n)*y = 0 for n in 5..5, k in 2..2", 1)] // y/x^3: numerator degree 1
    [InlineData("qbinom(2, 3, q)*q^(-5) = 0", 0)]       // qbinom = 0 folds, and so does the product: no division is left
    [InlineData("x^fib(10) + iverson(2 < 3)*y^catalan(4) = 0", 55)] // number functions of parameters are exact constants
    [InlineData("when(1 > 2, x^9, x^2) = 0", 2)]        // only the chosen branch is compiled
    public void DegreeBound_IsExactOnUsualForms(string line, int degree)
    {
        var parsed = CatalogueParser.ParseIdentity(line);
        Assert.True(parsed.Success, parsed.Error?.ToString());
        var family = FamilyExpander.Expand(parsed.Value);
        Assert.True(family.Success, family.Error?.ToString());
        Assert.Equal(degree, (int)Compile(line, new Dictionary<string, BigInteger>(family.Instances[0])).Bounds.Degree);
    }

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
        // Beyond 2^64: the degree is kept as a big integer, exactly (x + 1)^(2^70) has degree 2^70.
        var big = Compile("(x+1)^(2^70) = (x^2+2*x+1)^(2^69)");
        Assert.Equal(BigInteger.Pow(2, 70), big.Bounds.Degree);
        Assert.Equal(BigInteger.Pow(2, 511), Compile("x^(2^511) = 1").Bounds.Degree);
        // A negative exponent divides: 1/x^(2^100) adds 2^100 to the divisor degree.
        Assert.Equal(BigInteger.Pow(2, 100), Compile("x^(-2^100) = y").Bounds.DivisorDegree);
    }
}
