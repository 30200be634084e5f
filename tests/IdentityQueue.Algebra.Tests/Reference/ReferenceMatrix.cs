using System.Text;
using IdentityQueue.Algebra.Exact;

namespace IdentityQueue.Algebra.Tests.Reference;

/// <summary>
/// An immutable matrix of <see cref="ReferencePolynomial"/> entries (at least 1×1), with the exact operations the
/// catalogue language has: + − ×, scalar ×, powers, transpose, trace, and det/perm by the Leibniz expansion and
/// pf by expansion along the first row. Row and column indices are 0-based here.
/// </summary>
public sealed class ReferenceMatrix : IEquatable<ReferenceMatrix>
{
    private readonly ReferencePolynomial[,] _entries;

    public ReferenceMatrix(ReferencePolynomial[,] entries)
    {
        if (entries.GetLength(0) == 0 || entries.GetLength(1) == 0) throw new ReferenceException("a matrix needs at least one row and one column");
        _entries = (ReferencePolynomial[,])entries.Clone();
    }

    public static ReferenceMatrix Create(int rows, int columns, Func<int, int, ReferencePolynomial> entry)
    {
        if (rows < 1 || columns < 1) throw new ReferenceException($"a {rows}×{columns} matrix is empty");
        var e = new ReferencePolynomial[rows, columns];
        for (var i = 0; i < rows; i++)
            for (var j = 0; j < columns; j++)
                e[i, j] = entry(i, j);
        return new ReferenceMatrix(e);
    }

    public static ReferenceMatrix Identity(int n) =>
        n < 1 ? throw new ReferenceException($"id({n}): the order must be at least 1") : Create(n, n, (i, j) => i == j ? ReferencePolynomial.One : ReferencePolynomial.Zero);

    public int Rows => _entries.GetLength(0);
    public int Columns => _entries.GetLength(1);
    public bool IsSquare => Rows == Columns;

    public ReferencePolynomial this[int row, int column] => _entries[row, column];

    public IEnumerable<ReferencePolynomial> Entries => _entries.Cast<ReferencePolynomial>();

    public bool IsZero => Entries.All(e => e.IsZero);

    public ReferenceMatrix Add(ReferenceMatrix other)
    {
        RequireSameShape(other, "+");
        return Create(Rows, Columns, (i, j) => this[i, j] + other[i, j]);
    }

    public ReferenceMatrix Subtract(ReferenceMatrix other)
    {
        RequireSameShape(other, "-");
        return Create(Rows, Columns, (i, j) => this[i, j] - other[i, j]);
    }

    public ReferenceMatrix Negate() => Create(Rows, Columns, (i, j) => -this[i, j]);

    public ReferenceMatrix Scale(ReferencePolynomial factor) => Create(Rows, Columns, (i, j) => factor * this[i, j]);

    public ReferenceMatrix Scale(Rational factor) => Create(Rows, Columns, (i, j) => this[i, j].Scale(factor));

    public ReferenceMatrix Multiply(ReferenceMatrix other)
    {
        if (Columns != other.Rows) throw new ReferenceException($"cannot multiply a {Rows}×{Columns} matrix by a {other.Rows}×{other.Columns} matrix");
        return Create(Rows, other.Columns, (i, j) =>
        {
            var sum = ReferencePolynomial.Zero;
            for (var k = 0; k < Columns; k++) sum += this[i, k] * other[k, j];
            return sum;
        });
    }

    /// <summary>M^e for a square M and e ≥ 0 (M^0 = id), by repeated multiplication.</summary>
    public ReferenceMatrix Pow(int exponent)
    {
        RequireSquare("a matrix power");
        if (exponent < 0) throw new ReferenceException("a matrix power needs a non-negative exponent");
        var result = Identity(Rows);
        for (var i = 0; i < exponent; i++) result = result.Multiply(this);
        return result;
    }

    public ReferenceMatrix Transpose() => Create(Columns, Rows, (i, j) => this[j, i]);

    public ReferencePolynomial Trace()
    {
        RequireSquare("tr");
        var sum = ReferencePolynomial.Zero;
        for (var i = 0; i < Rows; i++) sum += this[i, i];
        return sum;
    }

    /// <summary>det M = Σ_σ sgn(σ) Π_i M[i, σ(i)] (Leibniz), for orders up to <see cref="ReferenceLimits.MaxLeibnizOrder"/>.</summary>
    public ReferencePolynomial Determinant() => Leibniz("det", signed: true);

    /// <summary>perm M = Σ_σ Π_i M[i, σ(i)], for orders up to <see cref="ReferenceLimits.MaxLeibnizOrder"/>.</summary>
    public ReferencePolynomial Permanent() => Leibniz("perm", signed: false);

