using System.Numerics;

namespace IdentityQueue.Screening.Tests;

/// <summary>
/// A false constant identity whose difference factors into primes of one size looks true modulo each of them: the screen
/// must draw primes at random from a large range and account for such coincidences in the bound (reference cases,
/// "small-prime trap"; the prime count from Rosser and Schoenfeld's bounds).
/// </summary>
public class SmallPrimeTrapTests
{
    [Fact]
    public void ProductOfSmallPrimes_IsRefuted()
    {
        var r = Some.Screen("2*3*5*7*11*13*17*19*23*29*31*37*41*43*47 = 0");
        Assert.Equal(Verdict.Refuted, r.Verdict);
        Assert.True(r.Certified);
    }

    // 2^61 − 1 is a Mersenne prime (OEIS A000043); a fixed screen modulo it would call this identity true.
    [Fact]
    public void MultipleOfTheMersennePrime2To61Minus1_IsRefuted()
    {
        Assert.Equal(Verdict.Refuted, Some.Screen("(2^61 - 1) * 3 = 0").Verdict);
        Assert.Equal(Verdict.Refuted, Some.Screen("(2^61 - 1) * x = 0").Verdict);
        Assert.Equal(Verdict.Refuted, Some.Screen("(2^31 - 1)*(2^61 - 1)*(2^127 - 1) = 0").Verdict);
    }

    // The product of the 200 primes just above 2^30 is divisible by many 31-bit primes; over many seeds it is always refuted,
    // because a random 31-bit prime is one of them with probability about 200/5·10^7, and later trials use larger primes.
    [Fact]
    public void ProductOfManyThirtyOneBitPrimes_IsRefutedForEverySeed()
    {
        var product = BigInteger.One;
        var found = 0;
        for (var n = (BigInteger.One << 30) + 1; found < 200; n += 2)
            if (Algebra.Fields.Primality.IsPrime(n)) { product *= n; found++; }
        for (ulong seed = 1; seed <= 20; seed++)
            Assert.Equal(Verdict.Refuted, Some.Screen($"{product} = 0", seed: seed).Verdict);
    }

    // A constant identity of large height is decided by exact evaluation, not by primes that might all divide it.
    [Fact]
    public void ConstantIdentity_OfLargeHeight_IsDecidedExactly()
    {
        var r = Some.Screen("2^4000 = 2^4000");
        Assert.Equal(Verdict.Survived, r.Verdict);
        Assert.Equal(0, (int)r.DegreeBound);
        Assert.Empty(r.Trials);
        Assert.StartsWith(ExactDecision.Prefix, r.Message);
    }

    // A true constant identity survives with honest evidence (Lander and Parkin 1966, as in the reference cases).
    [Fact]
    public void TrueConstantIdentity_Survives() => Assert.Equal(Verdict.Survived, Some.Screen("2^61 - 1 = 2305843009213693951").Verdict);
}
