using System.Buffers;
using System.Numerics;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Evaluate;

/// <summary>
/// The 62-bit Montgomery rung's own matrix kernels (raw representatives of <see cref="PrimeField62"/>): the blocked
/// determinant with delayed reduction and Glynn's permanent with AVX-512. <see cref="MatrixKernels"/> chooses them. Stateless.
/// </summary>
internal static class MatrixKernels62
{
    /// <summary>Columns per panel of the blocked 62-bit elimination: 8 products of residues sum to less than 2p·2^64.</summary>
    internal const int Panel = 8;

    /// <summary>From this order on the 62-bit determinant is eliminated by panels; below it the generic elimination is faster.</summary>
    internal const int PanelMinOrder = 24;

    /// <summary>
    /// Determinant of a matrix of raw Montgomery representatives mod a 62-bit prime, overwriting <paramref name="a"/>; the
    /// result is a Montgomery representative. Right-looking blocked LU elimination (any nonzero pivot): each panel of
    /// <see cref="Panel"/> columns is factorised on its own (multipliers stored in place), its pivot rows are updated by
    /// forward substitution, and the trailing matrix gets the rank-8 update A ← A − L·U with delayed reduction: the eight
    /// 124-bit products of an entry are summed in 128 bits and reduced once (Montgomery, after one conditional subtraction of
    /// p from the high word, since the sum is below 2p·2^64), instead of once per product. The last
    /// <see cref="MatrixKernels.DivisionFreeOrder"/> columns go division-free as in the generic code. With <paramref name="avx512"/> (and a
    /// CPU that has AVX-512F/DQ) the updates right of each panel run 8 columns per vector; the scalar code gives the same results.
    /// </summary>
    internal static ulong Determinant(PrimeField62 f, Span<ulong> a, int n, bool avx512, CancellationToken cancellation = default)
    {
        var residues = MemoryMarshal.Cast<ulong, Residue62>(a);
        if (n < PanelMinOrder) return PrimeField62.ToMontgomery(MatrixKernels.DeterminantByElimination(f, residues, n, MatrixKernels.DivisionFreeOrder, cancellation));

        unchecked
        {
            var (p, q) = (f.Modulus, f.ModulusInverse);
            var det = PrimeField62.ToMontgomery(f.One);
            var negative = false;
            var head = n - MatrixKernels.DivisionFreeOrder;
            var vector = avx512 && Avx512F.IsSupported && Avx512DQ.IsSupported;
            ulong[]? rented = null;
            var transposed = n <= 256 ? stackalloc ulong[Panel * 256] : (rented = ArrayPool<ulong>.Shared.Rent(Panel * n));
            Span<ulong> triangle = stackalloc ulong[Panel * Panel];
            try
            {
                for (var k0 = 0; k0 < head; k0 += Panel)
                {
                    cancellation.ThrowIfCancellationRequested();
                    var kb = Math.Min(Panel, head - k0);
                    var c1 = k0 + kb;

                    // 1. The panel: columns k0 .. c1−1, every row from k0 down; multipliers stay in place.
                    for (var k = k0; k < c1; k++)
                    {
                        var pivot = k;
                        while (pivot < n && a[pivot * n + k] == 0) pivot++;
                        if (pivot == n) return 0;
                        if (pivot != k)
                        {
                            MatrixKernels.Swap(a.Slice(k * n + k0, n - k0), a.Slice(pivot * n + k0, n - k0));
                            negative = !negative;
                        }
                        var pk = a[k * n + k];
                        det = Lanes62.Multiply(det, pk, p, q);
                        f.TryInvert(PrimeField62.FromMontgomery(pk), out var inverseResidue);
                        var inverse = PrimeField62.ToMontgomery(inverseResidue);
                        var pivotRow = a.Slice(k * n + k + 1, c1 - k - 1);
                        for (var i = k + 1; i < n; i++)
                        {
                            var l = Lanes62.Multiply(a[i * n + k], inverse, p, q);
                            a[i * n + k] = l;
                            if (l == 0) continue;
                            var row = a.Slice(i * n + k + 1, pivotRow.Length);
                            for (var j = 0; j < row.Length; j++) row[j] = SubMod62(row[j], Lanes62.Multiply(l, pivotRow[j], p, q), p);
                        }
                    }

                    if (vector)
                    {
                        UpdateRightOfPanelAvx512(a, n, k0, kb, c1, p, q);
                        continue;
                    }
                    var w = n - c1;
                    // 2. U, transposed: for each column j right of the panel, its kb pivot-row entries side by side.
                    var u = transposed[..(w * kb)];
                    for (var s = 0; s < kb; s++)
                    {
                        var source = a.Slice((k0 + s) * n + c1, w);
                        for (var j = 0; j < w; j++) u[j * kb + s] = source[j];
                    }

                    // 3. The pivot rows right of the panel need the panel's own multipliers (unit lower triangular): forward
                    //    substitution on each column of U, u[t] −= Σ_{s<t} L[k0+t][k0+s]·u[s]. The pivot rows themselves are
                    //    not needed again, so U stays in the scratch only.
                    for (var t = 1; t < kb; t++)
                        for (var s = 0; s < t; s++) triangle[t * Panel + s] = a[(k0 + t) * n + k0 + s];
                    for (var j = 0; j < w; j++)
                    {
                        var uj = u.Slice(j * kb, kb);
                        for (var t = 1; t < uj.Length; t++)
                        {
                            var lt = triangle.Slice(t * Panel, t);
                            ulong x0 = 0, x1 = 0, hi = 0;
                            for (var s = 0; s < lt.Length; s++) Accumulate(lt[s], uj[s], ref x0, ref x1, ref hi);
                            uj[t] = SubMod62(uj[t], Reduce(x0, x1, hi, p, q), p);
                        }
                    }

                    // 4. The trailing matrix: A[i][j] −= Σ_s L[i][k0+s]·U[s][j], one reduction per entry.
                    for (var i = c1; i < n; i++)
                    {
                        var row = a.Slice(i * n, n);
                        var dst = row.Slice(c1, w);
                        if (kb == Panel)
                        {
                            var l = row.Slice(k0, Panel);
                            ulong l0 = l[0], l1 = l[1], l2 = l[2], l3 = l[3], l4 = l[4], l5 = l[5], l6 = l[6], l7 = l[7];
                            for (var j = 0; j < dst.Length; j++)
                            {
                                var uj = u.Slice(j * Panel, Panel);
                                ulong x0 = 0, x1 = 0, hi = 0;
                                Accumulate(l0, uj[0], ref x0, ref x1, ref hi);
                                Accumulate(l1, uj[1], ref x0, ref x1, ref hi);
                                Accumulate(l2, uj[2], ref x0, ref x1, ref hi);
                                Accumulate(l3, uj[3], ref x0, ref x1, ref hi);
                                Accumulate(l4, uj[4], ref x0, ref x1, ref hi);
                                Accumulate(l5, uj[5], ref x0, ref x1, ref hi);
                                Accumulate(l6, uj[6], ref x0, ref x1, ref hi);
                                Accumulate(l7, uj[7], ref x0, ref x1, ref hi);
                                dst[j] = SubMod62(dst[j], Reduce(x0, x1, hi, p, q), p);
                            }
                        }
                        else
                        {
                            var l = row.Slice(k0, kb);
                            for (var j = 0; j < dst.Length; j++)
                            {
                                var uj = u.Slice(j * kb, kb);
                                ulong x0 = 0, x1 = 0, hi = 0;
                                for (var s = 0; s < kb; s++) Accumulate(l[s], uj[s], ref x0, ref x1, ref hi);
                                dst[j] = SubMod62(dst[j], Reduce(x0, x1, hi, p, q), p);
                            }
                        }
                    }
                }
                var tail = MatrixKernels.DivisionFreeTail(f, residues, n, Math.Max(head, 0), ref negative);
                det = Lanes62.Multiply(det, PrimeField62.ToMontgomery(tail), p, q);
                return negative && det != 0 ? p - det : det;
            }
            finally
            {
                if (rented is not null) ArrayPool<ulong>.Shared.Return(rented);
            }
        }
    }

