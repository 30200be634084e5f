using System.Numerics;
using System.Runtime.CompilerServices;

namespace IdentityQueue.Algebra.Fields;

/// <summary>An element of <see cref="SmallPrimeField"/>: the standard representative in [0, p). Immutable value type.</summary>
public readonly struct SmallResidue : IEquatable<SmallResidue>
{
    internal readonly ulong Value;

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal SmallResidue(ulong reduced) => Value = reduced;

    public bool Equals(SmallResidue other) => Value == other.Value;
    public override bool Equals(object? obj) => obj is SmallResidue r && Equals(r);
    public override int GetHashCode() => Value.GetHashCode();
    public static bool operator ==(SmallResidue a, SmallResidue b) => a.Value == b.Value;
    public static bool operator !=(SmallResidue a, SmallResidue b) => a.Value != b.Value;
    public override string ToString() => Value.ToString();
}

/// <summary>
/// GF(p) for any prime p &lt; 2^63, including 2, with plain residues and division-based reduction; the base
/// field of extensions for a given characteristic. Immutable and thread-safe.
/// </summary>
public readonly struct SmallPrimeField : IField<SmallResidue>
{
    private readonly ulong _p;
    private readonly bool _productFits; // (p-1)^2 < 2^64, so products reduce with a 64-bit remainder

    private SmallPrimeField(ulong p)
    {
        _p = p;
        _productFits = p <= 1UL << 32;
    }

    /// <summary>GF(p); throws <see cref="ArgumentException"/> unless p is a prime below 2^63.</summary>
    public static SmallPrimeField Create(ulong p)
    {
        if (p >= 1UL << 63) throw new ArgumentException($"modulus {p} must be a prime below 2^63", nameof(p));
        if (!Primality.IsPrime(p)) throw new ArgumentException($"modulus {p} is not prime", nameof(p));
        return new SmallPrimeField(p);
    }

    public ulong Modulus => _p;

    public SmallResidue Zero => default;
    public SmallResidue One => new(1);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public SmallResidue Add(SmallResidue a, SmallResidue b)
    {
        unchecked
        {
            var d = a.Value + b.Value - _p; // in [-p, p) as a signed value since p < 2^63
            return new SmallResidue(d + (_p & (ulong)((long)d >> 63)));
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public SmallResidue Subtract(SmallResidue a, SmallResidue b)
    {
        unchecked
        {
            var d = a.Value - b.Value;
            return new SmallResidue(d + (_p & (ulong)((long)d >> 63)));
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public SmallResidue Negate(SmallResidue a)
    {
        unchecked
        {
            var d = 0UL - a.Value;
            return new SmallResidue(d + (_p & (ulong)((long)d >> 63)));
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public SmallResidue Multiply(SmallResidue a, SmallResidue b) =>
        // neither product overflows (the first is below 2^64 when p ≤ 2^32); unchecked only drops the checks
        new(unchecked(_productFits ? a.Value * b.Value % _p : (ulong)(Math.BigMul(a.Value, b.Value) % _p)));

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public SmallResidue MultiplyAdd(SmallResidue a, SmallResidue b, SmallResidue c) => Add(Multiply(a, b), c);

    public bool IsZero(SmallResidue a) => a.Value == 0;
    public bool AreEqual(SmallResidue a, SmallResidue b) => a.Value == b.Value;

    public bool TryInvert(SmallResidue a, out SmallResidue inverse)
    {
        if (a.Value == 0) { inverse = default; return false; }
        inverse = new SmallResidue(ModularHelpers.InverseModulo(a.Value, _p));
        return true;
    }

    /// <summary>The element for the integer v (any size), reduced mod p.</summary>
    public SmallResidue FromUInt64(ulong v) => new(v % _p);

    /// <summary>The standard representative in [0, p).</summary>
    [System.Diagnostics.CodeAnalysis.SuppressMessage("Performance", "CA1822", Justification = "A field operation, called on the field like PrimeField62.ToUInt64, which needs its instance.")]
    public ulong ToUInt64(SmallResidue a) => a.Value;

    public SmallResidue FromInteger(BigInteger value) => new((ulong)ModularHelpers.Reduce(value, _p));

    public SmallResidue Sample(ref Xoshiro256 random) => new(random.NextBelow(_p));

    public BigInteger Characteristic => _p;
    public int ExtensionDegree => 1;
    public double SizeLog2 => Math.Log2(_p);
    public BigInteger[] ToCoefficients(SmallResidue a) => [a.Value];
    public SmallResidue FromCoefficients(ReadOnlySpan<BigInteger> coefficients) =>
        new((ulong)ModularHelpers.SingleCoefficient(coefficients, _p));
    public BigInteger[]? DefiningPolynomial => null;

    public override string ToString() => $"GF({_p})";
}
