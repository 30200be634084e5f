using System.Runtime.CompilerServices;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Evaluate;

/// <summary>The kernel for any field: one lane per step, through the lane's own field (the modulus is the field itself).</summary>
internal readonly struct FieldLaneKernel<TField, T> : ILaneKernel<TField, T, TField> where TField : struct, IField<T> where T : struct
{
    public static int Width => 1;
    public static string Description => $"generic ({default(TField).GetType().Name})";
    public static TField Modulus(ReadOnlySpan<TField> lanes) => lanes[0];
    public static bool SameField(TField a, TField b) => EqualityComparer<TField>.Default.Equals(a, b);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static T Add(T a, T b, in TField m) => m.Add(a, b);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static T Subtract(T a, T b, in TField m) => m.Subtract(a, b);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static T Negate(T a, in TField m) => m.Negate(a);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static T Multiply(T a, T b, in TField m) => m.Multiply(a, b);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static T MultiplyAdd(T a, T b, T c, in TField m) => m.MultiplyAdd(a, b, c);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static T MultiplySubtract(T a, T b, T c, in TField m) => m.Subtract(m.Multiply(a, b), c);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static T NegativeMultiplyAdd(T a, T b, T c, in TField m) => m.Subtract(c, m.Multiply(a, b));
}
