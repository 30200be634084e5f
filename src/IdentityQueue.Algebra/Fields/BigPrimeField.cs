using System.Numerics;

namespace IdentityQueue.Algebra.Fields;

/// <summary>An element of <see cref="BigPrimeField"/>: the standard representative in [0, p). Immutable value type.</summary>
public readonly struct BigResidue : IEquatable<BigResidue>
{
    /// <summary>The residue as an integer in [0, p).</summary>
    public BigInteger Value { get; }

    internal BigResidue(BigInteger reduced) => Value = reduced;

    public bool Equals(BigResidue other) => Value == other.Value;
    public override bool Equals(object? obj) => obj is BigResidue r && Equals(r);
    public override int GetHashCode() => Value.GetHashCode();
    public static bool operator ==(BigResidue a, BigResidue b) => a.Value == b.Value;
    public static bool operator !=(BigResidue a, BigResidue b) => a.Value != b.Value;
    public override string ToString() => Value.ToString();
}

/// <summary>GF(p) for any prime p (including 2), with <see cref="BigInteger"/> arithmetic. Immutable and thread-safe.</summary>
public readonly struct BigPrimeField : IField<BigResidue>
{
    private readonly BigInteger _p;

    private BigPrimeField(BigInteger p) => _p = p;

    /// <summary>GF(p); throws <see cref="ArgumentException"/> unless p is prime.</summary>
    public static BigPrimeField Create(BigInteger p)
    {
        if (!Primality.IsPrime(p)) throw new ArgumentException($"modulus {p} is not prime", nameof(p));
        return new BigPrimeField(p);
    }

    /// <summary>GF(p) for a prime p drawn uniformly from the primes in [2^(bits-1), 2^bits); bits ≥ 2.</summary>
    public static BigPrimeField CreateRandom(int bits, ref Xoshiro256 random)
    {
        if (bits < 2) throw new ArgumentOutOfRangeException(nameof(bits), bits, "a prime needs at least 2 bits");
        // Both 2 and 3 are prime, so for 2 bits a uniform candidate is a uniform prime.
        return new BigPrimeField(bits == 2 ? 2 + random.NextBelow(2UL) : Primality.RandomPrime(bits, ref random));
    }

    public BigInteger Modulus => _p;

    public BigResidue Zero => default;
    public BigResidue One => new(BigInteger.One);

    public BigResidue Add(BigResidue a, BigResidue b)
    {
        var s = a.Value + b.Value;
        return new BigResidue(s >= _p ? s - _p : s);
    }

    public BigResidue Subtract(BigResidue a, BigResidue b)
    {
        var d = a.Value - b.Value;
        return new BigResidue(d.Sign < 0 ? d + _p : d);
    }

    public BigResidue Negate(BigResidue a) => new(a.Value.IsZero ? a.Value : _p - a.Value);

    public BigResidue Multiply(BigResidue a, BigResidue b) => new(a.Value * b.Value % _p);

    public BigResidue MultiplyAdd(BigResidue a, BigResidue b, BigResidue c) => new((a.Value * b.Value + c.Value) % _p);

    public bool IsZero(BigResidue a) => a.Value.IsZero;
    public bool AreEqual(BigResidue a, BigResidue b) => a.Value == b.Value;

    public bool TryInvert(BigResidue a, out BigResidue inverse)
    {
        if (a.Value.IsZero) { inverse = default; return false; }
        inverse = new BigResidue(ModularHelpers.InverseModulo(a.Value, _p));
        return true;
    }

    public BigResidue FromInteger(BigInteger value) => new(ModularHelpers.Reduce(value, _p));

    public BigResidue Sample(ref Xoshiro256 random) => new(random.NextBelow(_p));

    public BigInteger Characteristic => _p;
    public int ExtensionDegree => 1;
    public double SizeLog2 => BigInteger.Log(_p, 2);
    public BigInteger[] ToCoefficients(BigResidue a) => [a.Value];
    public BigResidue FromCoefficients(ReadOnlySpan<BigInteger> coefficients) =>
        new(ModularHelpers.SingleCoefficient(coefficients, _p));
    public BigInteger[]? DefiningPolynomial => null;

    public override string ToString() => $"GF({_p})";
}
