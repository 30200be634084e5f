using System.Numerics;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Exact;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Lower;

/// <summary>
/// The matrix constructs, lowered to the existing instructions: tr, transpose, id, zero, diag, entries, submatrix, minor,
/// adj (n² determinants of order n − 1), inv (adj times the inverse of det), and det, perm, pf (one matrix instruction each;
/// a Pfaffian's skew-symmetry that is not written out becomes side conditions).
/// </summary>
internal sealed class MatrixLowering(LoweringContext context, ExpressionLowering expressions)
{
    private readonly ProgramBuilder _b = context.Builder;
    private readonly Limits _limits = context.Limits;

    /// <summary>A matrix function, or null when <paramref name="node"/> is not one.</summary>
    public LoweredValue? Call(CallExpr node)
    {
        var args = node.Arguments;
        switch (node.Function)
        {
            case Builtins.Det:
            case Builtins.Permanent:
            case Builtins.Pfaffian:
                return LoweredValue.Of(MatrixFunction(node));
            case Builtins.Trace:
            {
                var m = expressions.MatrixOf(args[0], "tr's argument");
                if (m.Rows != m.Columns) throw new CompileError(args[0].Position, $"tr needs a square matrix, not {m.Describe()}");
                var acc = _b.Constant(Rational.Zero);
                for (var i = 0; i < m.Rows; i++) acc = _b.Add(acc, m[i, i]);
                return LoweredValue.Of(acc);
            }
            case Builtins.Transpose:
            {
                var m = expressions.MatrixOf(args[0], "transpose's argument");
                var e = new int[m.Entries!.Length];
                for (var i = 0; i < m.Rows; i++)
                    for (var j = 0; j < m.Columns; j++) e[j * m.Rows + i] = m[i, j];
                return LoweredValue.Matrix(m.Columns, m.Rows, e);
            }
            case Builtins.Identity:
                return Identity(Order(args[0], "id's argument"));
            case Builtins.Zero:
            {
                var rows = Order(args[0], "zero's first argument");
                return ZeroMatrix(rows, args.Count == 2 ? Order(args[1], "zero's second argument") : rows);
            }
            case Builtins.Diagonal:
                return Diagonal(node);
            case Builtins.Entry:
            {
                var m = expressions.MatrixOf(args[0], "the matrix of an entry");
                var i = context.Integer(args[1], "a row index");
                var j = context.Integer(args[2], "a column index");
                if (i < 1 || i > m.Rows || j < 1 || j > m.Columns)
                    throw new CompileError(args[i < 1 || i > m.Rows ? 1 : 2].Position,
                        $"the entry [{i},{j}] is outside {m.Describe()} (rows and columns count from 1)");
                return LoweredValue.Of(m[(int)i - 1, (int)j - 1]);
            }
            case Builtins.Submatrix:
                return Submatrix(node);
            case Builtins.Minor:
            {
                var sub = Submatrix(node);
                if (sub.Rows != sub.Columns)
                    throw new CompileError(node.Position, $"minor needs as many rows as columns, but it selects {sub.Rows} rows and {sub.Columns} columns");
                return LoweredValue.Of(Determinant(sub));
            }
            case Builtins.Adjugate:
                return Adjugate(SquareOf(args[0], "adj"));
            case Builtins.Inverse:
            {
                var m = SquareOf(args[0], "inv");
                // inv(M) = adj(M)/det(M): undefined (the trial is resampled) where det(M) vanishes.
                if (_b.TryGetConstant(Determinant(m), out var d) && d.IsZero)
                    throw new CompileError(args[0].Position, "inv of a matrix whose determinant is 0");
                var inverse = _b.Invert(Determinant(m));
                return ExpressionLowering.Map(Adjugate(m), x => _b.Multiply(x, inverse));
            }
            default:
                return null;
        }
    }

    public LoweredValue Identity(int n)
    {
        var one = _b.Constant(Rational.One);
        var zero = _b.Constant(Rational.Zero);
        var e = new int[n * n];
        for (var i = 0; i < n; i++)
            for (var j = 0; j < n; j++) e[i * n + j] = i == j ? one : zero;
        return LoweredValue.Matrix(n, n, e);
    }

    public LoweredValue ZeroMatrix(int rows, int columns)
    {
        var zero = _b.Constant(Rational.Zero);
        return LoweredValue.Matrix(rows, columns, Enumerable.Repeat(zero, rows * columns).ToArray());
    }