    /// <summary>
    /// pf M for a skew-symmetric matrix of even order: pf M = Σ_{j≥2} (−1)^j M[1,j] pf(M without rows and columns 1, j)
    /// (1-based), with pf of the empty matrix = 1. Throws unless M is exactly skew-symmetric of even order.
    /// </summary>
    public ReferencePolynomial Pfaffian()
    {
        RequireSquare("pf");
        if (Rows % 2 != 0) throw new ReferenceException($"pf needs a matrix of even order, not {Rows}");
        if (Rows > ReferenceLimits.MaxPfaffianOrder) throw new ReferenceException($"pf of order {Rows} is beyond the reference limit {ReferenceLimits.MaxPfaffianOrder}");
        for (var i = 0; i < Rows; i++)
            for (var j = i; j < Rows; j++)
                if (this[i, j] != -this[j, i]) throw new ReferenceException("pf needs a skew-symmetric matrix");
        return PfaffianOf(Enumerable.Range(0, Rows).ToList());
    }

    private ReferencePolynomial PfaffianOf(List<int> indices)
    {
        if (indices.Count == 0) return ReferencePolynomial.One;
        var sum = ReferencePolynomial.Zero;
        var first = indices[0];
        for (var t = 1; t < indices.Count; t++)
        {
            var entry = this[first, indices[t]];
            if (entry.IsZero) continue;
            var rest = indices.Where((_, u) => u != 0 && u != t).ToList();
            var term = entry * PfaffianOf(rest);
            // t is the 0-based position of j within the remaining list, so (−1)^j with j = t + 1 is −1 for even t.
            sum = t % 2 == 1 ? sum + term : sum - term;
        }
        return sum;
    }

    private ReferencePolynomial Leibniz(string what, bool signed)
    {
        RequireSquare(what);
        if (Rows > ReferenceLimits.MaxLeibnizOrder) throw new ReferenceException($"{what} of order {Rows} is beyond the reference limit {ReferenceLimits.MaxLeibnizOrder}");
        var sum = ReferencePolynomial.Zero;
        foreach (var (permutation, sign) in Permutations.All(Rows))
        {
            var term = ReferencePolynomial.One;
            for (var i = 0; i < Rows && !term.IsZero; i++) term *= this[i, permutation[i]];
            sum = !signed || sign > 0 ? sum + term : sum - term;
        }
        return sum;
    }

    private void RequireSquare(string what)
    {
        if (!IsSquare) throw new ReferenceException($"{what} needs a square matrix, not {Rows}×{Columns}");
    }

    private void RequireSameShape(ReferenceMatrix other, string op)
    {
        if (Rows != other.Rows || Columns != other.Columns)
            throw new ReferenceException($"'{op}' on matrices of different shapes {Rows}×{Columns} and {other.Rows}×{other.Columns}");
    }

    public bool Equals(ReferenceMatrix? other)
    {
        if (other is null || other.Rows != Rows || other.Columns != Columns) return false;
        for (var i = 0; i < Rows; i++)
            for (var j = 0; j < Columns; j++)
                if (this[i, j] != other[i, j]) return false;
        return true;
    }

    public override bool Equals(object? obj) => obj is ReferenceMatrix m && Equals(m);

    public override int GetHashCode()
    {
        var hash = HashCode.Combine(Rows, Columns);
        foreach (var e in Entries) hash = HashCode.Combine(hash, e);
        return hash;
    }

    /// <summary>Rows in brackets, e.g. <c>[[x, 1], [0, y^2]]</c>.</summary>
    public override string ToString()
    {
        var text = new StringBuilder("[");
        for (var i = 0; i < Rows; i++)
        {
            if (i > 0) text.Append(", ");
            text.Append('[').AppendJoin(", ", Enumerable.Range(0, Columns).Select(j => this[i, j].ToString())).Append(']');
        }
        return text.Append(']').ToString();
    }
}

/// <summary>All permutations of 0..n−1 with their signs, for Leibniz-type expansions.</summary>
public static class Permutations
{
    /// <summary>Every permutation of 0..n−1 (as a fresh array) with its sign ±1, in lexicographic order.</summary>
    public static IEnumerable<(int[] Permutation, int Sign)> All(int n)
    {
        var current = new int[n];
        var used = new bool[n];
        return Extend(0);

        IEnumerable<(int[], int)> Extend(int position)
        {
            if (position == n)
            {
                yield return ((int[])current.Clone(), SignOf(current));
                yield break;
            }
            for (var v = 0; v < n; v++)
            {
                if (used[v]) continue;
                used[v] = true;
                current[position] = v;
                foreach (var p in Extend(position + 1)) yield return p;
                used[v] = false;
            }
        }
    }

    /// <summary>(−1)^(number of inversions).</summary>
    public static int SignOf(IReadOnlyList<int> permutation)
    {
        var inversions = 0;
        for (var i = 0; i < permutation.Count; i++)
            for (var j = i + 1; j < permutation.Count; j++)
                if (permutation[i] > permutation[j]) inversions++;
        return inversions % 2 == 0 ? 1 : -1;
    }
}
