using System.Numerics;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics.X86;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Evaluate;

/// <summary>
/// Determinant, Pfaffian and permanent of a square matrix over a field, on a row-major span, with no allocation per call.
/// Determinant and Pfaffian work in place (they overwrite the matrix). Stateless.
/// </summary>
public static class MatrixKernels
{
    /// <summary>
    /// Below this remaining order, elimination goes on division-free (one inversion at the end instead of one per pivot):
    /// an inversion costs about as much as a hundred or more multiplications on every rung, and the division-free step
    /// costs one extra multiplication per remaining entry.
    /// </summary>
    internal const int DivisionFreeOrder = 12;

    /// <summary>From this order on, permanents in odd characteristic use Glynn's formula (half the terms of Ryser's).</summary>
    internal const int GlynnMinOrder = 4;

    /// <summary>
    /// Gray-code steps of a permanent between two looks at the cancellation token (each step costs about 3n field
    /// operations, so a look every 1,024 steps is well under a millisecond apart and costs nothing measurable).
    /// </summary>
    internal const int CancellationInterval = 1024;

    /// <summary>Largest order a permanent accepts: the formulas visit 2^n (or 2^(n−1)) sign patterns.</summary>
    public const int MaxPermanentOrder = 62;

    /// <summary>
    /// Determinant by Gaussian elimination (any nonzero pivot; a field has no rounding), O(n³), overwriting
    /// <paramref name="a"/>. The last <see cref="DivisionFreeOrder"/> columns are eliminated division-free. On the 62-bit
    /// Montgomery rung, larger matrices are eliminated by panels with delayed reduction (see <see cref="MatrixKernels62.Determinant"/>).
    /// </summary>
    /// <param name="f">The field.</param>
    /// <param name="a">The n×n matrix, row-major. Overwritten.</param>
    /// <param name="n">The order.</param>
    /// <param name="cancellation">Looked at once per pivot column; a cancelled elimination throws <see cref="OperationCanceledException"/>.</param>
    public static T Determinant<TField, T>(TField f, Span<T> a, int n, CancellationToken cancellation = default)
        where TField : struct, IField<T> where T : struct
    {
        CheckSquare(a.Length, n);
        if (TField.Layout == ElementLayout.Montgomery62)
        {
            var raw = MatrixKernels62.Determinant(Unsafe.As<TField, PrimeField62>(ref f), MemoryMarshal.Cast<T, ulong>(a), n, avx512: true, cancellation);
            return Unsafe.As<ulong, T>(ref raw);
        }
        return DeterminantByElimination(f, a, n, DivisionFreeOrder, cancellation);
    }

    /// <summary>
    /// The generic elimination: pivots with an inversion each while more than <paramref name="divisionFreeOrder"/> columns
    /// remain, then division-free steps: row_i ← p·row_i − a_ik·row_k scales each remaining row by the pivot p, so the
    /// determinant picks up the factor Π_k p_k^(r_k) (r_k rows below pivot k), divided out once at the end.
    /// </summary>
    internal static T DeterminantByElimination<TField, T>(TField f, Span<T> a, int n, int divisionFreeOrder, CancellationToken cancellation = default)
        where TField : struct, IField<T> where T : struct
    {
        var det = f.One;
        var negative = false;
        var k = 0;
        for (; k < n - divisionFreeOrder; k++)
        {
            cancellation.ThrowIfCancellationRequested();
            if (!Pivot(f, a, n, k, ref negative)) return f.Zero;
            var p = a[k * n + k];
            det = f.Multiply(det, p);
            f.TryInvert(p, out var inverse);
            var pivotRow = a.Slice(k * n + k + 1, n - k - 1);
            for (var i = k + 1; i < n; i++)
            {
                var factor = f.Multiply(a[i * n + k], inverse);
                if (f.IsZero(factor)) continue;
                var minus = f.Negate(factor);
                var row = a.Slice(i * n + k + 1, pivotRow.Length);
                for (var j = 0; j < row.Length; j++) row[j] = f.MultiplyAdd(minus, pivotRow[j], row[j]);
            }
        }
        det = f.Multiply(det, DivisionFreeTail(f, a, n, k, ref negative));
        return negative ? f.Negate(det) : det;
    }

