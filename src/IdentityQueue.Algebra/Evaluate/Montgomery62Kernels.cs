using System.Diagnostics;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Evaluate;

/// <summary>
/// The lane kernels of the 62-bit rung (<see cref="PrimeField62"/>, raw Montgomery representatives as <see cref="ulong"/>):
/// 8 lanes per AVX-512F/DQ vector, or one. The arithmetic is <see cref="Lanes62"/>'s.
/// </summary>
internal static class Montgomery62Kernels
{
    /// <summary>p and p^-1 mod 2^64 of each lane's field (fields of type <see cref="PrimeField62"/>, by their layout).</summary>
    internal static void Moduli<TField>(ReadOnlySpan<TField> lanes, Span<ulong> p, Span<ulong> pInverse) where TField : struct, IElementLayout
    {
        Debug.Assert(TField.Layout == ElementLayout.Montgomery62);
        var fields = MemoryMarshal.Cast<TField, PrimeField62>(lanes);
        for (var i = 0; i < fields.Length; i++) (p[i], pInverse[i]) = (fields[i].Modulus, fields[i].ModulusInverse);
    }

    internal static ulong ModulusOf<TField>(TField field) where TField : struct, IElementLayout
    {
        Debug.Assert(TField.Layout == ElementLayout.Montgomery62);
        return Unsafe.As<TField, PrimeField62>(ref field).Modulus;
    }
}

/// <summary>The modulus of 8 lanes for the AVX-512 kernel: p, its high halves (for the 32×32-bit partial products) and p^-1.</summary>
internal readonly struct Montgomery62Modulus8(Vector512<ulong> p, Vector512<ulong> pInverse)
{
    public readonly Vector512<ulong> P = p;
    public readonly Vector512<ulong> PHigh = Vector512.ShiftRightLogical(p, 32);
    public readonly Vector512<ulong> PInverse = pInverse;
}

/// <summary>8 lanes per AVX-512F/DQ vector.</summary>
internal readonly struct Montgomery62x8<TField> : ILaneKernel<TField, Vector512<ulong>, Montgomery62Modulus8>
    where TField : struct, IElementLayout
{
    public static int Width => Vector512<ulong>.Count;
    public static string Description => "62-bit Montgomery, AVX-512F/DQ (8 lanes per instruction)";

    public static Montgomery62Modulus8 Modulus(ReadOnlySpan<TField> lanes)
    {
        Span<ulong> p = stackalloc ulong[Vector512<ulong>.Count], q = stackalloc ulong[Vector512<ulong>.Count];
        Montgomery62Kernels.Moduli(lanes, p, q);
        return new(Vector512.Create<ulong>(p), Vector512.Create<ulong>(q));
    }

    public static bool SameField(TField a, TField b) => Montgomery62Kernels.ModulusOf(a) == Montgomery62Kernels.ModulusOf(b);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Vector512<ulong> Add(Vector512<ulong> a, Vector512<ulong> b, in Montgomery62Modulus8 m) => Lanes62.AddMod(a, b, m.P);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Vector512<ulong> Subtract(Vector512<ulong> a, Vector512<ulong> b, in Montgomery62Modulus8 m) => Lanes62.SubMod(a, b, m.P);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Vector512<ulong> Negate(Vector512<ulong> a, in Montgomery62Modulus8 m) => Lanes62.SubMod(Vector512<ulong>.Zero, a, m.P);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Vector512<ulong> Multiply(Vector512<ulong> a, Vector512<ulong> b, in Montgomery62Modulus8 m) =>
        Lanes62.Multiply(a, b, m.P, m.PHigh, m.PInverse);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Vector512<ulong> MultiplyAdd(Vector512<ulong> a, Vector512<ulong> b, Vector512<ulong> c, in Montgomery62Modulus8 m) =>
        Lanes62.AddMod(Lanes62.Multiply(a, b, m.P, m.PHigh, m.PInverse), c, m.P);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Vector512<ulong> MultiplySubtract(Vector512<ulong> a, Vector512<ulong> b, Vector512<ulong> c, in Montgomery62Modulus8 m) =>
        Lanes62.SubMod(Lanes62.Multiply(a, b, m.P, m.PHigh, m.PInverse), c, m.P);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Vector512<ulong> NegativeMultiplyAdd(Vector512<ulong> a, Vector512<ulong> b, Vector512<ulong> c, in Montgomery62Modulus8 m) =>
        Lanes62.SubMod(c, Lanes62.Multiply(a, b, m.P, m.PHigh, m.PInverse), m.P);
}

/// <summary>One lane at a time (any CPU, and blocks that are not whole vectors).</summary>
internal readonly struct Montgomery62x1<TField> : ILaneKernel<TField, ulong, MontgomeryModulus<ulong>>
    where TField : struct, IElementLayout
{
    public static int Width => 1;
    public static string Description => "62-bit Montgomery, scalar lanes";

    public static MontgomeryModulus<ulong> Modulus(ReadOnlySpan<TField> lanes)
    {
        Span<ulong> p = stackalloc ulong[1], q = stackalloc ulong[1];
        Montgomery62Kernels.Moduli(lanes, p, q);
        return new(p[0], q[0]);
    }

    public static bool SameField(TField a, TField b) => Montgomery62Kernels.ModulusOf(a) == Montgomery62Kernels.ModulusOf(b);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static ulong Add(ulong a, ulong b, in MontgomeryModulus<ulong> m) => Lanes62.AddMod(a, b, m.P);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static ulong Subtract(ulong a, ulong b, in MontgomeryModulus<ulong> m) => Lanes62.SubMod(a, b, m.P);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static ulong Negate(ulong a, in MontgomeryModulus<ulong> m) => Lanes62.SubMod(0, a, m.P);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static ulong Multiply(ulong a, ulong b, in MontgomeryModulus<ulong> m) => Lanes62.Multiply(a, b, m.P, m.PInverse);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static ulong MultiplyAdd(ulong a, ulong b, ulong c, in MontgomeryModulus<ulong> m) => Lanes62.AddMod(Lanes62.Multiply(a, b, m.P, m.PInverse), c, m.P);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static ulong MultiplySubtract(ulong a, ulong b, ulong c, in MontgomeryModulus<ulong> m) => Lanes62.SubMod(Lanes62.Multiply(a, b, m.P, m.PInverse), c, m.P);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static ulong NegativeMultiplyAdd(ulong a, ulong b, ulong c, in MontgomeryModulus<ulong> m) => Lanes62.SubMod(c, Lanes62.Multiply(a, b, m.P, m.PInverse), m.P);
}