    /// <summary>
    /// Steps 2–4 of <see cref="Determinant"/> on AVX-512, 8 columns per vector: U stays in the pivot rows (forward
    /// substitution in place), and each vector of 8 entries sums its kb products in 128 bits (low words with
    /// <c>vpmullq</c>, carries by an unsigned compare) before one Montgomery reduction.
    /// </summary>
    private static void UpdateRightOfPanelAvx512(Span<ulong> a, int n, int k0, int kb, int c1, ulong p, ulong q)
    {
        unchecked
        {
            var w = n - c1;
            var whole = w - w % Vector512<ulong>.Count;
            var vp = Vector512.Create(p);
            var vpHigh = Vector512.Create(p >> 32);
            var vq = Vector512.Create(q);

            // forward substitution: row k0+t −= Σ_{s<t} L[k0+t][k0+s]·row k0+s, right of the panel
            for (var t = 1; t < kb; t++)
            {
                var target = a.Slice((k0 + t) * n + c1, w);
                var l = a.Slice((k0 + t) * n + k0, t);
                for (var j = 0; j < whole; j += Vector512<ulong>.Count)
                {
                    Vector512<ulong> lo = default, hi = default;
                    for (var s = 0; s < l.Length; s++)
                    {
                        var x = Vector512.Create(l[s]);
                        AccumulateAvx512(x, Avx512F.ShiftRightLogical(x, 32), Vector512.Create<ulong>(a.Slice((k0 + s) * n + c1 + j, Vector512<ulong>.Count)), ref lo, ref hi);
                    }
                    var d = target.Slice(j, Vector512<ulong>.Count);
                    Lanes62.SubMod(Vector512.Create<ulong>(d), ReduceAvx512(lo, hi, vp, vpHigh, vq), vp).CopyTo(d);
                }
                for (var j = whole; j < w; j++)
                {
                    ulong x0 = 0, x1 = 0, hi = 0;
                    for (var s = 0; s < l.Length; s++) Accumulate(l[s], a[(k0 + s) * n + c1 + j], ref x0, ref x1, ref hi);
                    target[j] = SubMod62(target[j], Reduce(x0, x1, hi, p, q), p);
                }
            }

            // the trailing matrix: A[i][j] −= Σ_s L[i][k0+s]·U[s][j]
            var u = a.Slice(k0 * n + c1, (kb - 1) * n + w);
            Span<Vector512<ulong>> lv = stackalloc Vector512<ulong>[2 * Panel];
            for (var i = c1; i < n; i++)
            {
                var row = a.Slice(i * n, n);
                var l = row.Slice(k0, kb);
                for (var s = 0; s < kb; s++)
                {
                    lv[2 * s] = Vector512.Create(l[s]);
                    lv[2 * s + 1] = Vector512.Create(l[s] >> 32);
                }
                var dst = row.Slice(c1, w);
                if (kb == Panel)
                {
                    Vector512<ulong> l0 = lv[0], h0 = lv[1], l1 = lv[2], h1 = lv[3], l2 = lv[4], h2 = lv[5], l3 = lv[6], h3 = lv[7];
                    Vector512<ulong> l4 = lv[8], h4 = lv[9], l5 = lv[10], h5 = lv[11], l6 = lv[12], h6 = lv[13], l7 = lv[14], h7 = lv[15];
                    for (var j = 0; j < whole; j += Vector512<ulong>.Count)
                    {
                        Vector512<ulong> lo = default, hi = default;
                        AccumulateAvx512(l0, h0, Vector512.Create<ulong>(u.Slice(j, 8)), ref lo, ref hi);
                        AccumulateAvx512(l1, h1, Vector512.Create<ulong>(u.Slice(n + j, 8)), ref lo, ref hi);
                        AccumulateAvx512(l2, h2, Vector512.Create<ulong>(u.Slice(2 * n + j, 8)), ref lo, ref hi);
                        AccumulateAvx512(l3, h3, Vector512.Create<ulong>(u.Slice(3 * n + j, 8)), ref lo, ref hi);
                        AccumulateAvx512(l4, h4, Vector512.Create<ulong>(u.Slice(4 * n + j, 8)), ref lo, ref hi);
                        AccumulateAvx512(l5, h5, Vector512.Create<ulong>(u.Slice(5 * n + j, 8)), ref lo, ref hi);
                        AccumulateAvx512(l6, h6, Vector512.Create<ulong>(u.Slice(6 * n + j, 8)), ref lo, ref hi);
                        AccumulateAvx512(l7, h7, Vector512.Create<ulong>(u.Slice(7 * n + j, 8)), ref lo, ref hi);
                        var d = dst.Slice(j, Vector512<ulong>.Count);
                        Lanes62.SubMod(Vector512.Create<ulong>(d), ReduceAvx512(lo, hi, vp, vpHigh, vq), vp).CopyTo(d);
                    }
                }
                else
                {
                    for (var j = 0; j < whole; j += Vector512<ulong>.Count)
                    {
                        Vector512<ulong> lo = default, hi = default;
                        for (var s = 0; s < kb; s++) AccumulateAvx512(lv[2 * s], lv[2 * s + 1], Vector512.Create<ulong>(u.Slice(s * n + j, 8)), ref lo, ref hi);
                        var d = dst.Slice(j, Vector512<ulong>.Count);
                        Lanes62.SubMod(Vector512.Create<ulong>(d), ReduceAvx512(lo, hi, vp, vpHigh, vq), vp).CopyTo(d);
                    }
                }
                for (var j = whole; j < w; j++)
                {
                    ulong x0 = 0, x1 = 0, hi = 0;
                    for (var s = 0; s < kb; s++) Accumulate(l[s], u[s * n + j], ref x0, ref x1, ref hi);
                    dst[j] = SubMod62(dst[j], Reduce(x0, x1, hi, p, q), p);
                }
            }
        }
    }