    /// <summary>The determinant of the trailing submatrix from row and column k on, division-free (see above); updates the sign.</summary>
    internal static T DivisionFreeTail<TField, T>(TField f, Span<T> a, int n, int k, ref bool negative)
        where TField : struct, IField<T> where T : struct
    {
        var numerator = f.One;   // the pivots of the division-free steps
        var denominator = f.One; // Π over those steps of the prefix products of their pivots = Π_k p_k^(rows below k)
        var prefix = f.One;
        for (; k < n; k++)
        {
            if (!Pivot(f, a, n, k, ref negative)) return f.Zero;
            var p = a[k * n + k];
            numerator = f.Multiply(numerator, p);
            if (k == n - 1) break;
            prefix = f.Multiply(prefix, p);
            denominator = f.Multiply(denominator, prefix);
            var pivotRow = a.Slice(k * n + k + 1, n - k - 1);
            for (var i = k + 1; i < n; i++)
            {
                var g = a[i * n + k];
                var row = a.Slice(i * n + k + 1, pivotRow.Length);
                for (var j = 0; j < row.Length; j++) row[j] = f.Subtract(f.Multiply(p, row[j]), f.Multiply(g, pivotRow[j]));
            }
        }
        f.TryInvert(denominator, out var scale); // a product of nonzero pivots
        return f.Multiply(numerator, scale);
    }

    /// <summary>Moves a row with a nonzero entry in column k to row k (from column k on); false when there is none.</summary>
    private static bool Pivot<TField, T>(TField f, Span<T> a, int n, int k, ref bool negative)
        where TField : struct, IField<T> where T : struct
    {
        var pivot = k;
        while (pivot < n && f.IsZero(a[pivot * n + k])) pivot++;
        if (pivot == n) return false;
        if (pivot != k)
        {
            Swap(a.Slice(k * n + k, n - k), a.Slice(pivot * n + k, n - k));
            negative = !negative;
        }
        return true;
    }

    /// <summary>
    /// Pfaffian of a skew-symmetric matrix by block elimination: with P = [[0, a], [−a, 0]] the leading 2×2 block and B the
    /// rest of its rows, pf(M) = a · pf(C + Bᵀ P⁻¹ B), the Schur complement (a congruence by a unit triangular matrix). O(n³),
    /// overwriting <paramref name="a"/>. While at most <see cref="DivisionFreeOrder"/> rows remain, the complement is formed
    /// times a (no inversion): pf(a·S) = a^(m/2) pf(S) for S of order m, divided out once at the end.
    /// </summary>
    /// <param name="f">The field.</param>
    /// <param name="a">The n×n matrix, row-major. Overwritten.</param>
    /// <param name="n">The order.</param>
    /// <param name="cancellation">Looked at once per eliminated pair of rows.</param>
    public static T Pfaffian<TField, T>(TField f, Span<T> a, int n, CancellationToken cancellation = default)
        where TField : struct, IField<T> where T : struct
    {
        CheckSquare(a.Length, n);
        return Pfaffian(f, a, n, DivisionFreeOrder, cancellation);
    }

    internal static T Pfaffian<TField, T>(TField f, Span<T> a, int n, int divisionFreeOrder, CancellationToken cancellation = default)
        where TField : struct, IField<T> where T : struct
    {
        if (n % 2 == 1) return f.Zero;
        var pf = f.One;
        var numerator = f.One;
        var denominator = f.One;
        for (var k = 0; k < n; k += 2)
        {
            cancellation.ThrowIfCancellationRequested();
            var pivot = k + 1;
            while (pivot < n && f.IsZero(a[k * n + pivot])) pivot++;
            if (pivot == n) return f.Zero;
            if (pivot != k + 1)
            {
                SwapIndex(a, n, k + 1, pivot);
                pf = f.Negate(pf);
            }
            var head = a[k * n + k + 1];
            var rowK = a.Slice(k * n + k + 2, n - k - 2);
            var rowK1 = a.Slice((k + 1) * n + k + 2, n - k - 2);
            if (n - k > divisionFreeOrder)
            {
                pf = f.Multiply(pf, head);
                f.TryInvert(head, out var inverse);
                // S[i][j] = C[i][j] + (A[k+1][i]·A[k][j] − A[k][i]·A[k+1][j]) / a, for i, j ≥ k+2
                for (var i = k + 2; i < n; i++)
                {
                    var u = f.Multiply(a[(k + 1) * n + i], inverse);
                    var v = f.Negate(f.Multiply(a[k * n + i], inverse));
                    var row = a.Slice(i * n + k + 2, rowK.Length);
                    for (var j = 0; j < row.Length; j++) row[j] = f.MultiplyAdd(v, rowK1[j], f.MultiplyAdd(u, rowK[j], row[j]));
                }
            }
            else
            {
                // a·S[i][j] = a·C[i][j] + A[k+1][i]·A[k][j] − A[k][i]·A[k+1][j]; pf(a·S) = a^((n−k−2)/2)·pf(S)
                numerator = f.Multiply(numerator, head);
                for (var e = 0; e < (n - k - 2) / 2; e++) denominator = f.Multiply(denominator, head);
                for (var i = k + 2; i < n; i++)
                {
                    var u = a[(k + 1) * n + i];
                    var v = f.Negate(a[k * n + i]);
                    var row = a.Slice(i * n + k + 2, rowK.Length);
                    for (var j = 0; j < row.Length; j++) row[j] = f.MultiplyAdd(v, rowK1[j], f.MultiplyAdd(u, rowK[j], f.Multiply(head, row[j])));
                }
            }
        }
        f.TryInvert(denominator, out var scale); // a product of nonzero pivots
        return f.Multiply(pf, f.Multiply(numerator, scale));
    }

