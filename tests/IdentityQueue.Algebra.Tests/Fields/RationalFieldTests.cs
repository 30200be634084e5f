using System.Numerics;
using IdentityQueue.Algebra.Exact;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Tests.Fields;

public class RationalFieldTests
{
    [Fact]
    public void SatisfiesTheFieldLaws() => FieldLaws.CheckLaws<RationalField, Rational>(RationalField.Instance, 17);

    [Fact]
    public void FieldLawsHoldForProperFractions()
    {
        var q = RationalField.Instance;
        var a = Rational.Create(3, 7);
        var b = Rational.Create(-5, 12);
        var c = Rational.Create(11, 2);
        Assert.Equal(q.Multiply(a, q.Add(b, c)), q.Add(q.Multiply(a, b), q.Multiply(a, c)));
        Assert.True(q.TryInvert(b, out var inverse));
        Assert.Equal(Rational.Create(-12, 5), inverse);
        Assert.Equal(q.Add(q.Multiply(a, b), c), q.MultiplyAdd(a, b, c));
        Assert.True(FieldMath.Divide(q, a, b, out var quotient));
        Assert.Equal(Rational.Create(-36, 35), quotient);
    }

    [Fact]
    public void DescribesItselfAsCharacteristicZeroOfInfiniteSize()
    {
        var q = RationalField.Instance;
        Assert.Equal(BigInteger.Zero, q.Characteristic);
        Assert.Equal(1, q.ExtensionDegree);
        Assert.Equal(double.PositiveInfinity, q.SizeLog2);
        Assert.Null(q.DefiningPolynomial);
    }

    [Fact]
    public void SampleGivesIntegersBelowTwoToThe32()
    {
        var q = RationalField.Instance;
        var random = new Xoshiro256(4);
        var max = BigInteger.Zero;
        for (var i = 0; i < 1000; i++)
        {
            var x = q.Sample(ref random);
            Assert.True(x.IsInteger);
            Assert.InRange(x.Numerator, BigInteger.Zero, uint.MaxValue);
            if (x.Numerator > max) max = x.Numerator;
        }
        Assert.True(max > (BigInteger)uint.MaxValue * 9 / 10);
    }

    [Fact]
    public void CoefficientsExistOnlyForIntegers()
    {
        var q = RationalField.Instance;
        var huge = -BigInteger.Pow(3, 500);
        Assert.Equal([huge], q.ToCoefficients(q.FromInteger(huge)));
        Assert.Equal(new Rational(huge), q.FromCoefficients([huge]));
        Assert.Throws<InvalidOperationException>(() => q.ToCoefficients(Rational.Create(1, 2)));
        Assert.Throws<ArgumentException>(() => q.FromCoefficients([]));
    }

    [Fact]
    public void ZeroHasNoInverse()
    {
        Assert.False(RationalField.Instance.TryInvert(Rational.Zero, out var inverse));
        Assert.Equal(Rational.Zero, inverse);
    }
}
