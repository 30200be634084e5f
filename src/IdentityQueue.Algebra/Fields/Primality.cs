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
        foreach (var sp in SmallPrimes)
        {
            if (n == sp) return true;
            if (n % sp == 0) return false;
        }
        if (n <= ulong.MaxValue) return IsPrime((ulong)n);
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

    /// <summary>Deterministic Miller–Rabin for 64-bit values.</summary>
    public static bool IsPrime(ulong n)
    {
        if (n < 2) return false;
        foreach (var sp in SmallPrimes)
        {
            if (n == (ulong)sp) return true;
            if (n % (ulong)sp == 0) return false;
        }
        var d = n - 1;
        var s = BitOperations.TrailingZeroCount(d);
        d >>= s;
        foreach (var a in DeterministicBases)
        {
            var x = PowMod((ulong)a % n, d, n);
            if (x == 1 || x == n - 1) continue;
            var composite = true;
            for (var r = 1; r < s; r++)
            {
                x = MulMod(x, x, n);
                if (x == n - 1) { composite = false; break; }
            }
            if (composite) return false;
        }
        return true;
    }

    /// <summary>A uniformly random prime in [2^(bits-1), 2^bits): uniform over the primes of that range.</summary>
    public static BigInteger RandomPrime(int bits, ref Xoshiro256 random)
    {
        if (bits < 3) throw new ArgumentOutOfRangeException(nameof(bits));
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
        if (bits < 8) throw new ArgumentOutOfRangeException(nameof(bits));
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

    internal static ulong MulMod(ulong a, ulong b, ulong m) => (ulong)((UInt128)a * b % m);

    internal static ulong PowMod(ulong a, ulong e, ulong m)
    {
        ulong result = 1 % m;
        while (e != 0)
        {
            if ((e & 1) != 0) result = MulMod(result, a, m);
            a = MulMod(a, a, m);
            e >>= 1;
        }
        return result;
    }
}
