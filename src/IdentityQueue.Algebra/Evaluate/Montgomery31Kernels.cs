using System.Diagnostics;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Evaluate;

/// <summary>
/// The lane kernels of the 31-bit rung (<see cref="PrimeField31"/>, raw Montgomery representatives as <see cref="uint"/>):
/// 16 lanes per AVX-512 vector, 8 per AVX2 vector, or one. The arithmetic is <see cref="Lanes31"/>'s.
/// </summary>
internal static class Montgomery31Kernels
{
    /// <summary>p and p^-1 mod 2^32 of each lane's field (fields of type <see cref="PrimeField31"/>, by their layout).</summary>
    internal static void Moduli<TField>(ReadOnlySpan<TField> lanes, Span<uint> p, Span<uint> pInverse) where TField : struct, IElementLayout
    {
        Debug.Assert(TField.Layout == ElementLayout.Montgomery31);
        var fields = MemoryMarshal.Cast<TField, PrimeField31>(lanes);
        for (var i = 0; i < fields.Length; i++) (p[i], pInverse[i]) = (fields[i].Modulus, fields[i].ModulusInverse);
    }

    internal static uint ModulusOf<TField>(TField field) where TField : struct, IElementLayout
    {
        Debug.Assert(TField.Layout == ElementLayout.Montgomery31);
        return Unsafe.As<TField, PrimeField31>(ref field).Modulus;
    }
}

/// <summary>16 lanes per AVX-512F vector.</summary>
internal readonly struct Montgomery31x16<TField> : ILaneKernel<TField, Vector512<uint>, MontgomeryModulus<Vector512<uint>>>
    where TField : struct, IElementLayout
{
    public static int Width => Vector512<uint>.Count;
    public static string Description => "31-bit Montgomery, AVX-512F (16 lanes per instruction)";

    public static MontgomeryModulus<Vector512<uint>> Modulus(ReadOnlySpan<TField> lanes)
    {
        Span<uint> p = stackalloc uint[Vector512<uint>.Count], q = stackalloc uint[Vector512<uint>.Count];
        Montgomery31Kernels.Moduli(lanes, p, q);
        return new(Vector512.Create<uint>(p), Vector512.Create<uint>(q));
    }

    public static bool SameField(TField a, TField b) => Montgomery31Kernels.ModulusOf(a) == Montgomery31Kernels.ModulusOf(b);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Vector512<uint> Add(Vector512<uint> a, Vector512<uint> b, in MontgomeryModulus<Vector512<uint>> m) => Lanes31.AddMod(a, b, m.P);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Vector512<uint> Subtract(Vector512<uint> a, Vector512<uint> b, in MontgomeryModulus<Vector512<uint>> m) => Lanes31.SubMod(a, b, m.P);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Vector512<uint> Negate(Vector512<uint> a, in MontgomeryModulus<Vector512<uint>> m) => Lanes31.SubMod(Vector512<uint>.Zero, a, m.P);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Vector512<uint> Multiply(Vector512<uint> a, Vector512<uint> b, in MontgomeryModulus<Vector512<uint>> m) =>
        Lanes31.Multiply(a, b, m.P, m.PInverse);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Vector512<uint> MultiplyAdd(Vector512<uint> a, Vector512<uint> b, Vector512<uint> c, in MontgomeryModulus<Vector512<uint>> m) =>
        Lanes31.AddMod(Lanes31.Multiply(a, b, m.P, m.PInverse), c, m.P);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Vector512<uint> MultiplySubtract(Vector512<uint> a, Vector512<uint> b, Vector512<uint> c, in MontgomeryModulus<Vector512<uint>> m) =>
        Lanes31.SubMod(Lanes31.Multiply(a, b, m.P, m.PInverse), c, m.P);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Vector512<uint> NegativeMultiplyAdd(Vector512<uint> a, Vector512<uint> b, Vector512<uint> c, in MontgomeryModulus<Vector512<uint>> m) =>
        Lanes31.SubMod(c, Lanes31.Multiply(a, b, m.P, m.PInverse), m.P);
}