    private int MatrixFunction(CallExpr node)
    {
        var m = expressions.MatrixOf(node.Arguments[0], $"{node.Function}'s argument");
        if (m.Rows != m.Columns)
            throw new CompileError(node.Arguments[0].Position, $"{node.Function} needs a square matrix, not {m.Describe()}");
        var n = m.Rows;
        // The empty (0×0) matrix has det = perm = pf = 1: the empty product, as in the Laplace expansion (common practice).
        if (n == 0) return _b.Constant(Rational.One);
        switch (node.Function)
        {
            case Builtins.Det:
                return Determinant(m);
            case Builtins.Permanent:
                if (n > _limits.MaxPermanentOrder)
                    throw new CompileError(node.Position, $"perm of a {n}×{n} matrix exceeds the limit MaxPermanentOrder ({_limits.MaxPermanentOrder})");
                if (n == 1) return m[0, 0];
                return _b.MatrixFunction(OpCode.Permanent, n, m.Entries);
            default:
                if (n % 2 == 1)
                    throw new CompileError(node.Arguments[0].Position, $"pf needs a skew-symmetric matrix of even order, but this one is {n}×{n}");
                SkewConditions(m, node.Arguments[0].Position);
                return _b.MatrixFunction(OpCode.Pfaffian, n, m.Entries);
        }
    }

    /// <summary>
    /// Skew-symmetry is a property of the values, not of the spelling: an entry pair written as negatives (or constants)
    /// is checked here; any other pair becomes a side condition [j,i] + [i,j] = 0 (a diagonal entry: [i,i] = 0) that
    /// every trial evaluates at its point. A constant that breaks it is a compile error.
    /// </summary>
    private void SkewConditions(LoweredValue m, SourcePosition at)
    {
        var n = m.Rows;
        var where = $"pf's argument at {at}";
        for (var i = 0; i < n; i++)
        {
            if (_b.TryGetConstant(m[i, i], out var d))
            {
                if (!d.IsZero) throw new CompileError(at, $"pf needs a skew-symmetric matrix, but entry [{i + 1},{i + 1}] is {d}, not 0");
            }
            else context.Conditions.Add((m[i, i], $"{where}: entry [{i + 1},{i + 1}]"));
            for (var j = i + 1; j < n; j++)
            {
                if (_b.AreNegatives(m[i, j], m[j, i])) continue;
                var sum = _b.Add(m[i, j], m[j, i]);
                if (_b.TryGetConstant(sum, out var c))
                {
                    if (c.IsZero) continue;
                    throw new CompileError(at, $"pf needs a skew-symmetric matrix, but entry [{j + 1},{i + 1}] is not the negative of entry [{i + 1},{j + 1}] (their sum is {c})");
                }
                context.Conditions.Add((sum, $"{where}: entry [{i + 1},{j + 1}] + entry [{j + 1},{i + 1}]"));
            }
        }
    }

    private int Determinant(LoweredValue m) => m.Rows switch
    {
        0 => _b.Constant(Rational.One),
        1 => m[0, 0],
        _ => ConstantDeterminant(m) is { } d ? _b.Constant(d) : _b.MatrixFunction(OpCode.Determinant, m.Rows, m.Entries),
    };

    /// <summary>
    /// The exact determinant of a small matrix of constants (Gaussian elimination over Q), so that inv(zero(2)) is seen
    /// to divide by 0; null when an entry is not a constant, or the matrix is larger than 8×8.
    /// </summary>
    private Rational? ConstantDeterminant(LoweredValue m)
    {
        var n = m.Rows;
        if (n > 8) return null;
        var a = new Rational[n, n];
        for (var i = 0; i < n; i++)
            for (var j = 0; j < n; j++)
            {
                if (!_b.TryGetConstant(m[i, j], out var c)) return null;
                a[i, j] = c;
            }
        var det = Rational.One;
        for (var k = 0; k < n; k++)
        {
            var pivot = k;
            while (pivot < n && a[pivot, k].IsZero) pivot++;
            if (pivot == n) return Rational.Zero;
            if (pivot != k)
            {
                det = -det;
                for (var j = 0; j < n; j++) (a[k, j], a[pivot, j]) = (a[pivot, j], a[k, j]);
            }
            det *= a[k, k];
            for (var i = k + 1; i < n; i++)
            {
                var f = a[i, k] / a[k, k];
                for (var j = k; j < n; j++) a[i, j] -= f * a[k, j];
            }
        }
        return det;
    }

    private LoweredValue SquareOf(Expr e, string function)
    {
        var m = expressions.MatrixOf(e, $"{function}'s argument");
        if (m.Rows != m.Columns) throw new CompileError(e.Position, $"{function} needs a square matrix, not {m.Describe()}");
        return m;
    }

