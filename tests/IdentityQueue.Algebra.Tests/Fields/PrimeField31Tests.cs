using System.Numerics;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Tests.Fields;

public class PrimeField31Tests
{
    [Theory]
    [InlineData(1UL)]
    [InlineData(2UL)]
    [InlineData(3UL)]
    public void RandomFieldsSatisfyTheFieldLaws(ulong seed)
    {
        var random = new Xoshiro256(seed);
        FieldLaws.CheckLaws<PrimeField31, Residue31>(PrimeField31.CreateRandom(ref random), seed);
    }

    [Theory]
    [InlineData(3u)]
    [InlineData(5u)]
    [InlineData(2147483647u)] // 2^31 − 1, a Mersenne prime (OEIS A000043)
    public void EdgeModuliSatisfyTheFieldLaws(uint p) =>
        FieldLaws.CheckLaws<PrimeField31, Residue31>(PrimeField31.Create(p), p);

    [Fact]
    public void MatchesBigIntegerArithmeticForRandomPrimes()
    {
        var random = new Xoshiro256(31);
        for (var k = 0; k < 3; k++)
            ReferenceCheck.Run<PrimeField31, Residue31>(PrimeField31.CreateRandom(ref random), (ulong)k, 3000);
    }

    [Fact]
    public void MatchesBigIntegerArithmeticForTheLargestAndSmallestModuli()
    {
        var top = ReferenceCheck.LargestPrimeBelowPowerOfTwo(31);
        Assert.Equal((BigInteger.One << 31) - 1, top);
        ReferenceCheck.Run<PrimeField31, Residue31>(PrimeField31.Create((uint)top), 11, 5000);
        ReferenceCheck.Run<PrimeField31, Residue31>(PrimeField31.Create(3), 12, 500);
        ReferenceCheck.Run<PrimeField31, Residue31>(PrimeField31.Create(65537), 13, 2000);
    }

    [Fact]
    public void StandardRepresentativeRoundTrips()
    {
        var f = PrimeField31.Create(2147483629);
        foreach (var v in new uint[] { 0, 1, 2, 2147483628, 2147483629, 2147483630, uint.MaxValue })
            Assert.Equal(v % f.Modulus, f.ToUInt32(f.FromUInt32(v)));
    }

    [Fact]
    public void CreateRandomDrawsAPrimeInTheTopBitRangeDeterministically()
    {
        var a = new Xoshiro256(5);
        var b = new Xoshiro256(5);
        for (var i = 0; i < 10; i++)
        {
            var f = PrimeField31.CreateRandom(ref a);
            Assert.Equal(f.Modulus, PrimeField31.CreateRandom(ref b).Modulus);
            Assert.InRange(f.Modulus, 1u << 30, (1u << 31) - 1);
            Assert.True(Primality.IsPrime(f.Modulus));
            Assert.Equal(f.Modulus, f.Characteristic);
            Assert.Equal(1, f.ExtensionDegree);
            Assert.Null(f.DefiningPolynomial);
        }
    }

    [Theory]
    [InlineData(0u)]
    [InlineData(1u)]
    [InlineData(2u)]          // even: Montgomery needs an odd modulus
    [InlineData(9u)]
    [InlineData(561u)]
    [InlineData(4294967291u)] // prime [memory], but not below 2^31 (primality asserted below)
    public void CreateRejectsNonPrimeOrOutOfRangeModuli(uint p)
    {
        var e = Assert.Throws<ArgumentException>(() => PrimeField31.Create(p));
        Assert.Contains(p.ToString(), e.Message);
        if (p == 4294967291u) Assert.True(Primality.IsPrime(p));
    }

    [Fact]
    public void FromCoefficientsRejectsOutOfRangeValues()
    {
        var f = PrimeField31.Create(101);
        Assert.Throws<ArgumentException>(() => f.FromCoefficients([new BigInteger(101)]));
        Assert.Throws<ArgumentException>(() => f.FromCoefficients([BigInteger.MinusOne]));
        Assert.Throws<ArgumentException>(() => f.FromCoefficients([BigInteger.One, BigInteger.One]));
    }
}