/// <summary>8 lanes per AVX2 vector.</summary>
internal readonly struct Montgomery31x8<TField> : ILaneKernel<TField, Vector256<uint>, MontgomeryModulus<Vector256<uint>>>
    where TField : struct, IElementLayout
{
    public static int Width => Vector256<uint>.Count;
    public static string Description => "31-bit Montgomery, AVX2 (8 lanes per instruction)";

    public static MontgomeryModulus<Vector256<uint>> Modulus(ReadOnlySpan<TField> lanes)
    {
        Span<uint> p = stackalloc uint[Vector256<uint>.Count], q = stackalloc uint[Vector256<uint>.Count];
        Montgomery31Kernels.Moduli(lanes, p, q);
        return new(Vector256.Create<uint>(p), Vector256.Create<uint>(q));
    }

    public static bool SameField(TField a, TField b) => Montgomery31Kernels.ModulusOf(a) == Montgomery31Kernels.ModulusOf(b);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Vector256<uint> Add(Vector256<uint> a, Vector256<uint> b, in MontgomeryModulus<Vector256<uint>> m) => Lanes31.AddMod(a, b, m.P);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Vector256<uint> Subtract(Vector256<uint> a, Vector256<uint> b, in MontgomeryModulus<Vector256<uint>> m) => Lanes31.SubMod(a, b, m.P);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Vector256<uint> Negate(Vector256<uint> a, in MontgomeryModulus<Vector256<uint>> m) => Lanes31.SubMod(Vector256<uint>.Zero, a, m.P);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Vector256<uint> Multiply(Vector256<uint> a, Vector256<uint> b, in MontgomeryModulus<Vector256<uint>> m) =>
        Lanes31.Multiply(a, b, m.P, m.PInverse);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Vector256<uint> MultiplyAdd(Vector256<uint> a, Vector256<uint> b, Vector256<uint> c, in MontgomeryModulus<Vector256<uint>> m) =>
        Lanes31.AddMod(Lanes31.Multiply(a, b, m.P, m.PInverse), c, m.P);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Vector256<uint> MultiplySubtract(Vector256<uint> a, Vector256<uint> b, Vector256<uint> c, in MontgomeryModulus<Vector256<uint>> m) =>
        Lanes31.SubMod(Lanes31.Multiply(a, b, m.P, m.PInverse), c, m.P);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Vector256<uint> NegativeMultiplyAdd(Vector256<uint> a, Vector256<uint> b, Vector256<uint> c, in MontgomeryModulus<Vector256<uint>> m) =>
        Lanes31.SubMod(c, Lanes31.Multiply(a, b, m.P, m.PInverse), m.P);
}

/// <summary>One lane at a time (any CPU, and blocks that are not whole vectors).</summary>
internal readonly struct Montgomery31x1<TField> : ILaneKernel<TField, uint, MontgomeryModulus<uint>>
    where TField : struct, IElementLayout
{
    public static int Width => 1;
    public static string Description => "31-bit Montgomery, scalar lanes";

    public static MontgomeryModulus<uint> Modulus(ReadOnlySpan<TField> lanes)
    {
        Span<uint> p = stackalloc uint[1], q = stackalloc uint[1];
        Montgomery31Kernels.Moduli(lanes, p, q);
        return new(p[0], q[0]);
    }

    public static bool SameField(TField a, TField b) => Montgomery31Kernels.ModulusOf(a) == Montgomery31Kernels.ModulusOf(b);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static uint Add(uint a, uint b, in MontgomeryModulus<uint> m) => Lanes31.AddMod(a, b, m.P);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static uint Subtract(uint a, uint b, in MontgomeryModulus<uint> m) => Lanes31.SubMod(a, b, m.P);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static uint Negate(uint a, in MontgomeryModulus<uint> m) => Lanes31.SubMod(0, a, m.P);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static uint Multiply(uint a, uint b, in MontgomeryModulus<uint> m) => Lanes31.Multiply(a, b, m.P, m.PInverse);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static uint MultiplyAdd(uint a, uint b, uint c, in MontgomeryModulus<uint> m) => Lanes31.AddMod(Lanes31.Multiply(a, b, m.P, m.PInverse), c, m.P);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static uint MultiplySubtract(uint a, uint b, uint c, in MontgomeryModulus<uint> m) => Lanes31.SubMod(Lanes31.Multiply(a, b, m.P, m.PInverse), c, m.P);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static uint NegativeMultiplyAdd(uint a, uint b, uint c, in MontgomeryModulus<uint> m) => Lanes31.SubMod(c, Lanes31.Multiply(a, b, m.P, m.PInverse), m.P);
}
