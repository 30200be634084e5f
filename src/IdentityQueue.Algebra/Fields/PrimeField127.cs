using System.Numerics;
using System.Runtime.CompilerServices;

namespace IdentityQueue.Algebra.Fields;

/// <summary>An element of <see cref="PrimeField127"/> in Montgomery form (value·2^128 mod p). Immutable value type.</summary>
public readonly struct Residue127 : IEquatable<Residue127>
{
    /// <summary>The Montgomery representative, always in [0, p).</summary>
    internal readonly UInt128 Value;

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal Residue127(UInt128 montgomery) => Value = montgomery;

    public bool Equals(Residue127 other) => Value == other.Value;
    public override bool Equals(object? obj) => obj is Residue127 r && Equals(r);
    public override int GetHashCode() => Value.GetHashCode();
    public static bool operator ==(Residue127 a, Residue127 b) => a.Value == b.Value;
    public static bool operator !=(Residue127 a, Residue127 b) => a.Value != b.Value;
}

/// <summary>
/// GF(p) for an odd prime p &lt; 2^127, with Montgomery multiplication (R = 2^128) built from 64-bit limb
/// products, subtractive form and branch-free corrections. Immutable and thread-safe.
/// </summary>
public readonly struct PrimeField127 : IField<Residue127>
{
    private readonly UInt128 _p;
    private readonly ulong _p0, _p1;   // limbs of p
    private readonly ulong _q0, _q1;   // limbs of p^-1 mod 2^128
    private readonly UInt128 _r1;      // R mod p (Montgomery form of 1)
    private readonly UInt128 _r2;      // R^2 mod p
    private readonly UInt128 _r3;      // R^3 mod p
    private readonly UInt128 _sampleMask;

    private PrimeField127(UInt128 p)
    {
        _p = p;
        unchecked
        {
            _p0 = (ulong)p;
            _p1 = (ulong)(p >> 64);
            var x = p; // correct to 3 bits for odd p; each Newton step doubles the correct bits
            for (var i = 0; i < 6; i++) x *= 2 - p * x;
            _q0 = (ulong)x;
            _q1 = (ulong)(x >> 64);
            _r1 = (UInt128.Zero - p) % p; // 2^128 mod p
            _sampleMask = UInt128.MaxValue >> (int)UInt128.LeadingZeroCount(p - 1);
        }
        var big = (BigInteger)p;
        var r1 = (BigInteger)_r1;
        _r2 = (UInt128)(r1 * r1 % big);
        _r3 = (UInt128)(r1 * r1 % big * r1 % big);
    }

    /// <summary>GF(p); throws <see cref="ArgumentException"/> unless p is an odd prime below 2^127.</summary>
    public static PrimeField127 Create(UInt128 p)
    {
        ModularHelpers.RequireOddPrimeBelow(p, 127, nameof(p));
        return new PrimeField127(p);
    }

    /// <summary>GF(p) for a prime p drawn uniformly from the primes in [2^126, 2^127).</summary>
    public static PrimeField127 CreateRandom(ref Xoshiro256 random) => new((UInt128)Primality.RandomPrime(127, ref random));

    public UInt128 Modulus => _p;

    public Residue127 Zero => default;
    public Residue127 One => new(_r1);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public Residue127 Add(Residue127 a, Residue127 b)
    {
        unchecked
        {
            var d = a.Value + b.Value - _p; // in [-p, p) as a signed value since p < 2^127
            return new Residue127(d + (_p & (UInt128)((Int128)d >> 127)));
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public Residue127 Subtract(Residue127 a, Residue127 b)
    {
        unchecked
        {
            var d = a.Value - b.Value;
            return new Residue127(d + (_p & (UInt128)((Int128)d >> 127)));
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public Residue127 Negate(Residue127 a)
    {
        unchecked
        {
            var d = UInt128.Zero - a.Value;
            return new Residue127(d + (_p & (UInt128)((Int128)d >> 127)));
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public Residue127 Multiply(Residue127 a, Residue127 b) => new(MontgomeryProduct(a.Value, b.Value));

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public Residue127 MultiplyAdd(Residue127 a, Residue127 b, Residue127 c) => Add(Multiply(a, b), c);

    /// <summary>
    /// a·b·R^-1 mod p for a, b &lt; p: the 256-bit product t from four limb products, m = t·p^-1 mod 2^128,
    /// and hi(t) − hi(m·p), where the low halves cancel exactly because m·p ≡ t (mod 2^128).
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private UInt128 MontgomeryProduct(UInt128 a, UInt128 b)
    {
        unchecked
        {
            ulong a0 = (ulong)a, a1 = (ulong)(a >> 64), b0 = (ulong)b, b1 = (ulong)(b >> 64);

            // t = a·b = w3:w2:w1:w0
            var h00 = Math.BigMul(a0, b0, out var w0);
            var h01 = Math.BigMul(a0, b1, out var l01);
            var h10 = Math.BigMul(a1, b0, out var l10);
            var h11 = Math.BigMul(a1, b1, out var l11);
            var c1 = (UInt128)h00 + l01 + l10;
            var w1 = (ulong)c1;
            var c2 = (UInt128)h01 + h10 + l11 + (ulong)(c1 >> 64);
            var tHigh = new UInt128(h11 + (ulong)(c2 >> 64), (ulong)c2);

            // m = (w1:w0)·p^-1 mod 2^128
            var mh = Math.BigMul(w0, _q0, out var m0);
            var m1 = mh + w0 * _q1 + w1 * _q0;

            // high half of m·p (its low half equals w1:w0)
            var g00 = Math.BigMul(m0, _p0, out _);
            var g01 = Math.BigMul(m0, _p1, out var k01);
            var g10 = Math.BigMul(m1, _p0, out var k10);
            var g11 = Math.BigMul(m1, _p1, out var k11);
            var e1 = (UInt128)g00 + k01 + k10;
            var e2 = (UInt128)g01 + g10 + k11 + (ulong)(e1 >> 64);
            var mpHigh = new UInt128(g11 + (ulong)(e2 >> 64), (ulong)e2);

            var d = tHigh - mpHigh; // in (-p, p)
            return d + (_p & (UInt128)((Int128)d >> 127));
        }
    }

    public bool IsZero(Residue127 a) => a.Value == UInt128.Zero;
    public bool AreEqual(Residue127 a, Residue127 b) => a.Value == b.Value;

    public bool TryInvert(Residue127 a, out Residue127 inverse)
    {
        if (a.Value == UInt128.Zero) { inverse = default; return false; }
        // (aR)^-1 = a^-1·R^-1; one Montgomery product with R^3 gives a^-1·R.
        var x = ModularHelpers.InverseModulo(a.Value, _p);
        inverse = new Residue127(MontgomeryProduct(x, _r3));
        return true;
    }

    /// <summary>The element for the integer v (any size), reduced mod p.</summary>
    public Residue127 FromUInt128(UInt128 v) => new(MontgomeryProduct(v % _p, _r2));

    /// <summary>The standard representative in [0, p).</summary>
    public UInt128 ToUInt128(Residue127 a) => MontgomeryProduct(a.Value, UInt128.One);

    public Residue127 FromInteger(BigInteger value) => FromUInt128((UInt128)ModularHelpers.Reduce(value, _p));

    /// <summary>Uniform by rejection on p's bit length; a uniform Montgomery representative is a uniform residue.</summary>
    public Residue127 Sample(ref Xoshiro256 random)
    {
        while (true)
        {
            var v = new UInt128(random.NextUInt64(), random.NextUInt64()) & _sampleMask;
            if (v < _p) return new Residue127(v);
        }
    }

    public BigInteger Characteristic => _p;
    public int ExtensionDegree => 1;
    public double SizeLog2 => BigInteger.Log((BigInteger)_p, 2);
    public BigInteger[] ToCoefficients(Residue127 a) => [ToUInt128(a)];
    public Residue127 FromCoefficients(ReadOnlySpan<BigInteger> coefficients) =>
        FromUInt128((UInt128)ModularHelpers.SingleCoefficient(coefficients, _p));
    public BigInteger[]? DefiningPolynomial => null;

    public override string ToString() => $"GF({_p})";
}
