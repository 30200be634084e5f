using System.Numerics;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Tests.Fields;

public class PrimeField62Tests
{
    [Theory]
    [InlineData(1UL)]
    [InlineData(2UL)]
    [InlineData(3UL)]
    public void RandomFieldsSatisfyTheFieldLaws(ulong seed)
    {
        var random = new Xoshiro256(seed);
        FieldLaws.CheckLaws<PrimeField62, Residue62>(PrimeField62.CreateRandom(ref random), seed);
    }

    [Theory]
    [InlineData(3UL)]
    [InlineData(2305843009213693951UL)] // 2^61 − 1, a Mersenne prime (OEIS A000043)
    public void EdgeModuliSatisfyTheFieldLaws(ulong p) =>
        FieldLaws.CheckLaws<PrimeField62, Residue62>(PrimeField62.Create(p), p);

    [Fact]
    public void MatchesBigIntegerArithmeticForRandomPrimes()
    {
        var random = new Xoshiro256(62);
        for (var k = 0; k < 3; k++)
            ReferenceCheck.Run<PrimeField62, Residue62>(PrimeField62.CreateRandom(ref random), (ulong)k, 3000);
    }

    [Fact]
    public void MatchesBigIntegerArithmeticForTheLargestAndSmallestModuli()
    {
        var top = ReferenceCheck.LargestPrimeBelowPowerOfTwo(62);
        Assert.True(top > (BigInteger.One << 62) - 1000);
        ReferenceCheck.Run<PrimeField62, Residue62>(PrimeField62.Create((ulong)top), 21, 5000);
        ReferenceCheck.Run<PrimeField62, Residue62>(PrimeField62.Create(3), 22, 500);
        ReferenceCheck.Run<PrimeField62, Residue62>(PrimeField62.Create(4294967311), 23, 2000); // 2^32 + 15, the smallest prime above 2^32 [memory]; Create checks that it is prime
    }

    [Fact]
    public void StandardRepresentativeRoundTrips()
    {
        var f = PrimeField62.Create((ulong)ReferenceCheck.LargestPrimeBelowPowerOfTwo(62));
        foreach (var v in new ulong[] { 0, 1, 2, f.Modulus - 1, f.Modulus, f.Modulus + 1, ulong.MaxValue })
            Assert.Equal(v % f.Modulus, f.ToUInt64(f.FromUInt64(v)));
    }

    [Fact]
    public void CreateRandomDrawsAPrimeInTheTopBitRangeDeterministically()
    {
        var a = new Xoshiro256(5);
        var b = new Xoshiro256(5);
        for (var i = 0; i < 10; i++)
        {
            var f = PrimeField62.CreateRandom(ref a);
            Assert.Equal(f.Modulus, PrimeField62.CreateRandom(ref b).Modulus);
            Assert.InRange(f.Modulus, 1UL << 61, (1UL << 62) - 1);
            Assert.True(Primality.IsPrime(f.Modulus));
            Assert.Equal(f.Modulus, f.Characteristic);
        }
    }

    [Fact]
    public void CreateRejectsNonPrimeOrOutOfRangeModuli()
    {
        var primeAbove = (ulong)((BigInteger.One << 62) + 1);
        while (!Primality.IsPrime(primeAbove)) primeAbove += 2;
        foreach (var p in new ulong[] { 0, 1, 2, 15, 41041, (1UL << 61) + 1, primeAbove, ulong.MaxValue })
        {
            var e = Assert.Throws<ArgumentException>(() => PrimeField62.Create(p));
            Assert.Contains(p.ToString(), e.Message);
        }
    }
}