    /// <summary>adj(M)[i,j] = (−1)^(i+j)·det(M without row j and column i): n² determinants of order n − 1; adj of 1×1 is [[1]].</summary>
    private LoweredValue Adjugate(LoweredValue m)
    {
        var n = m.Rows;
        if ((long)n * n * Math.Max(1, (long)(n - 1) * (n - 1)) > _limits.MaxProgramSize)
            throw new CompileError(context.LastPosition, $"adj of a {n}×{n} matrix needs more than {_limits.MaxProgramSize} operands (the limit MaxProgramSize)");
        var e = new int[n * n];
        var minor = new int[(n - 1) * (n - 1)];
        for (var i = 0; i < n; i++)
            for (var j = 0; j < n; j++)
            {
                var k = 0;
                for (var r = 0; r < n; r++)
                {
                    if (r == j) continue;
                    for (var c = 0; c < n; c++)
                        if (c != i) minor[k++] = m[r, c];
                }
                var cofactor = Determinant(LoweredValue.Matrix(n - 1, n - 1, (int[])minor.Clone()));
                e[i * n + j] = (i + j) % 2 == 0 ? cofactor : _b.Negate(cofactor);
            }
        return LoweredValue.Matrix(n, n, e);
    }

    /// <summary>An order (rows or columns of id, zero): 0 up to the limit MaxMatrixOrder.</summary>
    private int Order(Expr e, string what)
    {
        var n = context.Integer(e, what);
        if (n < 0 || n > _limits.MaxMatrixOrder)
            throw new CompileError(e.Position, $"{what} is {n}; it must be between 0 and the limit MaxMatrixOrder ({_limits.MaxMatrixOrder})");
        return (int)n;
    }

    /// <summary><c>diag(a, b, …)</c>, or <c>diag(v)</c> of a row or column vector v: the square matrix with these entries on its diagonal.</summary>
    private LoweredValue Diagonal(CallExpr node)
    {
        var entries = new List<int>();
        var values = node.Arguments.Select(a => a.Accept(expressions)).ToList();
        if (values is [{ IsMatrix: true } v])
        {
            if (v.Rows != 1 && v.Columns != 1)
                throw new CompileError(node.Arguments[0].Position, $"diag of one matrix needs a row or a column vector, not {v.Describe()}");
            entries.AddRange(v.Entries!);
        }
        else
            for (var a = 0; a < values.Count; a++)
            {
                if (values[a].IsMatrix)
                    throw new CompileError(node.Arguments[a].Position, $"an argument of diag must be a scalar, but it is {values[a].Describe()}");
                entries.Add(values[a].Scalar);
            }
        var n = entries.Count;
        if (n > _limits.MaxMatrixOrder)
            throw new CompileError(node.Position, $"the matrix is {n}×{n}; the limit MaxMatrixOrder is {_limits.MaxMatrixOrder}");
        var zero = _b.Constant(Rational.Zero);
        var e = Enumerable.Repeat(zero, n * n).ToArray();
        for (var i = 0; i < n; i++) e[i * n + i] = entries[i];
        return LoweredValue.Matrix(n, n, e);
    }

    /// <summary><c>submatrix(M, ROWS, COLUMNS)</c>: the rows and columns listed, in the order given (indices from 1).</summary>
    private LoweredValue Submatrix(CallExpr node)
    {
        var m = expressions.MatrixOf(node.Arguments[0], $"{node.Function}'s first argument");
        var rows = Indices(node.Arguments[1], m.Rows, "row");
        var columns = Indices(node.Arguments[2], m.Columns, "column");
        var e = new int[rows.Count * columns.Count];
        for (var i = 0; i < rows.Count; i++)
            for (var j = 0; j < columns.Count; j++) e[i * columns.Count + j] = m[rows[i], columns[j]];
        return LoweredValue.Matrix(rows.Count, columns.Count, e);
    }

    /// <summary>The 0-based indices of an index list <c>[1, 3..n]</c>, each checked against the matrix's size.</summary>
    private List<int> Indices(Expr list, int size, string what)
    {
        if (list is not CallExpr { Function: Builtins.IndexList } call)
            throw new CompileError(list.Position, $"expected a list of {what} indices such as [1, 3..n]");
        var result = new List<int>();
        foreach (var item in call.Arguments)
        {
            BigInteger from, to;
            if (item is CallExpr { Function: Builtins.Range } range)
            {
                from = context.Integer(range.Arguments[0], "a range start");
                to = context.Integer(range.Arguments[1], "a range end");
            }
            else from = to = context.Integer(item, $"a {what} index");
            for (var k = from; k <= to; k++)
            {
                if (k < 1 || k > size)
                    throw new CompileError(item.Position, $"the {what} index {k} is outside 1..{size}");
                if (result.Count >= _limits.MaxMatrixOrder)
                    throw new CompileError(item.Position, $"the list has more than {_limits.MaxMatrixOrder} {what}s (the limit MaxMatrixOrder)");
                result.Add((int)k - 1);
            }
        }
        return result;
    }
}
