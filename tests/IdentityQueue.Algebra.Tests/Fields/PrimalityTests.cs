using System.Numerics;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Tests.Fields;

public class PrimalityTests
{
    public static TheoryData<int> MersenneExponents => [61, 89, 127];

    [Theory]
    [MemberData(nameof(MersenneExponents))]
    public void MersennePrimesAreRecognised(int exponent)
    {
        // 2^61−1, 2^89−1, 2^127−1 are prime: OEIS A000043 lists the exponents 61, 89, 127.
        var n = (BigInteger.One << exponent) - 1;
        Assert.True(Primality.IsPrime(n));
        if (n <= ulong.MaxValue) Assert.True(Primality.IsPrime((ulong)n));
    }

    [Fact]
    public void LargestPrimeBelowTwoToThe64IsRecognised()
    {
        // 2^64 − 59 is the largest prime below 2^64 [memory]; 2^64 − 58 … 2^64 − 1 are composite.
        var p = ulong.MaxValue - 58;
        Assert.True(Primality.IsPrime(p));
        Assert.True(Primality.IsPrime(new BigInteger(p)));
        for (var n = p + 1; n != 0; n++) Assert.False(Primality.IsPrime(n));
    }

    [Theory]
    [InlineData(561UL)]     // Carmichael numbers: OEIS A002997
    [InlineData(41041UL)]
    [InlineData(825265UL)]
    [InlineData(3215031751UL)] // strong pseudoprime to bases 2, 3, 5, 7 (Pomerance, Selfridge, Wagstaff, Math. Comp. 35 (1980) 1003–1026) [memory]
    [InlineData(1UL)]
    [InlineData(0UL)]
    [InlineData(4UL)]
    public void CompositesAndUnitsAreRejected(ulong n)
    {
        Assert.False(Primality.IsPrime(n));
        Assert.False(Primality.IsPrime(new BigInteger(n)));
    }

    [Fact]
    public void StrongPseudoprimeIsCompositeYetPassesBasesTwoThreeFiveSeven()
    {
        // 3215031751 = 151 · 751 · 28351 [memory]; both facts are computed here, so the test does not rest on memory.
        const ulong n = 3215031751;
        Assert.Equal(n, 151UL * 751 * 28351);
        foreach (var a in new[] { 2, 3, 5, 7 }) Assert.True(IsStrongProbablePrime(n, a), $"base {a}");
        Assert.False(IsStrongProbablePrime(n, 11));
    }

    /// <summary>One Miller–Rabin round (common practice): n − 1 = d·2^s, a^d ≡ 1 or a^(d·2^r) ≡ −1 for some r &lt; s.</summary>
    private static bool IsStrongProbablePrime(BigInteger n, BigInteger a)
    {
        var d = n - 1;
        var s = 0;
        while (d.IsEven) { d >>= 1; s++; }
        var x = BigInteger.ModPow(a, d, n);
        if (x.IsOne || x == n - 1) return true;
        for (var r = 1; r < s; r++)
        {
            x = x * x % n;
            if (x == n - 1) return true;
        }
        return false;
    }

    [Fact]
    public void ColesFactorisationOfTwoToThe67MinusOneIsConfirmed()
    {
        // 2^67 − 1 = 193707721 × 761838257287 (F. N. Cole, "On the factoring of large numbers", Bull. AMS 10 (1903) 134–137 [memory]).
        var n = (BigInteger.One << 67) - 1;
        Assert.Equal(n, new BigInteger(193707721) * 761838257287);
        Assert.False(Primality.IsPrime(n));
        Assert.True(Primality.IsPrime(193707721UL));
        Assert.True(Primality.IsPrime(761838257287UL));
    }

    [Fact]
    public void ProductsOfLargePrimesAreComposite()
    {
        var m61 = (BigInteger.One << 61) - 1;
        var m89 = (BigInteger.One << 89) - 1;
        var m31 = (BigInteger.One << 31) - 1;
        Assert.False(Primality.IsPrime(m61 * m89));          // above the deterministic limit: random bases
        Assert.False(Primality.IsPrime(m31 * m61));          // below it: fixed bases
        Assert.False(Primality.IsPrime(m61 * m61));
        Assert.False(Primality.IsPrime((BigInteger.One << 127) + 1));
        Assert.False(Primality.IsPrime(-m61));
    }

    [Fact]
    public void AgreesWithASieveUpTo100000()
    {
        // Sieve of Eratosthenes (common practice).
        const int limit = 100_000;
        var composite = new bool[limit + 1];
        composite[0] = composite[1] = true;
        for (var i = 2; i * i <= limit; i++)
            if (!composite[i])
                for (var j = i * i; j <= limit; j += i) composite[j] = true;
        for (var n = 0; n <= limit; n++)
        {
            Assert.Equal(!composite[n], Primality.IsPrime((ulong)n));
            if (n % 7 == 0) Assert.Equal(!composite[n], Primality.IsPrime(new BigInteger(n)));
        }
    }

