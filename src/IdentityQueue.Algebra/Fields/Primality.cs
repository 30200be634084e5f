using System.Numerics;

namespace IdentityQueue.Algebra.Fields;

/// <summary>Primality tests and random primes. Stateless and thread-safe.</summary>
public static class Primality
{
    // Bases that make Miller–Rabin deterministic below 3.3·10^24 (Sorenson and Webster, Math. Comp. 86 (2017) 985–1003),
    // hence for every 64-bit value.
    private static readonly int[] DeterministicBases = [2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41];
    private static readonly BigInteger DeterministicLimit = BigInteger.Parse("3317044064679887385961981");
    private static readonly int[] SmallPrimes = [2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41, 43, 47, 53, 59, 61, 67, 71, 73, 79, 83, 89, 97];

    /// <summary>Rounds with random bases above the deterministic limit: error below 4^-64 for each composite.</summary>
    public const int RandomRounds = 64;

    /// <summary>True when n is prime: deterministic below 3.3·10^24, else Miller–Rabin with <see cref="RandomRounds"/> bases.</summary>
    public static bool IsPrime(BigInteger n)
    {
        if (n < 2) return false;
        if (n <= ulong.MaxValue) return IsPrime((ulong)n);
        foreach (var sp in SmallPrimes)
            if (n % sp == 0) return false;
        var d = n - 1;
        var s = 0;
        while (d.IsEven) { d >>= 1; s++; }
        if (n < DeterministicLimit)
        {
            foreach (var a in DeterministicBases)
                if (!MillerRabinRound(n, d, s, a)) return false;
            return true;
        }
        // Bases drawn from a generator seeded by n itself: deterministic for a given n, no shared state.
        var random = new Xoshiro256((ulong)(n & ulong.MaxValue) ^ 0xA5A5_5A5A_1234_4321UL);
        for (var i = 0; i < RandomRounds; i++)
        {
            var a = 2 + random.NextBelow(n - 3);
            if (!MillerRabinRound(n, d, s, a)) return false;
        }
        return true;
    }

    /// <summary>
    /// Deterministic Miller–Rabin for 64-bit values, with the bases above; the powers run in Montgomery form (R = 2^64,
    /// subtractive reduction), so no 128-bit division is needed inside the loop.
    /// </summary>
    public static bool IsPrime(ulong n)
    {
        if (n < 2) return false;
        if ((n & 1) == 0) return n == 2;
        if (n <= 97) return Array.IndexOf(SmallPrimes, (int)n) >= 0;
        // trial division: the primes up to 23 through one remainder by their product (2·3·…·23), then 29 … 97
        var m = (uint)(n % 223092870UL);
        for (var i = 1; i < 9; i++)
            if (m % (uint)SmallPrimes[i] == 0) return false;
        for (var i = 9; i < SmallPrimes.Length; i++)
            if (n % (ulong)SmallPrimes[i] == 0) return false;
        // n is odd from here on
        var d = n - 1;
        var s = BitOperations.TrailingZeroCount(d);
        d >>= s;
        var inverse = MontgomeryInverse(n);
        var one = (ulong)(((UInt128)1 << 64) % n); // R mod n: 1 in Montgomery form
        var minusOne = n - one;
        foreach (var a in DeterministicBases)
        {
            var x = MontgomeryPow((ulong)(((UInt128)(ulong)a << 64) % n), d, n, inverse, one);
            if (x == one || x == minusOne) continue;
            var composite = true;
            for (var r = 1; r < s; r++)
            {
                x = MontgomeryMultiply(x, x, n, inverse);
                if (x == minusOne) { composite = false; break; }
            }
            if (composite) return false;
        }
        return true;
    }

    /// <summary>n^-1 mod 2^64 for odd n, by Newton's iteration (each step doubles the correct low bits).</summary>
    private static ulong MontgomeryInverse(ulong n)
    {
        unchecked
        {
            var x = n; // correct to 3 bits for odd n
            for (var i = 0; i < 5; i++) x *= 2 - n * x;
            return x;
        }
    }

    /// <summary>a·b·2^-64 mod n for a, b in [0, n), n odd: hi(a·b) − hi(m·n) with m = lo(a·b)·n^-1, which lies in (−n, n).</summary>
    private static ulong MontgomeryMultiply(ulong a, ulong b, ulong n, ulong inverse)
    {
        unchecked
        {
            var high = Math.BigMul(a, b, out var low);
            var mn = Math.BigMul(low * inverse, n, out _);
            return high >= mn ? high - mn : high - mn + n;
        }
    }

    private static ulong MontgomeryPow(ulong a, ulong e, ulong n, ulong inverse, ulong one)
    {
        var result = one;
        while (e != 0)
        {
            if ((e & 1) != 0) result = MontgomeryMultiply(result, a, n, inverse);
            a = MontgomeryMultiply(a, a, n, inverse);
            e >>= 1;
        }
        return result;
    }

    /// <summary>A uniformly random prime in [2^(bits-1), 2^bits): uniform over the primes of that range.</summary>
    public static BigInteger RandomPrime(int bits, ref Xoshiro256 random)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(bits, 3);
        if (bits <= 63)
        {
            // The same draws as below (NextBelow of a 64-bit bound is the 64-bit draw), without BigInteger arithmetic.
            var small = 1UL << (bits - 1);
            while (true)
            {
                var candidate = small + random.NextBelow(small);
                if (IsPrime(candidate)) return candidate;
            }
        }
        var low = BigInteger.One << (bits - 1);
        while (true)
        {
            var candidate = low + random.NextBelow(low);
            if (IsPrime(candidate)) return candidate;
        }
    }

    /// <summary>
    /// A proven lower bound on the number of primes in [2^(bits-1), 2^bits), from
    /// x/ln x &lt; π(x) &lt; 1.25506·x/ln x for x ≥ 17 (Rosser and Schoenfeld, Illinois J. Math. 6 (1962), (3.2) and (3.5)).
    /// Returned as log2 of the count.
    /// </summary>
    public static double PrimeCountInRangeLog2(int bits)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(bits, 8);
        // count ≥ 2^b/(b ln 2) − 1.25506·2^(b−1)/((b−1) ln 2) = 2^(b−1)/ln 2 · (2/b − 1.25506/(b−1))
        var factor = (2.0 / bits - 1.25506 / (bits - 1)) / Math.Log(2);
        return bits - 1 + Math.Log2(factor) - 1e-9;
    }

    private static bool MillerRabinRound(BigInteger n, BigInteger d, int s, BigInteger a)
    {
        var x = BigInteger.ModPow(a, d, n);
        if (x.IsOne || x == n - 1) return true;
        for (var r = 1; r < s; r++)
        {
            x = BigInteger.ModPow(x, 2, n);
            if (x == n - 1) return true;
        }
        return false;
    }
}
