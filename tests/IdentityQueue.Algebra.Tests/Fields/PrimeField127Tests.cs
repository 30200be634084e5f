using System.Numerics;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Tests.Fields;

public class PrimeField127Tests
{
    private static readonly UInt128 Mersenne127 = (UInt128.One << 127) - 1; // prime (OEIS A000043)

    [Theory]
    [InlineData(1UL)]
    [InlineData(2UL)]
    [InlineData(3UL)]
    public void RandomFieldsSatisfyTheFieldLaws(ulong seed)
    {
        var random = new Xoshiro256(seed);
        FieldLaws.CheckLaws<PrimeField127, Residue127>(PrimeField127.CreateRandom(ref random), seed);
    }

    [Fact]
    public void EdgeModuliSatisfyTheFieldLaws()
    {
        FieldLaws.CheckLaws<PrimeField127, Residue127>(PrimeField127.Create(Mersenne127), 4);
        FieldLaws.CheckLaws<PrimeField127, Residue127>(PrimeField127.Create(3), 5);
        FieldLaws.CheckLaws<PrimeField127, Residue127>(PrimeField127.Create(2305843009213693951UL), 6); // 2^61 − 1
    }

    [Fact]
    public void MatchesBigIntegerArithmeticForRandomPrimes()
    {
        var random = new Xoshiro256(127);
        for (var k = 0; k < 3; k++)
            ReferenceCheck.Run<PrimeField127, Residue127>(PrimeField127.CreateRandom(ref random), (ulong)k, 3000);
    }

    [Fact]
    public void MatchesBigIntegerArithmeticForTheLargestAndSmallestModuli()
    {
        Assert.Equal((BigInteger)Mersenne127, ReferenceCheck.LargestPrimeBelowPowerOfTwo(127));
        ReferenceCheck.Run<PrimeField127, Residue127>(PrimeField127.Create(Mersenne127), 31, 5000);
        ReferenceCheck.Run<PrimeField127, Residue127>(PrimeField127.Create(3), 32, 500);
        // a prime just above 2^64, where the upper limb of p is 1
        var p = (BigInteger.One << 64) + 1;
        while (!Primality.IsPrime(p)) p += 2;
        ReferenceCheck.Run<PrimeField127, Residue127>(PrimeField127.Create((UInt128)p), 33, 2000);
    }

    [Fact]
    public void StandardRepresentativeRoundTrips()
    {
        var f = PrimeField127.Create(Mersenne127);
        foreach (var v in new[] { UInt128.Zero, UInt128.One, Mersenne127 - 1, Mersenne127, Mersenne127 + 5, UInt128.MaxValue })
            Assert.Equal(v % Mersenne127, f.ToUInt128(f.FromUInt128(v)));
    }

    [Fact]
    public void SampleIsInRangeAndCoversTheTopBits()
    {
        var random = new Xoshiro256(8);
        var f = PrimeField127.CreateRandom(ref random);
        var max = UInt128.Zero;
        for (var i = 0; i < 1000; i++)
        {
            var x = f.ToUInt128(f.Sample(ref random));
            Assert.True(x < f.Modulus);
            if (x > max) max = x;
        }
        Assert.True(max > f.Modulus / 10 * 9);
    }

    [Fact]
    public void CreateRandomDrawsAPrimeInTheTopBitRangeDeterministically()
    {
        var a = new Xoshiro256(5);
        var b = new Xoshiro256(5);
        for (var i = 0; i < 4; i++)
        {
            var f = PrimeField127.CreateRandom(ref a);
            Assert.Equal(f.Modulus, PrimeField127.CreateRandom(ref b).Modulus);
            Assert.True(f.Modulus >= UInt128.One << 126 && f.Modulus < UInt128.One << 127);
            Assert.True(Primality.IsPrime(f.Modulus));
        }
    }

    [Fact]
    public void CreateRejectsNonPrimeOrOutOfRangeModuli()
    {
        var primeAbove = (BigInteger.One << 127) + 1;
        while (!Primality.IsPrime(primeAbove)) primeAbove += 2;
        foreach (var p in new UInt128[] { 0, 1, 2, 561, (UInt128)((BigInteger.One << 67) - 1), (UInt128)primeAbove, UInt128.MaxValue })
        {
            var e = Assert.Throws<ArgumentException>(() => PrimeField127.Create(p));
            Assert.Contains(p.ToString(), e.Message);
        }
    }
}