    /// <summary>Exchanges the contents of two equally long, non-overlapping ranges.</summary>
    internal static void Swap<T>(Span<T> x, Span<T> y)
    {
        y = y[..x.Length];
        for (var i = 0; i < x.Length; i++) (x[i], y[i]) = (y[i], x[i]);
    }

    internal static void SwapIndex<T>(Span<T> a, int n, int x, int y)
    {
        Swap(a.Slice(x * n, n), a.Slice(y * n, n));
        for (var i = 0; i < n; i++) (a[i * n + x], a[i * n + y]) = (a[i * n + y], a[i * n + x]);
    }

    /// <summary>Room for the row or column sums of a permanent without allocating.</summary>
    [InlineArray(32)]
    private struct Sums<T>
    {
        private T _element;
    }

    /// <summary>
    /// Permanent in O(2^n·n): Glynn's formula in odd characteristic and from order <see cref="GlynnMinOrder"/> on, else
    /// Ryser's formula, both visiting their sign patterns in Gray-code order so that each step updates the sums by one row or
    /// column. No allocation for n ≤ 32 (larger orders are far beyond any time budget anyway). On the 62-bit rung with
    /// AVX-512, Glynn's sign patterns run 8 at a time in vector lanes (see <see cref="MatrixKernels62.GlynnAvx512"/>).
    /// </summary>
    /// <param name="f">The field.</param>
    /// <param name="a">The n×n matrix, row-major. Left unchanged.</param>
    /// <param name="n">The order.</param>
    /// <param name="cancellation">Looked at every <see cref="CancellationInterval"/> Gray-code steps.</param>
    public static T Permanent<TField, T>(TField f, ReadOnlySpan<T> a, int n, CancellationToken cancellation = default)
        where TField : struct, IField<T> where T : struct
    {
        if (n > 32) return Permanent(f, a, n, new T[n], cancellation);
        var sums = new Sums<T>();
        return Permanent(f, a, n, sums[..Math.Max(n, 0)], cancellation);
    }

    /// <summary>As <see cref="Permanent{TField, T}(TField, ReadOnlySpan{T}, int, CancellationToken)"/>, with the caller's scratch of at least n elements.</summary>
    public static T Permanent<TField, T>(TField f, ReadOnlySpan<T> a, int n, Span<T> scratch, CancellationToken cancellation = default)
        where TField : struct, IField<T> where T : struct
    {
        CheckSquare(a.Length, n);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(n, MaxPermanentOrder);
        if (scratch.Length < n) throw new ArgumentException($"the scratch needs {n} elements, got {scratch.Length}", nameof(scratch));
        if (n == 0) return f.One;
        if (TField.Layout == ElementLayout.Montgomery62 && n >= GlynnMinOrder && n <= 32 && Avx512F.IsSupported && Avx512DQ.IsSupported)
        {
            var raw = MatrixKernels62.GlynnAvx512(Unsafe.As<TField, PrimeField62>(ref f), MemoryMarshal.Cast<T, ulong>(a), n, cancellation);
            return Unsafe.As<ulong, T>(ref raw);
        }
        return n >= GlynnMinOrder && f.Characteristic != 2 ? Glynn(f, a, n, scratch[..n], cancellation) : Ryser(f, a, n, scratch[..n], cancellation);
    }