    /// <summary>(hi:lo) += x·y on 8 lanes, x broadcast with its high halves precomputed; the carry out of lo is lo &lt; x·y.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static void AccumulateAvx512(Vector512<ulong> x, Vector512<ulong> xHigh, Vector512<ulong> y, ref Vector512<ulong> lo, ref Vector512<ulong> hi)
    {
        var productLow = Avx512DQ.MultiplyLow(x, y);
        lo = Avx512F.Add(lo, productLow);
        hi = Avx512F.Subtract(Avx512F.Add(hi, Lanes62.High(y, x, xHigh)), Avx512F.CompareLessThan(lo, productLow)); // the mask is −1 on a carry
    }

    /// <summary>(hi·2^64 + lo)·2^-64 mod p on 8 lanes, for hi &lt; 2p.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static Vector512<ulong> ReduceAvx512(Vector512<ulong> lo, Vector512<ulong> hi, Vector512<ulong> p, Vector512<ulong> pHigh, Vector512<ulong> q)
    {
        hi = Avx512F.Min(hi, Avx512F.Subtract(hi, p));
        var d = Avx512F.Subtract(hi, Lanes62.High(Avx512DQ.MultiplyLow(lo, q), p, pHigh));
        return Avx512F.Min(d, Avx512F.Add(d, p));
    }

