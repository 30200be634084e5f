using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;

namespace IdentityQueue.Algebra.Evaluate;

/// <summary>
/// Element-wise kernels on the raw Montgomery representatives of <see cref="Fields.PrimeField31"/> (R = 2^32, values in
/// [0, p), p &lt; 2^31). The vector kernels multiply the even and the odd 32-bit lanes separately with the unsigned
/// 32×32→64-bit multiply (<c>vpmuludq</c>), run Montgomery reduction in subtractive form on both halves (the low words of
/// t and m·p cancel, so a 64-bit subtraction leaves hi(t) − hi(m·p) in the high word), and merge the halves with a shift
/// and an or; each 32-bit lane may have its own modulus (the odd lanes' moduli are shifted down for <c>vpmuludq</c>,
/// which reads the even lanes); corrections use the unsigned minimum: for x in [0, 2p), min(x, x − p) is x mod p. The destination may be one
/// of the sources. Stateless.
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
    private static uint AddMod(uint a, uint b, uint p)
    {
        unchecked
        {
            var d = a + b - p;
            return d + (p & (uint)((int)d >> 31));
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static uint SubMod(uint a, uint b, uint p)
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

    // ---- kernels: the vector part, then a scalar tail ----

    public static void Add(LaneKernel kernel, ReadOnlySpan<uint> a, ReadOnlySpan<uint> b, Span<uint> d, ReadOnlySpan<uint> p)
    {
        var done = 0;
        if (kernel == LaneKernel.Avx512 && Avx512F.IsSupported)
        {
            var vp = V512(p, d.Length);
            var va = V512(a, d.Length);
            var vb = V512(b, d.Length);
            var vd = V512(d);
            for (var i = 0; i < vd.Length; i++) vd[i] = AddMod(va[i], vb[i], vp[i]);
            done = vd.Length * Vector512<uint>.Count;
        }
        else if (kernel == LaneKernel.Avx2 && Avx2.IsSupported)
        {
            var vp = V256(p, d.Length);
            var va = V256(a, d.Length);
            var vb = V256(b, d.Length);
            var vd = V256(d);
            for (var i = 0; i < vd.Length; i++) vd[i] = AddMod(va[i], vb[i], vp[i]);
            done = vd.Length * Vector256<uint>.Count;
        }
        for (var i = done; i < d.Length; i++) d[i] = AddMod(a[i], b[i], p[i]);
    }

    public static void Subtract(LaneKernel kernel, ReadOnlySpan<uint> a, ReadOnlySpan<uint> b, Span<uint> d, ReadOnlySpan<uint> p)
    {
        var done = 0;
        if (kernel == LaneKernel.Avx512 && Avx512F.IsSupported)
        {
            var vp = V512(p, d.Length);
            var va = V512(a, d.Length);
            var vb = V512(b, d.Length);
            var vd = V512(d);
            for (var i = 0; i < vd.Length; i++) vd[i] = SubMod(va[i], vb[i], vp[i]);
            done = vd.Length * Vector512<uint>.Count;
        }
        else if (kernel == LaneKernel.Avx2 && Avx2.IsSupported)
        {
            var vp = V256(p, d.Length);
            var va = V256(a, d.Length);
            var vb = V256(b, d.Length);
            var vd = V256(d);
            for (var i = 0; i < vd.Length; i++) vd[i] = SubMod(va[i], vb[i], vp[i]);
            done = vd.Length * Vector256<uint>.Count;
        }
        for (var i = done; i < d.Length; i++) d[i] = SubMod(a[i], b[i], p[i]);
    }

    public static void Negate(LaneKernel kernel, ReadOnlySpan<uint> a, Span<uint> d, ReadOnlySpan<uint> p)
    {
        var done = 0;
        if (kernel == LaneKernel.Avx512 && Avx512F.IsSupported)
        {
            var vp = V512(p, d.Length);
            var va = V512(a, d.Length);
            var vd = V512(d);
            for (var i = 0; i < vd.Length; i++) vd[i] = SubMod(Vector512<uint>.Zero, va[i], vp[i]);
            done = vd.Length * Vector512<uint>.Count;
        }
        else if (kernel == LaneKernel.Avx2 && Avx2.IsSupported)
        {
            var vp = V256(p, d.Length);
            var va = V256(a, d.Length);
            var vd = V256(d);
            for (var i = 0; i < vd.Length; i++) vd[i] = SubMod(Vector256<uint>.Zero, va[i], vp[i]);
            done = vd.Length * Vector256<uint>.Count;
        }
        for (var i = done; i < d.Length; i++) d[i] = SubMod(0, a[i], p[i]);
    }

    public static void Multiply(LaneKernel kernel, ReadOnlySpan<uint> a, ReadOnlySpan<uint> b, Span<uint> d, ReadOnlySpan<uint> p, ReadOnlySpan<uint> pInverse)
    {
        var done = 0;
        if (kernel == LaneKernel.Avx512 && Avx512F.IsSupported)
        {
            var vp = V512(p, d.Length);
            var vq = V512(pInverse, d.Length);
            var va = V512(a, d.Length);
            var vb = V512(b, d.Length);
            var vd = V512(d);
            for (var i = 0; i < vd.Length; i++) vd[i] = Multiply(va[i], vb[i], vp[i], vq[i]);
            done = vd.Length * Vector512<uint>.Count;
        }
        else if (kernel == LaneKernel.Avx2 && Avx2.IsSupported)
        {
            var vp = V256(p, d.Length);
            var vq = V256(pInverse, d.Length);
            var va = V256(a, d.Length);
            var vb = V256(b, d.Length);
            var vd = V256(d);
            for (var i = 0; i < vd.Length; i++) vd[i] = Multiply(va[i], vb[i], vp[i], vq[i]);
            done = vd.Length * Vector256<uint>.Count;
        }
        for (var i = done; i < d.Length; i++) d[i] = Multiply(a[i], b[i], p[i], pInverse[i]);
    }

    /// <summary>d ← a·b + c.</summary>
    public static void MultiplyAdd(LaneKernel kernel, ReadOnlySpan<uint> a, ReadOnlySpan<uint> b, ReadOnlySpan<uint> c, Span<uint> d, ReadOnlySpan<uint> p, ReadOnlySpan<uint> pInverse)
    {
        var done = 0;
        if (kernel == LaneKernel.Avx512 && Avx512F.IsSupported)
        {
            var vp = V512(p, d.Length);
            var vq = V512(pInverse, d.Length);
            var va = V512(a, d.Length);
            var vb = V512(b, d.Length);
            var vc = V512(c, d.Length);
            var vd = V512(d);
            for (var i = 0; i < vd.Length; i++) vd[i] = AddMod(Multiply(va[i], vb[i], vp[i], vq[i]), vc[i], vp[i]);
            done = vd.Length * Vector512<uint>.Count;
        }
        else if (kernel == LaneKernel.Avx2 && Avx2.IsSupported)
        {
            var vp = V256(p, d.Length);
            var vq = V256(pInverse, d.Length);
            var va = V256(a, d.Length);
            var vb = V256(b, d.Length);
            var vc = V256(c, d.Length);
            var vd = V256(d);
            for (var i = 0; i < vd.Length; i++) vd[i] = AddMod(Multiply(va[i], vb[i], vp[i], vq[i]), vc[i], vp[i]);
            done = vd.Length * Vector256<uint>.Count;
        }
        for (var i = done; i < d.Length; i++) d[i] = AddMod(Multiply(a[i], b[i], p[i], pInverse[i]), c[i], p[i]);
    }

    /// <summary>d ← a·b − c.</summary>
    public static void MultiplySubtract(LaneKernel kernel, ReadOnlySpan<uint> a, ReadOnlySpan<uint> b, ReadOnlySpan<uint> c, Span<uint> d, ReadOnlySpan<uint> p, ReadOnlySpan<uint> pInverse)
    {
        var done = 0;
        if (kernel == LaneKernel.Avx512 && Avx512F.IsSupported)
        {
            var vp = V512(p, d.Length);
            var vq = V512(pInverse, d.Length);
            var va = V512(a, d.Length);
            var vb = V512(b, d.Length);
            var vc = V512(c, d.Length);
            var vd = V512(d);
            for (var i = 0; i < vd.Length; i++) vd[i] = SubMod(Multiply(va[i], vb[i], vp[i], vq[i]), vc[i], vp[i]);
            done = vd.Length * Vector512<uint>.Count;
        }
        else if (kernel == LaneKernel.Avx2 && Avx2.IsSupported)
        {
            var vp = V256(p, d.Length);
            var vq = V256(pInverse, d.Length);
            var va = V256(a, d.Length);
            var vb = V256(b, d.Length);
            var vc = V256(c, d.Length);
            var vd = V256(d);
            for (var i = 0; i < vd.Length; i++) vd[i] = SubMod(Multiply(va[i], vb[i], vp[i], vq[i]), vc[i], vp[i]);
            done = vd.Length * Vector256<uint>.Count;
        }
        for (var i = done; i < d.Length; i++) d[i] = SubMod(Multiply(a[i], b[i], p[i], pInverse[i]), c[i], p[i]);
    }

    /// <summary>d ← c − a·b.</summary>
    public static void NegativeMultiplyAdd(LaneKernel kernel, ReadOnlySpan<uint> a, ReadOnlySpan<uint> b, ReadOnlySpan<uint> c, Span<uint> d, ReadOnlySpan<uint> p, ReadOnlySpan<uint> pInverse)
    {
        var done = 0;
        if (kernel == LaneKernel.Avx512 && Avx512F.IsSupported)
        {
            var vp = V512(p, d.Length);
            var vq = V512(pInverse, d.Length);
            var va = V512(a, d.Length);
            var vb = V512(b, d.Length);
            var vc = V512(c, d.Length);
            var vd = V512(d);
            for (var i = 0; i < vd.Length; i++) vd[i] = SubMod(vc[i], Multiply(va[i], vb[i], vp[i], vq[i]), vp[i]);
            done = vd.Length * Vector512<uint>.Count;
        }
        else if (kernel == LaneKernel.Avx2 && Avx2.IsSupported)
        {
            var vp = V256(p, d.Length);
            var vq = V256(pInverse, d.Length);
            var va = V256(a, d.Length);
            var vb = V256(b, d.Length);
            var vc = V256(c, d.Length);
            var vd = V256(d);
            for (var i = 0; i < vd.Length; i++) vd[i] = SubMod(vc[i], Multiply(va[i], vb[i], vp[i], vq[i]), vp[i]);
            done = vd.Length * Vector256<uint>.Count;
        }
        for (var i = done; i < d.Length; i++) d[i] = SubMod(c[i], Multiply(a[i], b[i], p[i], pInverse[i]), p[i]);
    }

    /// <summary>The whole vectors of the first <paramref name="length"/> lanes (a reinterpretation, no copy).</summary>
    private static ReadOnlySpan<Vector512<uint>> V512(ReadOnlySpan<uint> s, int length) =>
        MemoryMarshal.Cast<uint, Vector512<uint>>(s[..(length - length % Vector512<uint>.Count)]);

    private static Span<Vector512<uint>> V512(Span<uint> s) =>
        MemoryMarshal.Cast<uint, Vector512<uint>>(s[..(s.Length - s.Length % Vector512<uint>.Count)]);

    private static ReadOnlySpan<Vector256<uint>> V256(ReadOnlySpan<uint> s, int length) =>
        MemoryMarshal.Cast<uint, Vector256<uint>>(s[..(length - length % Vector256<uint>.Count)]);

    private static Span<Vector256<uint>> V256(Span<uint> s) =>
        MemoryMarshal.Cast<uint, Vector256<uint>>(s[..(s.Length - s.Length % Vector256<uint>.Count)]);
}
