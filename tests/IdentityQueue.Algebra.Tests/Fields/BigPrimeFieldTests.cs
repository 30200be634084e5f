using System.Numerics;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Tests.Fields;

public class BigPrimeFieldTests
{
    [Theory]
    [InlineData(1UL)]
    [InlineData(2UL)]
    public void RandomTwoHundredBitFieldsSatisfyTheFieldLaws(ulong seed)
    {
        var random = new Xoshiro256(seed);
        FieldLaws.CheckLaws<BigPrimeField, BigResidue>(BigPrimeField.CreateRandom(200, ref random), seed);
    }

    [Theory]
    [InlineData(2)]
    [InlineData(3)]
    [InlineData(7)]
    public void SmallModuliIncludingTwoSatisfyTheFieldLaws(int p) =>
        FieldLaws.CheckLaws<BigPrimeField, BigResidue>(BigPrimeField.Create(p), (ulong)p);

    [Fact]
    public void MatchesBigIntegerArithmetic()
    {
        var random = new Xoshiro256(200);
        ReferenceCheck.Run<BigPrimeField, BigResidue>(BigPrimeField.CreateRandom(200, ref random), 1, 2000);
        ReferenceCheck.Run<BigPrimeField, BigResidue>(BigPrimeField.Create((BigInteger.One << 127) - 1), 2, 1000);
        ReferenceCheck.Run<BigPrimeField, BigResidue>(BigPrimeField.Create(2), 3, 100);
    }

    [Theory]
    [InlineData(2)]
    [InlineData(3)]
    [InlineData(64)]
    [InlineData(200)]
    [InlineData(521)]
    public void CreateRandomDrawsAPrimeWithExactlyTheRequestedBits(int bits)
    {
        var a = new Xoshiro256((ulong)bits);
        var b = new Xoshiro256((ulong)bits);
        var f = BigPrimeField.CreateRandom(bits, ref a);
        Assert.Equal(f.Modulus, BigPrimeField.CreateRandom(bits, ref b).Modulus);
        Assert.Equal(bits, (int)f.Modulus.GetBitLength());
        Assert.True(Primality.IsPrime(f.Modulus));
        Assert.Equal(f.Modulus, f.Characteristic);
        Assert.Equal(bits - 1, Math.Floor(f.SizeLog2));
    }

    [Fact]
    public void TwoBitRandomPrimesAreTwoAndThree()
    {
        var random = new Xoshiro256(9);
        var seen = new HashSet<BigInteger>();
        for (var i = 0; i < 50; i++) seen.Add(BigPrimeField.CreateRandom(2, ref random).Modulus);
        Assert.Equal([2, 3], seen.Order());
    }

    [Fact]
    public void CreateRejectsNonPrimes()
    {
        foreach (var n in new BigInteger[] { -7, 0, 1, 4, 561, (BigInteger.One << 67) - 1, ((BigInteger.One << 61) - 1) * ((BigInteger.One << 89) - 1) })
        {
            var e = Assert.Throws<ArgumentException>(() => BigPrimeField.Create(n));
            Assert.Contains(n.ToString(), e.Message);
        }
        var random = new Xoshiro256(1);
        Assert.Throws<ArgumentOutOfRangeException>(() => BigPrimeField.CreateRandom(1, ref random));
    }
}