    [Fact]
    public void PrimeCountLowerBoundIsBelowTheTrueCountAndClose()
    {
        // 27467389548130805 primes in (2^60, 2^61] (OEIS A007053: π(2^61) − π(2^60)).
        var truth = Math.Log2(27467389548130805.0);
        var bound = Primality.PrimeCountInRangeLog2(61);
        Assert.True(bound <= truth, $"bound {bound} exceeds log2 of the true count {truth}");
        Assert.True(truth - bound <= 1.5, $"bound {bound} is more than 1.5 bits below {truth}");
    }

    [Theory]
    [InlineData(3)]
    [InlineData(8)]
    [InlineData(31)]
    [InlineData(62)]
    [InlineData(64)]
    [InlineData(65)]
    [InlineData(127)]
    [InlineData(200)]
    public void RandomPrimeIsPrimeAndInRange(int bits)
    {
        var random = new Xoshiro256((ulong)bits * 1000003);
        for (var i = 0; i < 3; i++)
        {
            var p = Primality.RandomPrime(bits, ref random);
            Assert.True(p >= BigInteger.One << (bits - 1) && p < BigInteger.One << bits);
            Assert.True(Primality.IsPrime(p));
        }
    }

    [Fact]
    public void RandomPrimeIsDeterministicForASeed()
    {
        var a = new Xoshiro256(42);
        var b = new Xoshiro256(42);
        for (var i = 0; i < 5; i++)
            Assert.Equal(Primality.RandomPrime(100, ref a), Primality.RandomPrime(100, ref b));
        var c = new Xoshiro256(43);
        var d = new Xoshiro256(42);
        Assert.NotEqual(Primality.RandomPrime(100, ref c), Primality.RandomPrime(100, ref d));
    }

    // The 64-bit test (Montgomery powers) decides as thirteen BigInteger Miller–Rabin rounds with the bases 2 … 41 do,
    // on random odd numbers of the rungs' sizes, near 2^64, and on a strong pseudoprime to the bases 2 … 23.
    [Fact]
    public void SixtyFourBitTest_AgreesWithBigIntegerRounds()
    {
        int[] bases = [2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41];
        bool Reference(ulong n) => n > 41 && n % 2 == 1 && bases.All(a => IsStrongProbablePrime(n, a));
        var random = new Xoshiro256(64);
        var primes = 0;
        foreach (var bits in new[] { 31, 32, 62, 63, 64 })
        {
            for (var i = 0; i < 3000; i++)
            {
                var n = (random.NextUInt64() >> (64 - bits)) | (1UL << (bits - 1)) | 1UL;
                var expected = Reference(n);
                Assert.True(expected == Primality.IsPrime(n), $"{n}");
                if (expected) primes++;
            }
        }
        Assert.True(primes > 300, $"only {primes} primes drawn");
        // 3825123056546413051 = 149491 · 747451 · 34233211, a strong pseudoprime to the bases 2 … 23
        // (Jiang and Deng, Math. Comp. 83 (2014) [memory]); the product and the rounds are computed here.
        const ulong spsp = 3825123056546413051UL;
        Assert.Equal(spsp, 149491UL * 747451UL * 34233211UL);
        int[] witnesses = [2, 3, 5, 7, 11, 13, 17, 19, 23];
        Assert.All(witnesses, a => Assert.True(IsStrongProbablePrime(spsp, a)));
        Assert.False(Primality.IsPrime(spsp));
        Assert.True(Primality.IsPrime(ulong.MaxValue - 58)); // 2^64 − 59, see above
    }

    // Random primes below 64 bits take the 64-bit path and draw exactly what the BigInteger path draws.
    [Theory]
    [InlineData(31)]
    [InlineData(62)]
    public void RandomPrime_FollowsTheDrawsOfTheRange(int bits)
    {
        var a = new Xoshiro256(77);
        var b = new Xoshiro256(77);
        var low = 1UL << (bits - 1);
        for (var i = 0; i < 20; i++)
        {
            var p = Primality.RandomPrime(bits, ref a);
            ulong q;
            do q = low + b.NextBelow(low); while (!Primality.IsPrime(new BigInteger(q)));
            Assert.Equal(new BigInteger(q), p);
        }
    }

    [Fact]
    public void RandomPrimeRejectsTooFewBits()
    {
        var random = new Xoshiro256(1);
        Assert.Throws<ArgumentOutOfRangeException>(() => Primality.RandomPrime(2, ref random));
    }
}
