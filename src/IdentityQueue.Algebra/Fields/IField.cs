using System.Numerics;

namespace IdentityQueue.Algebra.Fields;

/// <summary>
/// A finite field (or Q, for exact checks) as a small struct holding its modulus and constants; elements are
/// value types of type <typeparamref name="T"/>. Generic code takes the field as a struct type parameter
/// (<c>where TField : struct, IField&lt;T&gt;</c>) so the JIT specialises and inlines each rung.
/// Implementations are immutable and thread-safe.
/// </summary>
public interface IField<T> : IElementLayout where T : struct
{
    T Zero { get; }
    T One { get; }

    T Add(T a, T b);
    T Subtract(T a, T b);
    T Negate(T a);
    T Multiply(T a, T b);

    /// <summary>a·b + c.</summary>
    T MultiplyAdd(T a, T b, T c);

    bool IsZero(T a);
    bool AreEqual(T a, T b);

    /// <summary>The multiplicative inverse; false when <paramref name="a"/> is zero.</summary>
    bool TryInvert(T a, out T inverse);

    /// <summary>The image of an integer (reduced into the prime subfield).</summary>
    T FromInteger(BigInteger value);

    /// <summary>A uniformly random element.</summary>
    T Sample(ref Xoshiro256 random);

    /// <summary>The characteristic p (0 for Q).</summary>
    BigInteger Characteristic { get; }

    /// <summary>m, where the field is GF(p^m); 1 for prime fields.</summary>
    int ExtensionDegree { get; }

    /// <summary>log2 of the number of elements.</summary>
    double SizeLog2 { get; }

    /// <summary>
    /// The element's coordinates over the prime subfield, lowest power first, as integers in [0, p)
    /// (length <see cref="ExtensionDegree"/>). For a prime field, the single residue.
    /// </summary>
    BigInteger[] ToCoefficients(T a);

    /// <summary>The inverse of <see cref="ToCoefficients"/> (used to re-check stored witnesses).</summary>
    T FromCoefficients(ReadOnlySpan<BigInteger> coefficients);

    /// <summary>The defining polynomial's coefficients over GF(p), lowest first, monic (null for prime fields).</summary>
    BigInteger[]? DefiningPolynomial { get; }
}
