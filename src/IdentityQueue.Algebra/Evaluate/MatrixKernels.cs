using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Evaluate;

/// <summary>Determinant, Pfaffian and permanent of a square matrix over a field, in place on a row-major span. Stateless.</summary>
public static class MatrixKernels
{
    /// <summary>Determinant by Gaussian elimination (any nonzero pivot; a field has no rounding), O(n³). Overwrites <paramref name="a"/>.</summary>
    public static T Determinant<TField, T>(TField f, Span<T> a, int n)
        where TField : struct, IField<T> where T : struct
    {
        var det = f.One;
        for (var k = 0; k < n; k++)
        {
            var pivot = k;
            while (pivot < n && f.IsZero(a[pivot * n + k])) pivot++;
            if (pivot == n) return f.Zero;
            if (pivot != k)
            {
                for (var j = k; j < n; j++) (a[k * n + j], a[pivot * n + j]) = (a[pivot * n + j], a[k * n + j]);
                det = f.Negate(det);
            }
            var p = a[k * n + k];
            det = f.Multiply(det, p);
            f.TryInvert(p, out var inverse);
            for (var i = k + 1; i < n; i++)
            {
                var factor = f.Multiply(a[i * n + k], inverse);
                if (f.IsZero(factor)) continue;
                var minus = f.Negate(factor);
                for (var j = k + 1; j < n; j++) a[i * n + j] = f.MultiplyAdd(minus, a[k * n + j], a[i * n + j]);
            }
        }
        return det;
    }

    /// <summary>
    /// Pfaffian of a skew-symmetric matrix by block elimination: with P = [[0, a], [−a, 0]] the leading 2×2 block and B the
    /// rest of its rows, pf(M) = a · pf(C + Bᵀ P⁻¹ B), the Schur complement (a congruence by a unit triangular matrix). O(n³).
    /// </summary>
    public static T Pfaffian<TField, T>(TField f, Span<T> a, int n)
        where TField : struct, IField<T> where T : struct
    {
        if (n % 2 == 1) return f.Zero;
        var pf = f.One;
        for (var k = 0; k < n; k += 2)
        {
            var pivot = k + 1;
            while (pivot < n && f.IsZero(a[k * n + pivot])) pivot++;
            if (pivot == n) return f.Zero;
            if (pivot != k + 1)
            {
                SwapIndex(a, n, k + 1, pivot);
                pf = f.Negate(pf);
            }
            var head = a[k * n + k + 1];
            pf = f.Multiply(pf, head);
            f.TryInvert(head, out var inverse);
            // S[i][j] = C[i][j] + (A[k+1][i]·A[k][j] − A[k][i]·A[k+1][j]) / a, for i, j ≥ k+2
            for (var i = k + 2; i < n; i++)
            {
                var u = f.Multiply(a[(k + 1) * n + i], inverse);
                var v = f.Negate(f.Multiply(a[k * n + i], inverse));
                for (var j = k + 2; j < n; j++)
                {
                    var s = f.MultiplyAdd(u, a[k * n + j], a[i * n + j]);
                    a[i * n + j] = f.MultiplyAdd(v, a[(k + 1) * n + j], s);
                }
            }
        }
        return pf;
    }

    private static void SwapIndex<T>(Span<T> a, int n, int x, int y)
    {
        for (var j = 0; j < n; j++) (a[x * n + j], a[y * n + j]) = (a[y * n + j], a[x * n + j]);
        for (var i = 0; i < n; i++) (a[i * n + x], a[i * n + y]) = (a[i * n + y], a[i * n + x]);
    }

    /// <summary>
    /// Permanent by Ryser's formula, perm(A) = (−1)^n Σ_{S⊆[n]} (−1)^|S| Π_i Σ_{j∈S} a_ij, visiting the subsets in Gray-code
    /// order so each step updates the row sums by one column: O(2^n·n).
    /// </summary>
    public static T Permanent<TField, T>(TField f, ReadOnlySpan<T> a, int n)
        where TField : struct, IField<T> where T : struct
    {
        var sums = new T[n];
        for (var i = 0; i < n; i++) sums[i] = f.Zero;
        var total = f.Zero;
        var inSet = new bool[n];
        var size = 0;
        var count = 1UL << n;
        for (ulong g = 1; g < count; g++)
        {
            var j = System.Numerics.BitOperations.TrailingZeroCount(g);
            if (inSet[j])
            {
                inSet[j] = false; size--;
                for (var i = 0; i < n; i++) sums[i] = f.Subtract(sums[i], a[i * n + j]);
            }
            else
            {
                inSet[j] = true; size++;
                for (var i = 0; i < n; i++) sums[i] = f.Add(sums[i], a[i * n + j]);
            }
            var product = sums[0];
            for (var i = 1; i < n; i++) product = f.Multiply(product, sums[i]);
            total = (size & 1) == 0 ? f.Add(total, product) : f.Subtract(total, product);
        }
        return (n & 1) == 0 ? total : f.Negate(total);
    }
}
