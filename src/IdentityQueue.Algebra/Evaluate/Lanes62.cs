using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics.X86;

namespace IdentityQueue.Algebra.Evaluate;

/// <summary>
/// Element-wise kernels on the raw Montgomery representatives of <see cref="Fields.PrimeField62"/> (R = 2^64, values in
/// [0, p), p &lt; 2^62): each lane is an independent chain, so consecutive lanes hide the latency of the multiplies.
/// Montgomery reduction in subtractive form (hi(a·b) − hi(m·p)) and branch-free corrections, as in the field itself.
/// The destination may be one of the sources (lane i is read before it is written). Stateless.
/// </summary>
internal static class Lanes62
{
    /// <summary>a·b·2^-64 mod p for a, b in [0, p).</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static ulong Multiply(ulong a, ulong b, ulong p, ulong pInverse)
    {
        unchecked
        {
            var d = High(a, b) - High(a * b * pInverse, p); // in (−p, p)
            return d + (p & (ulong)((long)d >> 63));
        }
    }

    /// <summary>
    /// The high word of a·b. <c>mulx</c> for the high word and a separate <c>imul</c> for the low word keep both in registers;
    /// the out parameter of <see cref="Math.BigMul(ulong, ulong, out ulong)"/> goes through the stack in a loop.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static ulong High(ulong a, ulong b) => Bmi2.X64.IsSupported ? Bmi2.X64.MultiplyNoFlags(a, b) : Math.BigMul(a, b, out _);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static ulong AddMod(ulong a, ulong b, ulong p)
    {
        unchecked
        {
            var d = a + b - p;
            return d + (p & (ulong)((long)d >> 63));
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static ulong SubMod(ulong a, ulong b, ulong p)
    {
        unchecked
        {
            var d = a - b;
            return d + (p & (ulong)((long)d >> 63));
        }
    }

    public static void Fill(Span<ulong> d, ulong value) => d.Fill(value);

    public static void Add(ReadOnlySpan<ulong> a, ReadOnlySpan<ulong> b, Span<ulong> d, ulong p)
    {
        a = a[..d.Length];
        b = b[..d.Length];
        unchecked
        {
            for (var i = 0; i < d.Length; i++) d[i] = AddMod(a[i], b[i], p);
        }
    }

    public static void Subtract(ReadOnlySpan<ulong> a, ReadOnlySpan<ulong> b, Span<ulong> d, ulong p)
    {
        a = a[..d.Length];
        b = b[..d.Length];
        unchecked
        {
            for (var i = 0; i < d.Length; i++) d[i] = SubMod(a[i], b[i], p);
        }
    }

    public static void Negate(ReadOnlySpan<ulong> a, Span<ulong> d, ulong p)
    {
        a = a[..d.Length];
        unchecked
        {
            for (var i = 0; i < d.Length; i++) d[i] = SubMod(0, a[i], p);
        }
    }

    public static void Multiply(ReadOnlySpan<ulong> a, ReadOnlySpan<ulong> b, Span<ulong> d, ulong p, ulong pInverse)
    {
        a = a[..d.Length];
        b = b[..d.Length];
        unchecked
        {
            for (var i = 0; i < d.Length; i++) d[i] = Multiply(a[i], b[i], p, pInverse);
        }
    }

    /// <summary>d ← a·b + c.</summary>
    public static void MultiplyAdd(ReadOnlySpan<ulong> a, ReadOnlySpan<ulong> b, ReadOnlySpan<ulong> c, Span<ulong> d, ulong p, ulong pInverse)
    {
        a = a[..d.Length];
        b = b[..d.Length];
        c = c[..d.Length];
        unchecked
        {
            for (var i = 0; i < d.Length; i++) d[i] = AddMod(Multiply(a[i], b[i], p, pInverse), c[i], p);
        }
    }

    /// <summary>d ← a·b − c.</summary>
    public static void MultiplySubtract(ReadOnlySpan<ulong> a, ReadOnlySpan<ulong> b, ReadOnlySpan<ulong> c, Span<ulong> d, ulong p, ulong pInverse)
    {
        a = a[..d.Length];
        b = b[..d.Length];
        c = c[..d.Length];
        unchecked
        {
            for (var i = 0; i < d.Length; i++) d[i] = SubMod(Multiply(a[i], b[i], p, pInverse), c[i], p);
        }
    }

    /// <summary>d ← c − a·b.</summary>
    public static void NegativeMultiplyAdd(ReadOnlySpan<ulong> a, ReadOnlySpan<ulong> b, ReadOnlySpan<ulong> c, Span<ulong> d, ulong p, ulong pInverse)
    {
        a = a[..d.Length];
        b = b[..d.Length];
        c = c[..d.Length];
        unchecked
        {
            for (var i = 0; i < d.Length; i++) d[i] = SubMod(c[i], Multiply(a[i], b[i], p, pInverse), p);
        }
    }
}
