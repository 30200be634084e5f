using System.Numerics;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Tests.Fields;

/// <summary>Compares a prime field's arithmetic with plain BigInteger arithmetic mod p.</summary>
internal static class ReferenceCheck
{
    /// <summary>Values near 0, near p, near p/2 and uniformly random, all in [0, p).</summary>
    public static List<BigInteger> Values(BigInteger p, int randomCount, ref Xoshiro256 random)
    {
        var values = new List<BigInteger>();
        for (var k = 0; k < 16; k++)
        {
            if (k < p) values.Add(k);
            if (p - 1 - k >= 0) values.Add(p - 1 - k);
            if (p / 2 + k < p) values.Add(p / 2 + k);
        }
        for (var i = 0; i < randomCount; i++) values.Add(random.NextBelow(p));
        return values;
    }

    /// <summary>
    /// Every operation against (a op b) mod p in BigInteger, on about <paramref name="pairs"/> pairs
    /// (common practice: a reference implementation as oracle).
    /// </summary>
    public static void Run<TField, T>(TField f, ulong seed, int pairs)
        where TField : struct, IField<T>
        where T : struct
    {
        var p = f.Characteristic;
        var random = new Xoshiro256(seed);
        var values = Values(p, 200, ref random);
        BigInteger Std(T x) => f.ToCoefficients(x)[0];
        for (var i = 0; i < pairs; i++)
        {
            // every value against a few partners, then random pairs
            var a = values[i % values.Count];
            var b = i < values.Count * 4 ? values[(int)random.NextBelow((ulong)values.Count)] : random.NextBelow(p);
            var c = values[(i * 31 + 7) % values.Count];
            var x = f.FromInteger(a);
            var y = f.FromInteger(b);
            var z = f.FromInteger(c);
            Assert.Equal(a, Std(x));
            Assert.Equal(a * b % p, Std(f.Multiply(x, y)));
            Assert.Equal((a * b + c) % p, Std(f.MultiplyAdd(x, y, z)));
            Assert.Equal((a + b) % p, Std(f.Add(x, y)));
            Assert.Equal(((a - b) % p + p) % p, Std(f.Subtract(x, y)));
            Assert.Equal((p - a) % p, Std(f.Negate(x)));
            Assert.Equal(a == b, f.AreEqual(x, y));
            if (!a.IsZero && i % 8 == 0)
            {
                Assert.True(f.TryInvert(x, out var inverse));
                Assert.Equal(BigInteger.ModPow(a, p - 2, p), Std(inverse));
            }
        }
    }

    /// <summary>The largest prime below 2^bits, by downward search.</summary>
    public static BigInteger LargestPrimeBelowPowerOfTwo(int bits)
    {
        var n = (BigInteger.One << bits) - 1;
        while (!Primality.IsPrime(n)) n -= 2;
        return n;
    }
}
