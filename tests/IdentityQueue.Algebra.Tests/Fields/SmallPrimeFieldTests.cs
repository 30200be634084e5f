using System.Numerics;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Tests.Fields;

public class SmallPrimeFieldTests
{
    [Theory]
    [InlineData(2UL)]
    [InlineData(3UL)]
    [InlineData(7UL)]
    [InlineData(4294967291UL)]   // below 2^32: 64-bit products
    [InlineData(4294967311UL)]   // above 2^32: 128-bit products
    public void SatisfiesTheFieldLaws(ulong p) =>
        FieldLaws.CheckLaws<SmallPrimeField, SmallResidue>(SmallPrimeField.Create(p), p);

    [Fact]
    public void MatchesBigIntegerArithmeticUpToTheLargestPrimeBelowTwoToThe63()
    {
        var top = ReferenceCheck.LargestPrimeBelowPowerOfTwo(63);
        ReferenceCheck.Run<SmallPrimeField, SmallResidue>(SmallPrimeField.Create((ulong)top), 1, 4000);
        ReferenceCheck.Run<SmallPrimeField, SmallResidue>(SmallPrimeField.Create(2), 2, 50);
        ReferenceCheck.Run<SmallPrimeField, SmallResidue>(SmallPrimeField.Create(65521), 3, 2000); // largest prime below 2^16 [memory]; Create checks that it is prime
        ReferenceCheck.Run<SmallPrimeField, SmallResidue>(SmallPrimeField.Create(4294967311UL), 4, 2000);
    }

    [Fact]
    public void GaloisFieldOfTwoHasTheExpectedTables()
    {
        // GF(2): 1 + 1 = 0, 1·1 = 1, −1 = 1 (common practice).
        var f = SmallPrimeField.Create(2);
        Assert.True(f.IsZero(f.Add(f.One, f.One)));
        Assert.True(f.AreEqual(f.Negate(f.One), f.One));
        Assert.True(f.AreEqual(f.FromInteger(-1), f.One));
        Assert.True(f.IsZero(f.FromInteger(-BigInteger.Pow(2, 100))));
        Assert.Equal(1.0, f.SizeLog2);
    }

    [Fact]
    public void StandardRepresentativeRoundTrips()
    {
        var f = SmallPrimeField.Create(1000003);
        foreach (var v in new ulong[] { 0, 1, 1000002, 1000003, ulong.MaxValue })
            Assert.Equal(v % 1000003, f.ToUInt64(f.FromUInt64(v)));
    }

    [Fact]
    public void CreateRejectsNonPrimeOrOutOfRangeModuli()
    {
        var primeAbove = (1UL << 63) + 1;
        while (!Primality.IsPrime(primeAbove)) primeAbove += 2;
        foreach (var p in new ulong[] { 0, 1, 4, 825265, primeAbove, ulong.MaxValue - 58 })
        {
            var e = Assert.Throws<ArgumentException>(() => SmallPrimeField.Create(p));
            Assert.Contains(p.ToString(), e.Message);
        }
    }
}
