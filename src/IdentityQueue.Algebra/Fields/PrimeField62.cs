using System.Numerics;
using System.Runtime.CompilerServices;

namespace IdentityQueue.Algebra.Fields;

/// <summary>An element of <see cref="PrimeField62"/> in Montgomery form (value·2^64 mod p). Immutable value type.</summary>
public readonly struct Residue62 : IEquatable<Residue62>
{
    /// <summary>The Montgomery representative, always in [0, p).</summary>
    internal readonly ulong Value;

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal Residue62(ulong montgomery) => Value = montgomery;

    public bool Equals(Residue62 other) => Value == other.Value;
    public override bool Equals(object? obj) => obj is Residue62 r && Equals(r);
    public override int GetHashCode() => Value.GetHashCode();
    public static bool operator ==(Residue62 a, Residue62 b) => a.Value == b.Value;
    public static bool operator !=(Residue62 a, Residue62 b) => a.Value != b.Value;
}

/// <summary>
/// GF(p) for an odd prime p &lt; 2^62, with Montgomery multiplication (R = 2^64) in subtractive form via
/// <see cref="Math.BigMul(ulong, ulong, out ulong)"/> and branch-free corrections. Immutable and thread-safe.
/// </summary>
public readonly struct PrimeField62 : IField<Residue62>
{
    private readonly ulong _p;
    private readonly ulong _pInverse; // p^-1 mod 2^64
    private readonly ulong _r1;       // R mod p (Montgomery form of 1)
    private readonly ulong _r2;       // R^2 mod p
    private readonly ulong _r3;       // R^3 mod p

    private PrimeField62(ulong p)
    {
        _p = p;
        unchecked
        {
            var x = p; // correct to 3 bits for odd p; each Newton step doubles the correct bits
            for (var i = 0; i < 5; i++) x *= 2 - p * x;
            _pInverse = x;
            _r1 = (0UL - p) % p; // 2^64 mod p
        }
        _r2 = (ulong)((UInt128)_r1 * _r1 % p);
        _r3 = (ulong)((UInt128)_r2 * _r1 % p);
    }

    /// <summary>GF(p); throws <see cref="ArgumentException"/> unless p is an odd prime below 2^62.</summary>
    public static PrimeField62 Create(ulong p)
    {
        ModularHelpers.RequireOddPrimeBelow(p, 62, nameof(p));
        return new PrimeField62(p);
    }

    /// <summary>GF(p) for a prime p drawn uniformly from the primes in [2^61, 2^62).</summary>
    public static PrimeField62 CreateRandom(ref Xoshiro256 random) => new((ulong)Primality.RandomPrime(62, ref random));

    public ulong Modulus => _p;

    static ElementLayout IElementLayout.Layout => ElementLayout.Montgomery62;

    /// <summary>p^-1 mod 2^64, for lane kernels that run the Montgomery product on raw representatives.</summary>
    internal ulong ModulusInverse => _pInverse;

    /// <summary>R^2 mod p (R = 2^64): a Montgomery product with it converts a plain residue into Montgomery form.</summary>
    internal ulong MontgomerySquare => _r2;

    /// <summary>The element whose Montgomery representative is <paramref name="montgomery"/> (in [0, p)).</summary>
    internal static Residue62 FromMontgomery(ulong montgomery) => new(montgomery);

    /// <summary>The Montgomery representative of <paramref name="a"/>, in [0, p).</summary>
    internal static ulong ToMontgomery(Residue62 a) => a.Value;

    public Residue62 Zero => default;
    public Residue62 One => new(_r1);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public Residue62 Add(Residue62 a, Residue62 b)
    {
        unchecked
        {
            var d = a.Value + b.Value - _p; // in [-p, p) as a signed value since p < 2^62
            return new Residue62(d + (_p & (ulong)((long)d >> 63)));
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public Residue62 Subtract(Residue62 a, Residue62 b)
    {
        unchecked
        {
            var d = a.Value - b.Value;
            return new Residue62(d + (_p & (ulong)((long)d >> 63)));
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public Residue62 Negate(Residue62 a)
    {
        unchecked
        {
            var d = 0UL - a.Value;
            return new Residue62(d + (_p & (ulong)((long)d >> 63)));
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public Residue62 Multiply(Residue62 a, Residue62 b)
    {
        var hi = Math.BigMul(a.Value, b.Value, out var lo);
        return new Residue62(Reduce(hi, lo));
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public Residue62 MultiplyAdd(Residue62 a, Residue62 b, Residue62 c) => Add(Multiply(a, b), c);

    /// <summary>Montgomery reduction (hi·2^64 + lo)·R^-1 mod p for hi &lt; p, subtractive form: hi − hi(m·p).</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private ulong Reduce(ulong hi, ulong lo)
    {
        unchecked
        {
            var m = lo * _pInverse; // m·p ≡ lo (mod 2^64), so the low words cancel exactly
            var d = hi - Math.BigMul(m, _p, out _);
            return d + (_p & (ulong)((long)d >> 63));
        }
    }

    public bool IsZero(Residue62 a) => a.Value == 0;
    public bool AreEqual(Residue62 a, Residue62 b) => a.Value == b.Value;

    public bool TryInvert(Residue62 a, out Residue62 inverse)
    {
        if (a.Value == 0) { inverse = default; return false; }
        // (aR)^-1 = a^-1·R^-1; one Montgomery product with R^3 gives a^-1·R.
        var x = ModularHelpers.InverseModulo(a.Value, _p);
        inverse = Multiply(new Residue62(x), new Residue62(_r3));
        return true;
    }

    /// <summary>The element for the integer v (any size), reduced mod p.</summary>
    public Residue62 FromUInt64(ulong v) => Multiply(new Residue62(v % _p), new Residue62(_r2));

    /// <summary>The standard representative in [0, p).</summary>
    public ulong ToUInt64(Residue62 a) => Reduce(0, a.Value);

    public Residue62 FromInteger(BigInteger value) => FromUInt64(ModularHelpers.Reduce(value, _p));

    /// <summary>Uniform: a uniform Montgomery representative is a uniform residue, as x ↦ xR is a bijection.</summary>
    public Residue62 Sample(ref Xoshiro256 random) => new(random.NextBelow(_p));

    public BigInteger Characteristic => _p;
    public int ExtensionDegree => 1;
    public double SizeLog2 => Math.Log2(_p);
    public BigInteger[] ToCoefficients(Residue62 a) => [ToUInt64(a)];
    public Residue62 FromCoefficients(ReadOnlySpan<BigInteger> coefficients) =>
        FromUInt64((ulong)ModularHelpers.SingleCoefficient(coefficients, _p));
    public BigInteger[]? DefiningPolynomial => null;

    public override string ToString() => $"GF({_p})";
}
