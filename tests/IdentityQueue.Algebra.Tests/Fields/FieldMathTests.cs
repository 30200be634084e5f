using System.Numerics;
using IdentityQueue.Algebra.Exact;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Tests.Fields;

public class FieldMathTests
{
    [Fact]
    public void PowMatchesModPowAcrossTheSixtyFourBitBoundary()
    {
        var f = PrimeField62.Create(2305843009213693951UL);
        var a = f.FromInteger(123456789);
        foreach (var e in new[] { BigInteger.Zero, BigInteger.One, ulong.MaxValue, (BigInteger)ulong.MaxValue + 1, BigInteger.Pow(7, 80) })
        {
            var expected = BigInteger.ModPow(123456789, e, f.Modulus);
            Assert.Equal(expected, f.ToCoefficients(FieldMath.Pow(f, a, e))[0]);
            if (e <= ulong.MaxValue) Assert.Equal(expected, f.ToCoefficients(FieldMath.Pow(f, a, (ulong)e))[0]);
        }
    }

    [Fact]
    public void ZeroToTheZeroIsOne()
    {
        var f = PrimeField31.Create(101);
        Assert.True(f.AreEqual(f.One, FieldMath.Pow(f, f.Zero, 0UL)));
        Assert.True(f.AreEqual(f.One, FieldMath.Pow(f, f.Zero, BigInteger.Zero)));
        Assert.True(f.IsZero(FieldMath.Pow(f, f.Zero, BigInteger.Pow(10, 30))));
    }

    [Fact]
    public void NegativeExponentsAreRejected()
    {
        var f = SmallPrimeField.Create(7);
        Assert.Throws<ArgumentOutOfRangeException>(() => FieldMath.Pow(f, f.One, BigInteger.MinusOne));
    }

    [Fact]
    public void InverseAndDivideReportZeroDivisors()
    {
        var f = BigPrimeField.Create(1009);
        Assert.False(FieldMath.Inverse(f, f.Zero, out _));
        Assert.False(FieldMath.Divide(f, f.One, f.Zero, out var quotient));
        Assert.True(f.IsZero(quotient));
        Assert.True(FieldMath.Inverse(f, f.FromInteger(2), out var half));
        Assert.Equal(new BigInteger(505), f.ToCoefficients(half)[0]);
    }

    [Fact]
    public void PowWorksOverTheRationals()
    {
        var q = RationalField.Instance;
        Assert.Equal(Rational.Create(32, 59049), FieldMath.Pow(q, Rational.Create(2, 9), 5UL));
    }
}
