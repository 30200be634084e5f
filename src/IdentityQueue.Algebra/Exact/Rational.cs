using System.Numerics;

namespace IdentityQueue.Algebra.Exact;

/// <summary>An exact rational number in lowest terms with a positive denominator. Immutable value type.</summary>
public readonly struct Rational : IEquatable<Rational>, IComparable<Rational>
{
    private readonly BigInteger _denominatorMinusOne; // so that default(Rational) is 0/1

    public BigInteger Numerator { get; }
    public BigInteger Denominator => _denominatorMinusOne + 1;

    public static readonly Rational Zero = new(BigInteger.Zero);
    public static readonly Rational One = new(BigInteger.One);

    public Rational(BigInteger value)
    {
        Numerator = value;
        _denominatorMinusOne = BigInteger.Zero;
    }

    private Rational(BigInteger numerator, BigInteger denominator, bool _)
    {
        Numerator = numerator;
        _denominatorMinusOne = denominator - 1;
    }

    /// <summary>numerator/denominator reduced to lowest terms; throws <see cref="DivideByZeroException"/> on a zero denominator.</summary>
    public static Rational Create(BigInteger numerator, BigInteger denominator)
    {
        if (denominator.IsZero) throw new DivideByZeroException("rational with zero denominator");
        if (denominator.Sign < 0) { numerator = -numerator; denominator = -denominator; }
        var g = BigInteger.GreatestCommonDivisor(numerator, denominator);
        if (!g.IsOne && !g.IsZero) { numerator /= g; denominator /= g; }
        return new Rational(numerator, denominator, true);
    }

    public bool IsZero => Numerator.IsZero;
    public bool IsInteger => _denominatorMinusOne.IsZero;
    public int Sign => Numerator.Sign;

    public static Rational operator +(Rational a, Rational b) =>
        a.IsInteger && b.IsInteger ? new Rational(a.Numerator + b.Numerator)
        : Create(a.Numerator * b.Denominator + b.Numerator * a.Denominator, a.Denominator * b.Denominator);

    public static Rational operator -(Rational a, Rational b) =>
        a.IsInteger && b.IsInteger ? new Rational(a.Numerator - b.Numerator)
        : Create(a.Numerator * b.Denominator - b.Numerator * a.Denominator, a.Denominator * b.Denominator);

    public static Rational operator -(Rational a) => new(-a.Numerator, a.Denominator, true);

    public static Rational operator *(Rational a, Rational b) =>
        a.IsInteger && b.IsInteger ? new Rational(a.Numerator * b.Numerator)
        : Create(a.Numerator * b.Numerator, a.Denominator * b.Denominator);

    public static Rational operator /(Rational a, Rational b) =>
        Create(a.Numerator * b.Denominator, a.Denominator * b.Numerator);

    public static implicit operator Rational(BigInteger value) => new(value);
    public static implicit operator Rational(long value) => new(value);

    /// <summary>a^e for a non-negative or negative integer exponent (negative inverts; throws on 0^negative).</summary>
    public static Rational Pow(Rational a, int exponent) =>
        exponent >= 0
            ? new Rational(BigInteger.Pow(a.Numerator, exponent), BigInteger.Pow(a.Denominator, exponent), true)
            : One / Pow(a, -exponent);

    public bool Equals(Rational other) => Numerator == other.Numerator && _denominatorMinusOne == other._denominatorMinusOne;
    public override bool Equals(object? obj) => obj is Rational r && Equals(r);
    public override int GetHashCode() => HashCode.Combine(Numerator, _denominatorMinusOne);
    public int CompareTo(Rational other) => (Numerator * other.Denominator).CompareTo(other.Numerator * Denominator);
    public static bool operator ==(Rational a, Rational b) => a.Equals(b);
    public static bool operator !=(Rational a, Rational b) => !a.Equals(b);
    public static bool operator <(Rational a, Rational b) => a.CompareTo(b) < 0;
    public static bool operator >(Rational a, Rational b) => a.CompareTo(b) > 0;
    public static bool operator <=(Rational a, Rational b) => a.CompareTo(b) <= 0;
    public static bool operator >=(Rational a, Rational b) => a.CompareTo(b) >= 0;

    public override string ToString() => IsInteger ? Numerator.ToString() : $"{Numerator}/{Denominator}";
}