    /// <summary>
    /// Ryser: perm(A) = (−1)^n Σ_{S⊆[n]} (−1)^|S| Π_i Σ_{j∈S} a_ij. Along the Gray code the size of S changes by one per
    /// step, so its parity is the parity of the step and the terms go to two accumulators: perm = (−1)^n (even − odd).
    /// </summary>
    internal static T Ryser<TField, T>(TField f, ReadOnlySpan<T> a, int n, Span<T> sums, CancellationToken cancellation = default)
        where TField : struct, IField<T> where T : struct
    {
        sums.Fill(f.Zero);
        T even = f.Zero, odd = f.Zero;
        var inSet = 0UL;
        var count = 1UL << n;
        for (var g = 1UL; g < count; g++)
        {
            if ((g & (CancellationInterval - 1)) == 0) cancellation.ThrowIfCancellationRequested();
            var j = BitOperations.TrailingZeroCount(g);
            var leaving = (inSet >> j & 1) != 0;
            inSet ^= 1UL << j;
            if (leaving) for (var i = 0; i < n; i++) sums[i] = f.Subtract(sums[i], a[i * n + j]);
            else for (var i = 0; i < n; i++) sums[i] = f.Add(sums[i], a[i * n + j]);
            var product = Product(f, sums);
            if ((g & 1) == 0) even = f.Add(even, product);
            else odd = f.Add(odd, product);
        }
        return (n & 1) == 0 ? f.Subtract(even, odd) : f.Subtract(odd, even);
    }

    /// <summary>
    /// Glynn: perm(A) = 2^−(n−1) Σ_δ (Π_k δ_k) Π_j Σ_i δ_i a_ij over δ ∈ {±1}^n with δ_0 = 1 (Glynn, 2010).
    /// Each Gray-code step flips one δ_i, moving every column sum by ±2·a_ij, and flips the sign.
    /// Needs 2 to be invertible (odd characteristic).
    /// </summary>
    internal static T Glynn<TField, T>(TField f, ReadOnlySpan<T> a, int n, Span<T> sums, CancellationToken cancellation = default)
        where TField : struct, IField<T> where T : struct
    {
        for (var j = 0; j < n; j++) sums[j] = a[j];
        for (var i = 1; i < n; i++)
            for (var j = 0; j < n; j++) sums[j] = f.Add(sums[j], a[i * n + j]);
        var even = Product(f, sums);
        var odd = f.Zero;
        var minus = 0UL;
        var count = 1UL << (n - 1);
        for (var g = 1UL; g < count; g++)
        {
            if ((g & (CancellationInterval - 1)) == 0) cancellation.ThrowIfCancellationRequested();
            var bit = BitOperations.TrailingZeroCount(g);
            var row = a.Slice((bit + 1) * n, n);
            if ((minus >> bit & 1) != 0)
                for (var j = 0; j < n; j++) sums[j] = f.Add(f.Add(sums[j], row[j]), row[j]);
            else
                for (var j = 0; j < n; j++) sums[j] = f.Subtract(f.Subtract(sums[j], row[j]), row[j]);
            minus ^= 1UL << bit;
            var product = Product(f, sums);
            if ((g & 1) == 0) even = f.Add(even, product);
            else odd = f.Add(odd, product);
        }
        f.TryInvert(f.FromInteger(BigInteger.One << (n - 1)), out var scale);
        return f.Multiply(f.Subtract(even, odd), scale);
    }

    /// <summary>Π s_i in four interleaved chains, so that consecutive multiplications do not wait on each other.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static T Product<TField, T>(TField f, ReadOnlySpan<T> s)
        where TField : struct, IField<T> where T : struct
    {
        if (s.Length < 4)
        {
            var p = s[0];
            for (var i = 1; i < s.Length; i++) p = f.Multiply(p, s[i]);
            return p;
        }
        T p0 = s[0], p1 = s[1], p2 = s[2], p3 = s[3];
        var k = 4;
        for (; k + 3 < s.Length; k += 4)
        {
            p0 = f.Multiply(p0, s[k]);
            p1 = f.Multiply(p1, s[k + 1]);
            p2 = f.Multiply(p2, s[k + 2]);
            p3 = f.Multiply(p3, s[k + 3]);
        }
        for (; k < s.Length; k++) p0 = f.Multiply(p0, s[k]);
        return f.Multiply(f.Multiply(p0, p1), f.Multiply(p2, p3));
    }

    private static void CheckSquare(int length, int n)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(n);
        if (length < n * n) throw new ArgumentException($"a {n}×{n} matrix needs {n * n} entries, got {length}");
    }
}