    /// <summary>
    /// Glynn's formula mod a 62-bit prime on AVX-512 (<paramref name="a"/> raw Montgomery representatives, 4 ≤ n ≤ 32): the
    /// 8 lanes take the 8 sign patterns of the last three rows, and the Gray code runs over the rows 1 … n−4, the same flips
    /// on every lane, so each step moves n vectors of column sums by a broadcast ∓2·a_ij and multiplies them lane by lane
    /// (in four chains). Lane k's terms carry the extra sign (−1)^popcount(k). Returns a Montgomery representative.
    /// </summary>
    internal static ulong GlynnAvx512(PrimeField62 f, ReadOnlySpan<ulong> a, int n, CancellationToken cancellation = default)
    {
        unchecked
        {
            var (p, q) = (f.Modulus, f.ModulusInverse);
            var vp = Vector512.Create(p);
            var vpHigh = Vector512.Create(p >> 32);
            var vq = Vector512.Create(q);
            Span<ulong> twice = stackalloc ulong[32 * 32];
            for (var i = 0; i < n * n; i++) twice[i] = AddMod62(a[i], a[i], p);
            Span<Vector512<ulong>> sums = stackalloc Vector512<ulong>[32];
            Span<ulong> lanes = stackalloc ulong[Vector512<ulong>.Count];
            for (var j = 0; j < n; j++)
            {
                var common = a[j];
                for (var i = 1; i < n - 3; i++) common = AddMod62(common, a[i * n + j], p);
                for (var k = 0; k < lanes.Length; k++)
                {
                    var x = common;
                    for (var t = 0; t < 3; t++)
                    {
                        var entry = a[(n - 3 + t) * n + j];
                        x = (k >> t & 1) != 0 ? SubMod62(x, entry, p) : AddMod62(x, entry, p);
                    }
                    lanes[k] = x;
                }
                sums[j] = Vector512.Create<ulong>(lanes);
            }
            var s = sums[..n];
            var even = ProductAvx512(s, vp, vpHigh, vq);
            var odd = Vector512<ulong>.Zero;
            var minus = 0UL;
            var count = 1UL << (n - 4);
            for (var g = 1UL; g < count; g++)
            {
                if ((g & (MatrixKernels.CancellationInterval - 1)) == 0) cancellation.ThrowIfCancellationRequested();
                var bit = BitOperations.TrailingZeroCount(g);
                var row = twice.Slice((bit + 1) * n, n);
                if ((minus >> bit & 1) != 0)
                    for (var j = 0; j < s.Length; j++) s[j] = Lanes62.AddMod(s[j], Vector512.Create(row[j]), vp);
                else
                    for (var j = 0; j < s.Length; j++) s[j] = Lanes62.SubMod(s[j], Vector512.Create(row[j]), vp);
                minus ^= 1UL << bit;
                var product = ProductAvx512(s, vp, vpHigh, vq);
                if ((g & 1) == 0) even = Lanes62.AddMod(even, product, vp);
                else odd = Lanes62.AddMod(odd, product, vp);
            }
            var difference = Lanes62.SubMod(even, odd, vp);
            var total = 0UL;
            for (var k = 0; k < Vector512<ulong>.Count; k++)
                total = BitOperations.PopCount((uint)k) % 2 == 0 ? AddMod62(total, difference[k], p) : SubMod62(total, difference[k], p);
            f.TryInvert(f.FromUInt64(1UL << (n - 1)), out var scale);
            return Lanes62.Multiply(total, PrimeField62.ToMontgomery(scale), p, q);
        }
    }

