using System.Numerics;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Tests.Compile;

/// <summary>A compile error names the side and the values of the family parameters and bound variables where it happened.</summary>
public class CompileErrorContextTests
{
    private static Diagnostic Error(string line, params (string, int)[] parameters)
    {
        var parsed = CatalogueParser.ParseIdentity(line);
        Assert.True(parsed.Success, parsed.Error?.ToString());
        var compiled = IdentityCompiler.Compile(parsed.Value, parameters.ToDictionary(p => p.Item1, p => (BigInteger)p.Item2));
        Assert.False(compiled.Success);
        return compiled.Error!;
    }

    [Fact]
    public void ErrorInsideASum_NamesTheSideTheFamilyParameterAndTheBoundVariable()
    {
        var e = Error("x = x + sum(j in 0..n: x^j/(j-1)) for n in 2..3", ("n", 2));
        Assert.Equal("line 1, column 27, rhs, at n=2, j=1: division by zero", e.ToString());
        Assert.Equal("rhs", e.Side);
        Assert.Equal("at n=2, j=1", e.Values);
    }

    [Fact]
    public void ErrorInsideAMatrix_NamesRowAndColumnOutermostFirst()
    {
        // (a negative exponent is a reciprocal since #13 point 1, so the error here is a constant division by zero)
        var e = Error("det(matrix(i in 1..2, j in 1..2: x/(i-j))) = 0");
        Assert.Equal("lhs, at i=1, j=1", e.Context);
        Assert.StartsWith("line 1, column ", e.ToString());
        Assert.Contains(", lhs, at i=1, j=1: ", e.ToString());
    }

    [Fact]
    public void NestedBoundForms_AreListedOutermostFirst()
    {
        var e = Error("sum(a in 1..2: prod(b in 1..a: x/(a*b - 2))) = x");
        Assert.Equal("lhs, at a=2, b=1", e.Context); // a·b − 2 = 0 first at a = 2, b = 1
    }
}
