using System.Numerics;
using IdentityQueue.Algebra.Exact;

namespace IdentityQueue.Algebra.Fields;

/// <summary>
/// The rational numbers Q with exact <see cref="Rational"/> arithmetic, for certifying refutations found over
/// finite fields. Stateless, immutable and thread-safe; <c>default</c> is a valid instance.
/// </summary>
public readonly struct RationalField : IField<Rational>
{
    public static RationalField Instance => default;

    public Rational Zero => Rational.Zero;
    public Rational One => Rational.One;

    public Rational Add(Rational a, Rational b) => a + b;
    public Rational Subtract(Rational a, Rational b) => a - b;
    public Rational Negate(Rational a) => -a;
    public Rational Multiply(Rational a, Rational b) => a * b;
    public Rational MultiplyAdd(Rational a, Rational b, Rational c) => a * b + c;

    public bool IsZero(Rational a) => a.IsZero;
    public bool AreEqual(Rational a, Rational b) => a == b;

    public bool TryInvert(Rational a, out Rational inverse)
    {
        if (a.IsZero) { inverse = Rational.Zero; return false; }
        inverse = Rational.One / a;
        return true;
    }

    public Rational FromInteger(BigInteger value) => new(value);

    /// <summary>A uniformly random integer in [0, 2^32).</summary>
    public Rational Sample(ref Xoshiro256 random) => new(random.NextUInt64() >> 32);

    public BigInteger Characteristic => BigInteger.Zero;
    public int ExtensionDegree => 1;
    public double SizeLog2 => double.PositiveInfinity;

    /// <summary>[a] for an integer a; throws <see cref="InvalidOperationException"/> for a non-integer.</summary>
    public BigInteger[] ToCoefficients(Rational a) =>
        a.IsInteger ? [a.Numerator] : throw new InvalidOperationException($"{a} is not an integer, so it has no integer coordinate");

    public Rational FromCoefficients(ReadOnlySpan<BigInteger> coefficients)
    {
        if (coefficients.Length != 1)
            throw new ArgumentException($"a rational has exactly one coefficient, got {coefficients.Length}", nameof(coefficients));
        return new Rational(coefficients[0]);
    }

    public BigInteger[]? DefiningPolynomial => null;

    public override string ToString() => "Q";
}