    /// <summary>Π s_j lane by lane, in four interleaved chains (s has at least 4 vectors).</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static Vector512<ulong> ProductAvx512(ReadOnlySpan<Vector512<ulong>> s, Vector512<ulong> p, Vector512<ulong> pHigh, Vector512<ulong> q)
    {
        Vector512<ulong> p0 = s[0], p1 = s[1], p2 = s[2], p3 = s[3];
        var k = 4;
        for (; k + 3 < s.Length; k += 4)
        {
            p0 = Lanes62.Multiply(p0, s[k], p, pHigh, q);
            p1 = Lanes62.Multiply(p1, s[k + 1], p, pHigh, q);
            p2 = Lanes62.Multiply(p2, s[k + 2], p, pHigh, q);
            p3 = Lanes62.Multiply(p3, s[k + 3], p, pHigh, q);
        }
        for (; k < s.Length; k++) p0 = Lanes62.Multiply(p0, s[k], p, pHigh, q);
        return Lanes62.Multiply(Lanes62.Multiply(p0, p1, p, pHigh, q), Lanes62.Multiply(p2, p3, p, pHigh, q), p, pHigh, q);
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static ulong AddMod62(ulong a, ulong b, ulong p)
    {
        unchecked
        {
            var d = a + b - p;
            return d + (p & (ulong)((long)d >> 63));
        }
    }

    /// <summary>
    /// Adds x·y to a 128-bit sum kept carry-free as hi·2^64 + x1·2^32 + x0: the low word of each product goes in two 32-bit
    /// halves, so that up to 2^32 products sum without a carry test (cheaper than compare-and-add on every product).
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static void Accumulate(ulong x, ulong y, ref ulong x0, ref ulong x1, ref ulong hi)
    {
        unchecked
        {
            var l = x * y;
            hi += Lanes62.High(x, y);
            x0 += (uint)l;
            x1 += l >> 32;
        }
    }

    /// <summary>
    /// The sum of <see cref="Accumulate"/> times 2^-64 mod p, for a sum below 2p·2^64: carry the halves into (hi, lo), one
    /// conditional subtraction brings hi below p, then Montgomery reduction.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static ulong Reduce(ulong x0, ulong x1, ulong hi, ulong p, ulong q)
    {
        unchecked
        {
            var mid = (x0 >> 32) + x1;
            var lo = (x0 & 0xFFFF_FFFFUL) | (mid << 32);
            hi += (mid >> 32) - p;
            hi += p & (ulong)((long)hi >> 63);
            var d = hi - Lanes62.High(lo * q, p);
            return d + (p & (ulong)((long)d >> 63));
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static ulong SubMod62(ulong a, ulong b, ulong p)
    {
        unchecked
        {
            var d = a - b;
            return d + (p & (ulong)((long)d >> 63));
        }
    }
}
