using System.Numerics;

namespace IdentityQueue.Algebra.Fields;

/// <summary>Generic helpers over any <see cref="IField{T}"/>: powers, inverses, quotients. Stateless and thread-safe.</summary>
public static class FieldMath
{
    /// <summary>a^e by left-to-right square-and-multiply; e ≥ 0, and a^0 = 1 (also for a = 0).</summary>
    public static T Pow<TField, T>(in TField field, T a, BigInteger e)
        where TField : struct, IField<T>
        where T : struct
    {
        if (e.Sign < 0) throw new ArgumentOutOfRangeException(nameof(e), e, "the exponent must be non-negative");
        if (e <= ulong.MaxValue) return Pow(field, a, (ulong)e);
        var f = field; // a local copy: calls on an 'in' type parameter would each copy the struct
        var bytes = e.ToByteArray(isUnsigned: true, isBigEndian: true);
        var result = f.One;
        foreach (var b in bytes)
        {
            for (var bit = 7; bit >= 0; bit--)
            {
                result = f.Multiply(result, result);
                if (((b >> bit) & 1) != 0) result = f.Multiply(result, a);
            }
        }
        return result;
    }

    /// <summary>a^e by left-to-right square-and-multiply; a^0 = 1 (also for a = 0).</summary>
    public static T Pow<TField, T>(in TField field, T a, ulong e)
        where TField : struct, IField<T>
        where T : struct
    {
        var f = field; // a local copy: calls on an 'in' type parameter would each copy the struct
        if (e == 0) return f.One;
        var result = a;
        for (var bit = 62 - BitOperations.LeadingZeroCount(e); bit >= 0; bit--)
        {
            result = f.Multiply(result, result);
            if (((e >> bit) & 1) != 0) result = f.Multiply(result, a);
        }
        return result;
    }

    /// <summary>The multiplicative inverse; false (and zero) when a is zero.</summary>
    public static bool Inverse<TField, T>(in TField field, T a, out T inverse)
        where TField : struct, IField<T>
        where T : struct =>
        field.TryInvert(a, out inverse);

    /// <summary>a / b; false (and zero) when b is zero.</summary>
    public static bool Divide<TField, T>(in TField field, T a, T b, out T quotient)
        where TField : struct, IField<T>
        where T : struct
    {
        if (!field.TryInvert(b, out var inverse)) { quotient = field.Zero; return false; }
        quotient = field.Multiply(a, inverse);
        return true;
    }
}
