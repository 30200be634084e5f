using System.Numerics;
using System.Runtime.CompilerServices;

namespace IdentityQueue.Algebra.Fields;

/// <summary>An element of <see cref="PrimeField31"/> in Montgomery form (value·2^32 mod p). Immutable value type.</summary>
public readonly struct Residue31 : IEquatable<Residue31>
{
    /// <summary>The Montgomery representative, always in [0, p).</summary>
    internal readonly uint Value;

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal Residue31(uint montgomery) => Value = montgomery;

    public bool Equals(Residue31 other) => Value == other.Value;
    public override bool Equals(object? obj) => obj is Residue31 r && Equals(r);
    public override int GetHashCode() => (int)Value;
    public static bool operator ==(Residue31 a, Residue31 b) => a.Value == b.Value;
    public static bool operator !=(Residue31 a, Residue31 b) => a.Value != b.Value;
}

/// <summary>
/// GF(p) for an odd prime p &lt; 2^31, with Montgomery multiplication (R = 2^32) in subtractive form and
/// branch-free corrections. Immutable and thread-safe.
/// </summary>
public readonly struct PrimeField31 : IField<Residue31>
{
    private readonly uint _p;
    private readonly uint _pInverse; // p^-1 mod 2^32
    private readonly uint _r1;       // R mod p (Montgomery form of 1)
    private readonly uint _r2;       // R^2 mod p
    private readonly uint _r3;       // R^3 mod p

    private PrimeField31(uint p)
    {
        _p = p;
        unchecked
        {
            var x = p; // correct to 3 bits for odd p; each Newton step doubles the correct bits
            for (var i = 0; i < 4; i++) x *= 2 - p * x;
            _pInverse = x;
        }
        _r1 = (uint)((1UL << 32) % p);
        _r2 = (uint)((ulong)_r1 * _r1 % p);
        _r3 = (uint)((ulong)_r2 * _r1 % p);
    }

    /// <summary>GF(p); throws <see cref="ArgumentException"/> unless p is an odd prime below 2^31.</summary>
    public static PrimeField31 Create(uint p)
    {
        ModularHelpers.RequireOddPrimeBelow(p, 31, nameof(p));
        return new PrimeField31(p);
    }

    /// <summary>GF(p) for a prime p drawn uniformly from the primes in [2^30, 2^31).</summary>
    public static PrimeField31 CreateRandom(ref Xoshiro256 random) => new((uint)Primality.RandomPrime(31, ref random));

    public uint Modulus => _p;

    static ElementLayout IElementLayout.Layout => ElementLayout.Montgomery31;

    /// <summary>p^-1 mod 2^32, for lane kernels that run the Montgomery product on raw representatives.</summary>
    internal uint ModulusInverse => _pInverse;

    /// <summary>The element whose Montgomery representative is <paramref name="montgomery"/> (in [0, p)).</summary>
    internal static Residue31 FromMontgomery(uint montgomery) => new(montgomery);

    /// <summary>The Montgomery representative of <paramref name="a"/>, in [0, p).</summary>
    internal static uint ToMontgomery(Residue31 a) => a.Value;

    public Residue31 Zero => default;
    public Residue31 One => new(_r1);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public Residue31 Add(Residue31 a, Residue31 b)
    {
        unchecked
        {
            var d = a.Value + b.Value - _p; // in [-p, p) as a signed value since p < 2^31
            return new Residue31(d + (_p & (uint)((int)d >> 31)));
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public Residue31 Subtract(Residue31 a, Residue31 b)
    {
        unchecked
        {
            var d = a.Value - b.Value;
            return new Residue31(d + (_p & (uint)((int)d >> 31)));
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public Residue31 Negate(Residue31 a)
    {
        unchecked
        {
            var d = 0u - a.Value;
            return new Residue31(d + (_p & (uint)((int)d >> 31)));
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public Residue31 Multiply(Residue31 a, Residue31 b) => new(Reduce(unchecked((ulong)a.Value * b.Value))); // < 2^62: no overflow, no check

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public Residue31 MultiplyAdd(Residue31 a, Residue31 b, Residue31 c) => Add(Multiply(a, b), c);

    /// <summary>Montgomery reduction t·R^-1 mod p for t &lt; p·2^32, subtractive form: hi(t) − hi(m·p).</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private uint Reduce(ulong t)
    {
        unchecked
        {
            var m = (uint)t * _pInverse;               // m·p ≡ t (mod 2^32), so the low words cancel exactly
            var d = (uint)(t >> 32) - (uint)(((ulong)m * _p) >> 32);
            return d + (_p & (uint)((int)d >> 31));
        }
    }

    public bool IsZero(Residue31 a) => a.Value == 0;
    public bool AreEqual(Residue31 a, Residue31 b) => a.Value == b.Value;

    public bool TryInvert(Residue31 a, out Residue31 inverse)
    {
        if (a.Value == 0) { inverse = default; return false; }
        // (aR)^-1 = a^-1·R^-1; one Montgomery product with R^3 gives a^-1·R.
        var x = (uint)ModularHelpers.InverseModulo(a.Value, _p);
        inverse = new Residue31(Reduce((ulong)x * _r3));
        return true;
    }

    /// <summary>The element for the integer v (any size), reduced mod p.</summary>
    public Residue31 FromUInt32(uint v) => new(Reduce((ulong)(v % _p) * _r2));

    /// <summary>The standard representative in [0, p).</summary>
    public uint ToUInt32(Residue31 a) => Reduce(a.Value);

    public Residue31 FromInteger(BigInteger value) => FromUInt32((uint)ModularHelpers.Reduce(value, (ulong)_p));

    /// <summary>Uniform: a uniform Montgomery representative is a uniform residue, as x ↦ xR is a bijection.</summary>
    public Residue31 Sample(ref Xoshiro256 random) => new((uint)random.NextBelow(_p));

    public BigInteger Characteristic => _p;
    public int ExtensionDegree => 1;
    public double SizeLog2 => Math.Log2(_p);
    public BigInteger[] ToCoefficients(Residue31 a) => [ToUInt32(a)];
    public Residue31 FromCoefficients(ReadOnlySpan<BigInteger> coefficients) =>
        FromUInt32((uint)ModularHelpers.SingleCoefficient(coefficients, _p));
    public BigInteger[]? DefiningPolynomial => null;

    public override string ToString() => $"GF({_p})";
}
