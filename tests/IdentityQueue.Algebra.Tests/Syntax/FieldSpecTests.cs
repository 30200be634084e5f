using System.Numerics;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Tests.Syntax;

public class FieldSpecTests
{
    // 91 = 7·13 and 1 are not prime, 97 and 2^61 − 1 (a Mersenne prime, Euler 1772 [memory]) are.
    [Fact]
    public void Finite_IsMadeOnlyForAPrime()
    {
        Assert.False(FieldSpec.Finite(91).Success);
        Assert.False(FieldSpec.Finite(1).Success);
        Assert.False(FieldSpec.Finite(97, 0).Success);
        Assert.Equal("GF(97)", FieldSpec.Finite(97).Value.ToString());
        Assert.Equal("GF(2305843009213693951^2)", FieldSpec.Finite((BigInteger.One << 61) - 1, 2).Value.ToString());
    }

    [Fact]
    public void WithDegree_KeepsTheCheckedPrime_AndNeedsAFixedOne()
    {
        Assert.Equal(FieldSpec.Finite(7, 3).Value, FieldSpec.Finite(7).Value.WithDegree(3).Value);
        Assert.False(FieldSpec.Rationals.WithDegree(2).Success);
        Assert.False(FieldSpec.FiniteOfParameter("p", 1, new SourcePosition(1, 10)).WithDegree(2).Success);
    }

    // The parameter's value must be prime; the failure points at the parameter in the field.
    [Fact]
    public void Bind_FailsAtTheParameter_ForAComposite()
    {
        var field = FieldSpec.FiniteOfParameter("p", 1, new SourcePosition(1, 20));
        var bound = field.Bind(new Dictionary<string, BigInteger> { ["p"] = 9 }, 4096);
        Assert.False(bound.Success);
        Assert.Equal(new SourcePosition(1, 20), bound.Error.Position);
        Assert.Contains("needs a prime p, but p = 9", bound.Error.Message);
        Assert.Equal("GF(11)", field.Bind(new Dictionary<string, BigInteger> { ["p"] = 11 }, 4096).Value.ToString());
    }
}
