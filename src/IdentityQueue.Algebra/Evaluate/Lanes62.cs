using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;

namespace IdentityQueue.Algebra.Evaluate;

/// <summary>
/// Element-wise kernels on the raw Montgomery representatives of <see cref="Fields.PrimeField62"/> (R = 2^64, values in
/// [0, p), p &lt; 2^62): each lane is an independent chain, so consecutive lanes hide the latency of the multiplies.
/// Montgomery reduction in subtractive form (hi(a·b) − hi(m·p)) and branch-free corrections, as in the field itself; the
/// AVX-512 kernels do the same on 8 lanes at once, with corrections by the unsigned minimum (for x in [0, 2p),
/// min(x, x − p) is x mod p).
/// The block evaluator runs them through the kernel structs of <see cref="Montgomery62Kernels"/>, with the modulus lane by
/// lane (each lane may be in its own field). Stateless.
/// </summary>
internal static class Lanes62
{
    /// <summary>The widest kernel this CPU runs on the 62-bit rung.</summary>
    public static LaneKernel Best => Avx512F.IsSupported && Avx512DQ.IsSupported ? LaneKernel.Avx512 : LaneKernel.Scalar;

    /// <summary><paramref name="requested"/> if this CPU runs it on the 62-bit rung, else scalar.</summary>
    public static LaneKernel Supported(LaneKernel requested) => requested == LaneKernel.Avx512 ? Best : LaneKernel.Scalar;

    // ---- AVX-512: 8 lanes of 64 bits; the 64×64→128-bit products from four 32×32→64-bit products (vpmuludq) ----

    /// <summary>
    /// The high words of x·y lane by lane, given y's high halves: x·y = hh·2^64 + (lh + hl)·2^32 + ll with 32-bit halves,
    /// and the carry into the high word is that of (ll's high half + lh's low half + hl's low half), which fits in 34 bits.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static Vector512<ulong> High(Vector512<ulong> x, Vector512<ulong> y, Vector512<ulong> yHigh)
    {
        var xHigh = Avx512F.ShiftRightLogical(x, 32);
        var ll = Avx512F.Multiply(x.AsUInt32(), y.AsUInt32());
        var lh = Avx512F.Multiply(x.AsUInt32(), yHigh.AsUInt32());
        var hl = Avx512F.Multiply(xHigh.AsUInt32(), y.AsUInt32());
        var hh = Avx512F.Multiply(xHigh.AsUInt32(), yHigh.AsUInt32());
        var low = Vector512.Create(0xFFFF_FFFFUL);
        var carry = Avx512F.ShiftRightLogical(
            Avx512F.Add(Avx512F.Add(Avx512F.ShiftRightLogical(ll, 32), Avx512F.And(lh, low)), Avx512F.And(hl, low)), 32);
        return Avx512F.Add(Avx512F.Add(hh, carry), Avx512F.Add(Avx512F.ShiftRightLogical(lh, 32), Avx512F.ShiftRightLogical(hl, 32)));
    }

    /// <summary>a·b·2^-64 mod p lane by lane (subtractive Montgomery; the low product and m with <c>vpmullq</c>).</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static Vector512<ulong> Multiply(Vector512<ulong> a, Vector512<ulong> b, Vector512<ulong> p, Vector512<ulong> pHigh, Vector512<ulong> pInverse)
    {
        var m = Avx512DQ.MultiplyLow(Avx512DQ.MultiplyLow(a, b), pInverse);
        var d = Avx512F.Subtract(High(a, b, Avx512F.ShiftRightLogical(b, 32)), High(m, p, pHigh));
        return Avx512F.Min(d, Avx512F.Add(d, p)); // d in (−p, p): the unsigned minimum picks d or d + p
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static Vector512<ulong> AddMod(Vector512<ulong> a, Vector512<ulong> b, Vector512<ulong> p)
    {
        var s = Avx512F.Add(a, b);
        return Avx512F.Min(s, Avx512F.Subtract(s, p));
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static Vector512<ulong> SubMod(Vector512<ulong> a, Vector512<ulong> b, Vector512<ulong> p)
    {
        var d = Avx512F.Subtract(a, b);
        return Avx512F.Min(d, Avx512F.Add(d, p));
    }

    // ---- scalar ----

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
    internal static ulong AddMod(ulong a, ulong b, ulong p)
    {
        unchecked
        {
            var d = a + b - p;
            return d + (p & (ulong)((long)d >> 63));
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static ulong SubMod(ulong a, ulong b, ulong p)
    {
        unchecked
        {
            var d = a - b;
            return d + (p & (ulong)((long)d >> 63));
        }
    }
}
