using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;

namespace IdentityQueue.Algebra.Evaluate;

/// <summary>
/// Element-wise kernels on the raw Montgomery representatives of <see cref="Fields.PrimeField31"/> (R = 2^32, values in
/// [0, p), p &lt; 2^31). The vector kernels multiply the even and the odd 32-bit lanes separately with the unsigned
/// 32×32→64-bit multiply (<c>vpmuludq</c>), run Montgomery reduction in subtractive form on both halves (the low words of
/// t and m·p cancel, so a 64-bit subtraction leaves hi(t) − hi(m·p) in the high word), and merge the halves with a shift
/// and an or; each 32-bit lane may have its own modulus (the odd lanes' moduli are shifted down for <c>vpmuludq</c>,
/// which reads the even lanes); corrections use the unsigned minimum: for x in [0, 2p), min(x, x − p) is x mod p.
/// The block evaluator runs them through the kernel structs of <see cref="Montgomery31Kernels"/>. Stateless.
/// </summary>
internal static class Lanes31
{
    /// <summary>The widest kernel this CPU runs.</summary>
    public static LaneKernel Best => Avx512F.IsSupported ? LaneKernel.Avx512 : Avx2.IsSupported ? LaneKernel.Avx2 : LaneKernel.Scalar;

    /// <summary><paramref name="requested"/> if this CPU supports it, else the best supported kernel below it.</summary>
    public static LaneKernel Supported(LaneKernel requested) =>
        requested == LaneKernel.Avx512 && !Avx512F.IsSupported ? Supported(LaneKernel.Avx2)
        : requested == LaneKernel.Avx2 && !Avx2.IsSupported ? LaneKernel.Scalar
        : requested;

    // ---- scalar ----

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static uint Multiply(uint a, uint b, uint p, uint pInverse)
    {
        unchecked
        {
            var t = (ulong)a * b;
            var m = (uint)t * pInverse;
            var d = (uint)(t >> 32) - (uint)(((ulong)m * p) >> 32);
            return d + (p & (uint)((int)d >> 31));
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static uint AddMod(uint a, uint b, uint p)
    {
        unchecked
        {
            var d = a + b - p;
            return d + (p & (uint)((int)d >> 31));
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static uint SubMod(uint a, uint b, uint p)
    {
        unchecked
        {
            var d = a - b;
            return d + (p & (uint)((int)d >> 31));
        }
    }

    // ---- AVX-512 ----

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static Vector512<uint> Multiply(Vector512<uint> a, Vector512<uint> b, Vector512<uint> p, Vector512<uint> pInverse)
    {
        var tEven = Avx512F.Multiply(a, b);
        var tOdd = Avx512F.Multiply(Avx512F.ShiftRightLogical(a.AsUInt64(), 32).AsUInt32(), Avx512F.ShiftRightLogical(b.AsUInt64(), 32).AsUInt32());
        var mpEven = Avx512F.Multiply(Avx512F.Multiply(tEven.AsUInt32(), pInverse).AsUInt32(), p);
        // the odd lanes' own modulus (each lane may have its own): vpmuludq reads the even 32-bit lanes
        var pOdd = Avx512F.ShiftRightLogical(p.AsUInt64(), 32).AsUInt32();
        var qOdd = Avx512F.ShiftRightLogical(pInverse.AsUInt64(), 32).AsUInt32();
        var mpOdd = Avx512F.Multiply(Avx512F.Multiply(tOdd.AsUInt32(), qOdd).AsUInt32(), pOdd);
        var d = Avx512F.Or(Avx512F.ShiftRightLogical(Avx512F.Subtract(tEven, mpEven), 32), Avx512F.Subtract(tOdd, mpOdd)).AsUInt32();
        return Avx512F.Min(d, Avx512F.Add(d, p));
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static Vector512<uint> AddMod(Vector512<uint> a, Vector512<uint> b, Vector512<uint> p)
    {
        var s = Avx512F.Add(a, b);
        return Avx512F.Min(s, Avx512F.Subtract(s, p));
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static Vector512<uint> SubMod(Vector512<uint> a, Vector512<uint> b, Vector512<uint> p)
    {
        var d = Avx512F.Subtract(a, b);
        return Avx512F.Min(d, Avx512F.Add(d, p));
    }

    // ---- AVX2 ----

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static Vector256<uint> Multiply(Vector256<uint> a, Vector256<uint> b, Vector256<uint> p, Vector256<uint> pInverse)
    {
        var tEven = Avx2.Multiply(a, b);
        var tOdd = Avx2.Multiply(Avx2.ShiftRightLogical(a.AsUInt64(), 32).AsUInt32(), Avx2.ShiftRightLogical(b.AsUInt64(), 32).AsUInt32());
        var mpEven = Avx2.Multiply(Avx2.Multiply(tEven.AsUInt32(), pInverse).AsUInt32(), p);
        // the odd lanes' own modulus (each lane may have its own): vpmuludq reads the even 32-bit lanes
        var pOdd = Avx2.ShiftRightLogical(p.AsUInt64(), 32).AsUInt32();
        var qOdd = Avx2.ShiftRightLogical(pInverse.AsUInt64(), 32).AsUInt32();
        var mpOdd = Avx2.Multiply(Avx2.Multiply(tOdd.AsUInt32(), qOdd).AsUInt32(), pOdd);
        var d = Avx2.Or(Avx2.ShiftRightLogical(Avx2.Subtract(tEven, mpEven), 32), Avx2.Subtract(tOdd, mpOdd)).AsUInt32();
        return Avx2.Min(d, Avx2.Add(d, p));
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static Vector256<uint> AddMod(Vector256<uint> a, Vector256<uint> b, Vector256<uint> p)
    {
        var s = Avx2.Add(a, b);
        return Avx2.Min(s, Avx2.Subtract(s, p));
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static Vector256<uint> SubMod(Vector256<uint> a, Vector256<uint> b, Vector256<uint> p)
    {
        var d = Avx2.Subtract(a, b);
        return Avx2.Min(d, Avx2.Add(d, p));
    }
}
