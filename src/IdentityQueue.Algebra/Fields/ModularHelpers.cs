using System.Numerics;

namespace IdentityQueue.Algebra.Fields;

/// <summary>Shared validation and inversion helpers for the prime-field structs. Stateless and thread-safe.</summary>
internal static class ModularHelpers
{
    /// <summary>value mod p in [0, p) for any sign and size of value.</summary>
    public static BigInteger Reduce(BigInteger value, BigInteger p)
    {
        var r = BigInteger.Remainder(value, p);
        return r.Sign < 0 ? r + p : r;
    }

    /// <summary>value mod p in [0, p) for a modulus below 2^63, without BigInteger division when the value fits in 62 bits.</summary>
    public static ulong Reduce(BigInteger value, ulong p)
    {
        if (value.GetBitLength() < 63)
        {
            var r = (long)value % (long)p;
            return (ulong)(r < 0 ? r + (long)p : r);
        }
        return (ulong)Reduce(value, new BigInteger(p));
    }

    /// <summary>The single coordinate of a prime-field element, checked to lie in [0, p).</summary>
    public static BigInteger SingleCoefficient(ReadOnlySpan<BigInteger> coefficients, BigInteger p)
    {
        if (coefficients.Length != 1)
            throw new ArgumentException($"a prime-field element has exactly one coefficient, got {coefficients.Length}", nameof(coefficients));
        var c = coefficients[0];
        if (c.Sign < 0 || c >= p)
            throw new ArgumentException($"coefficient {c} is not in [0, {p})", nameof(coefficients));
        return c;
    }

    /// <summary>a^-1 mod p for 0 &lt; a &lt; p &lt; 2^63, p prime, by the extended Euclidean algorithm.</summary>
    public static ulong InverseModulo(ulong a, ulong p)
    {
        // Invariants: r0 ≡ t0·a, r1 ≡ t1·a (mod p); |t| ≤ p, so long suffices for p < 2^63.
        long t0 = 0, t1 = 1;
        ulong r0 = p, r1 = a;
        while (r1 != 0)
        {
            var q = r0 / r1;
            (r0, r1) = (r1, r0 - q * r1);
            (t0, t1) = (t1, t0 - (long)q * t1);
        }
        return t0 < 0 ? (ulong)(t0 + (long)p) : (ulong)t0;
    }

    /// <summary>a^-1 mod p for 0 &lt; a &lt; p &lt; 2^127, p prime, by the extended Euclidean algorithm.</summary>
    public static UInt128 InverseModulo(UInt128 a, UInt128 p)
    {
        Int128 t0 = 0, t1 = 1;
        UInt128 r0 = p, r1 = a;
        while (r1 != 0)
        {
            var q = r0 / r1;
            (r0, r1) = (r1, r0 - q * r1);
            (t0, t1) = (t1, t0 - (Int128)q * t1);
        }
        return t0 < 0 ? (UInt128)(t0 + (Int128)p) : (UInt128)t0;
    }

    /// <summary>a^-1 mod p for 0 &lt; a &lt; p, p prime, by the extended Euclidean algorithm.</summary>
    public static BigInteger InverseModulo(BigInteger a, BigInteger p)
    {
        BigInteger t0 = 0, t1 = 1, r0 = p, r1 = a;
        while (!r1.IsZero)
        {
            var q = BigInteger.DivRem(r0, r1, out var r);
            (r0, r1) = (r1, r);
            (t0, t1) = (t1, t0 - q * t1);
        }
        return t0.Sign < 0 ? t0 + p : t0;
    }

    /// <summary>Throws unless p is an odd prime below 2^bits.</summary>
    public static void RequireOddPrimeBelow(BigInteger p, int bits, string parameter)
    {
        if (p < 3 || p.IsEven || p >= BigInteger.One << bits)
            throw new ArgumentException($"modulus {p} must be an odd prime below 2^{bits}", parameter);
        if (!Primality.IsPrime(p))
            throw new ArgumentException($"modulus {p} is not prime", parameter);
    }
}
