using System.Numerics;
using IdentityQueue.Algebra.Fields;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Tests.Reference;

/// <summary>A value met while interpreting: a field element or a matrix of field elements (at least 1×1). Immutable by convention.</summary>
public sealed class FieldValue<T> where T : struct
{
    private readonly T _scalar;
    private readonly T[,]? _matrix;

    private FieldValue(T scalar, T[,]? matrix)
    {
        _scalar = scalar;
        _matrix = matrix;
    }

    public static FieldValue<T> FromScalar(T value) => new(value, null);

    public static FieldValue<T> FromMatrix(T[,] entries) =>
        entries.GetLength(0) == 0 || entries.GetLength(1) == 0 ? throw new ReferenceException("a matrix needs at least one row and one column") : new(default, entries);

    public bool IsMatrix => _matrix is not null;

    public T Scalar => _matrix is null ? _scalar : throw new InvalidOperationException("the value is a matrix");

    /// <summary>The entries (do not modify them).</summary>
    public T[,] Matrix => _matrix ?? throw new InvalidOperationException("the value is a scalar");

    public int Rows => _matrix?.GetLength(0) ?? 1;
    public int Columns => _matrix?.GetLength(1) ?? 1;

    /// <summary>The scalar, or the matrix entries row by row.</summary>
    public IEnumerable<T> Entries => _matrix is null ? [_scalar] : _matrix.Cast<T>();

    public override string ToString() =>
        _matrix is null ? _scalar.ToString()! : "[" + string.Join(", ", Enumerable.Range(0, Rows).Select(i => "[" + string.Join(", ", Enumerable.Range(0, Columns).Select(j => _matrix[i, j].ToString())) + "]")) + "]";
}

/// <summary>The outcome of interpreting at a point: a value, or "undefined" (a denominator vanished) with the reason.</summary>
public readonly record struct InterpreterResult<T>(FieldValue<T>? Value, string? UndefinedReason) where T : struct
{
    public static InterpreterResult<T> Defined(FieldValue<T> value) => new(value, null);

    public static InterpreterResult<T> Undefined(string reason) => new(null, reason);

    public bool IsUndefined => Value is null;

    /// <summary>The scalar value; throws when undefined or a matrix.</summary>
    public T Scalar => (Value ?? throw new InvalidOperationException($"undefined: {UndefinedReason}")).Scalar;
}

/// <summary>
/// Evaluates an expression at one point of a field by walking the tree, with the semantics of SPEC §3 and of
/// <see cref="PolynomialExpander"/>, plus division by anything: a zero divisor (or k! ≡ 0 in binom) makes the
/// result undefined rather than throwing. det is by Gaussian elimination, perm by the Leibniz expansion (small
/// orders), pf by expansion along the first row. Invalid input throws <see cref="ReferenceException"/>.
/// Not thread-safe (the parameter environment changes during a walk).
/// </summary>
public sealed class TreeInterpreter<TField, T> : IExprVisitor<FieldValue<T>>
    where TField : struct, IField<T>
    where T : struct
{
    private readonly TField _field;
    private readonly IReadOnlyDictionary<string, T> _point;
    private readonly Dictionary<string, BigInteger> _environment;

    /// <param name="field">The field.</param>
    /// <param name="point">A value for every variable (evaluated names: <c>x</c>, <c>x[3]</c>, <c>a[1,2]</c>).</param>
    /// <param name="parameters">Family parameters (none by default).</param>
    public TreeInterpreter(TField field, IReadOnlyDictionary<string, T> point, IReadOnlyDictionary<string, BigInteger>? parameters = null)
    {
        _field = field;
        _point = point;
        _environment = parameters is null ? [] : new Dictionary<string, BigInteger>(parameters);
    }

    /// <summary>The value of an expression, or undefined.</summary>
    public InterpreterResult<T> Evaluate(Expr expression)
    {
        try
        {
            return InterpreterResult<T>.Defined(expression.Accept(this));
        }
        catch (UndefinedException e)
        {
            return InterpreterResult<T>.Undefined(e.Message);
        }
    }

    /// <summary>lhs − rhs (entrywise for matrices), or undefined when either side is.</summary>
    public InterpreterResult<T> EvaluateDifference(Expr lhs, Expr rhs)
    {
        try
        {
            var left = lhs.Accept(this);
            var right = rhs.Accept(this);
            if (left.IsMatrix != right.IsMatrix) throw new ReferenceException("one side of the identity is a matrix and the other a scalar");
            return InterpreterResult<T>.Defined(Combine(left, right, "-", _field.Subtract));
        }
        catch (UndefinedException e)
        {
            return InterpreterResult<T>.Undefined(e.Message);
        }
    }

    /// <summary>True when every entry of the value is zero.</summary>
    public bool IsZero(FieldValue<T> value) => value.Entries.All(_field.IsZero);

    public FieldValue<T> VisitInteger(IntegerLiteral node) => Scalar(_field.FromInteger(node.Value));

    public FieldValue<T> VisitName(NameRef node)
    {
        if (_environment.TryGetValue(node.Name, out var parameter)) return Scalar(_field.FromInteger(parameter));
        return _point.TryGetValue(node.Name, out var value) ? Scalar(value) : throw new ReferenceException($"no value for the variable {node.Name}");
    }

    public FieldValue<T> VisitIndexed(IndexedName node)
    {
        var name = PolynomialExpander.IndexedVariableName(node, _environment);
        return _point.TryGetValue(name, out var value) ? Scalar(value) : throw new ReferenceException($"no value for the variable {name}");
    }

    public FieldValue<T> VisitUnary(UnaryExpr node) => Map(node.Operand.Accept(this), _field.Negate);

    public FieldValue<T> VisitSum(SumExpr node)
    {
        var acc = node.Terms[0].Value.Accept(this);
        foreach (var term in node.Terms.Skip(1))
            acc = term.Subtract ? Combine(acc, term.Value.Accept(this), "-", _field.Subtract) : Combine(acc, term.Value.Accept(this), "+", _field.Add);
        return acc;
    }

    public FieldValue<T> VisitProduct(ProductExpr node)
    {
        var a = node.Factors[0].Value.Accept(this);
        foreach (var factor in node.Factors.Skip(1))
        {
            var b = factor.Value.Accept(this);
            if (factor.Divide)
            {
                if (a.IsMatrix || b.IsMatrix) throw new ReferenceException($"'/' on a matrix at {factor.OperatorPosition}");
                if (!_field.TryInvert(b.Scalar, out var inverse)) throw new UndefinedException($"division by zero at {factor.OperatorPosition}");
                a = Scalar(_field.Multiply(a.Scalar, inverse));
            }
            else if (!a.IsMatrix && !b.IsMatrix) a = Scalar(_field.Multiply(a.Scalar, b.Scalar));
            else if (!a.IsMatrix)
            {
                var s = a.Scalar;
                a = Map(b, x => _field.Multiply(s, x));
            }
            else if (!b.IsMatrix) a = Map(a, x => _field.Multiply(x, b.Scalar));
            else a = FieldValue<T>.FromMatrix(MatrixProduct(a.Matrix, b.Matrix));
        }
        return a;
    }

    public FieldValue<T> VisitBinary(BinaryExpr node)
    {
        if (Builtins.IsComparison(node.Operator)) return Scalar(_field.FromInteger(ParameterEvaluator.Evaluate(node, _environment)));
        var baseValue = node.Left.Accept(this);
        var e = ParameterEvaluator.Evaluate(node.Right, _environment);
        if (e.Sign < 0)
        {
            // b^(−e) = (1/b)^e: a reciprocal, undefined where b vanishes.
            if (baseValue.IsMatrix) throw new ReferenceException($"negative exponent {e} of a matrix at {node.OperatorPosition}");
            if (!_field.TryInvert(baseValue.Scalar, out var reciprocal)) throw new UndefinedException($"0 to a negative power at {node.OperatorPosition}");
            return Scalar(Power(reciprocal, -e));
        }
        if (!baseValue.IsMatrix) return Scalar(Power(baseValue.Scalar, e));
        var m = RequireSquare(baseValue, "a matrix power");
        var result = IdentityMatrix(m.GetLength(0));
        var square = m;
        while (!e.IsZero)
        {
            if (!e.IsEven) result = MatrixProduct(result, square);
            e >>= 1;
            if (!e.IsZero) square = MatrixProduct(square, square);
        }
        return FieldValue<T>.FromMatrix(result);
    }

    public FieldValue<T> VisitCall(CallExpr node)
    {
        if (!Builtins.Arity.TryGetValue(node.Function, out var arity)) throw new ReferenceException($"unknown function {node.Function}");
        if (node.Arguments.Count < arity.Min || node.Arguments.Count > arity.Max) throw new ReferenceException($"{node.Function} takes {arity} argument(s)");
        var args = node.Arguments;
        switch (node.Function)
        {
            case Builtins.Binom:
            {
                var k = Parameter(args[1], "binom's k", int.MinValue, ReferenceLimits.MaxFunctionArgument);
                if (k < 0) return Scalar(_field.Zero);
                var a = ScalarOf(args[0]);
                var product = _field.One;
                var factorial = _field.One;
                for (var i = 0; i < k; i++)
                {
                    product = _field.Multiply(product, _field.Subtract(a, _field.FromInteger(i)));
                    factorial = _field.Multiply(factorial, _field.FromInteger(i + 1));
                }
                if (!_field.TryInvert(factorial, out var inverse)) throw new UndefinedException($"binom's k! = {k}! vanishes in this field (at {node.Position})");
                return Scalar(_field.Multiply(product, inverse));
            }
            case Builtins.Fact:
            {
                var n = Parameter(args[0], "fact's argument", 0, ReferenceLimits.MaxFunctionArgument);
                var product = _field.One;
                for (var i = 2; i <= n; i++) product = _field.Multiply(product, _field.FromInteger(i));
                return Scalar(product);
            }
            case Builtins.QInt:
                return Scalar(QInt(Parameter(args[0], "qint's n", 0, ReferenceLimits.MaxFunctionArgument), ScalarOf(args[1])));
            case Builtins.QFact:
            {
                var n = Parameter(args[0], "qfact's n", 0, ReferenceLimits.MaxFunctionArgument);
                var q = ScalarOf(args[1]);
                var product = _field.One;
                for (var i = 1; i <= n; i++) product = _field.Multiply(product, QInt(i, q));
                return Scalar(product);
            }
            case Builtins.QBinom:
            {
                var n = Parameter(args[0], "qbinom's n", 0, ReferenceLimits.MaxFunctionArgument);
                var k = Parameter(args[1], "qbinom's k", int.MinValue, int.MaxValue);
                var q = ScalarOf(args[2]);
                if (k < 0 || k > n) return Scalar(_field.Zero);
                var row = new T[k + 1];
                row[0] = _field.One;
                for (var j = 1; j <= k; j++) row[j] = _field.Zero;
                var qPowers = new T[k + 1];
                qPowers[0] = _field.One;
                for (var j = 1; j <= k; j++) qPowers[j] = _field.Multiply(qPowers[j - 1], q);
                for (var m = 1; m <= n; m++)
                    for (var j = Math.Min(m, k); j >= 1; j--)
                        row[j] = _field.MultiplyAdd(qPowers[j], row[j], row[j - 1]);
                return Scalar(row[k]);
            }
            case Builtins.Det: return Scalar(Determinant(RequireSquare(args[0].Accept(this), "det")));
            case Builtins.Permanent: return Scalar(Permanent(RequireSquare(args[0].Accept(this), "perm")));
            case Builtins.Pfaffian: return Scalar(Pfaffian(RequireSquare(args[0].Accept(this), "pf")));
            case Builtins.Trace:
            {
                var m = RequireSquare(args[0].Accept(this), "tr");
                var sum = _field.Zero;
                for (var i = 0; i < m.GetLength(0); i++) sum = _field.Add(sum, m[i, i]);
                return Scalar(sum);
            }
            case Builtins.Transpose:
            {
                var v = args[0].Accept(this);
                if (!v.IsMatrix) throw new ReferenceException($"transpose of a scalar at {node.Position}");
                var m = v.Matrix;
                var t = new T[m.GetLength(1), m.GetLength(0)];
                for (var i = 0; i < m.GetLength(0); i++)
                    for (var j = 0; j < m.GetLength(1); j++)
                        t[j, i] = m[i, j];
                return FieldValue<T>.FromMatrix(t);
            }
            case Builtins.Identity:
                return FieldValue<T>.FromMatrix(IdentityMatrix(Parameter(args[0], "id's order", 1, ReferenceLimits.MaxRangeLength)));
            case Builtins.When:
                return ParameterEvaluator.Evaluate(args[0], _environment).IsZero ? args[2].Accept(this) : args[1].Accept(this);
            case Builtins.Min or Builtins.Max or Builtins.Floor or Builtins.Ceil or Builtins.Mod or Builtins.Gcd or Builtins.Abs
                or Builtins.Delta or Builtins.Iverson:
                return Scalar(_field.FromInteger(ParameterEvaluator.Evaluate(node, _environment)));
            default:
                throw new ReferenceException($"unknown function {node.Function}");
        }
    }

    public FieldValue<T> VisitBound(BoundExpr node)
    {
        FieldValue<T>? result = null;
        foreach (var _ in Range(node.Variable, node.From, node.To))
        {
            var body = node.Body.Accept(this);
            if (result is null) result = body;
            else if (node.Kind == BoundKind.Sum) result = Combine(result, body, "+", _field.Add);
            else if (!result.IsMatrix && !body.IsMatrix) result = Scalar(_field.Multiply(result.Scalar, body.Scalar));
            else if (result.IsMatrix && body.IsMatrix) result = FieldValue<T>.FromMatrix(MatrixProduct(result.Matrix, body.Matrix));
            else throw new ReferenceException($"the prod at {node.Position} mixes matrices and scalars");
        }
        // An empty range: 0 for sum, 1 for prod (a matrix body would be an error, but an empty range cannot tell).
        return result ?? Scalar(node.Kind == BoundKind.Sum ? _field.Zero : _field.One);
    }

    public FieldValue<T> VisitMatrixComprehension(MatrixComprehension node)
    {
        var rows = new List<List<T>>();
        foreach (var _ in Range(node.RowVariable, node.RowFrom, node.RowTo))
        {
            var row = new List<T>();
            foreach (var __ in Range(node.ColumnVariable, node.ColumnFrom, node.ColumnTo)) row.Add(ScalarOf(node.Body));
            rows.Add(row);
        }
        if (rows.Count == 0 || rows[0].Count == 0) throw new ReferenceException($"the matrix comprehension at {node.Position} has an empty range");
        if (rows.Any(r => r.Count != rows[0].Count)) throw new ReferenceException($"the rows of the matrix comprehension at {node.Position} have different lengths");
        var m = new T[rows.Count, rows[0].Count];
        for (var i = 0; i < rows.Count; i++)
            for (var j = 0; j < rows[0].Count; j++)
                m[i, j] = rows[i][j];
        return FieldValue<T>.FromMatrix(m);
    }

    public FieldValue<T> VisitMatrixLiteral(MatrixLiteral node)
    {
        if (node.Rows.Count == 0 || node.Rows[0].Count == 0) throw new ReferenceException($"empty matrix literal at {node.Position}");
        var columns = node.Rows[0].Count;
        if (node.Rows.Any(r => r.Count != columns)) throw new ReferenceException($"the rows of the matrix literal at {node.Position} have different lengths");
        var m = new T[node.Rows.Count, columns];
        for (var i = 0; i < node.Rows.Count; i++)
            for (var j = 0; j < columns; j++)
                m[i, j] = ScalarOf(node.Rows[i][j]);
        return FieldValue<T>.FromMatrix(m);
    }

    // ---- helpers ----

    private static FieldValue<T> Scalar(T value) => FieldValue<T>.FromScalar(value);

    private T ScalarOf(Expr expression)
    {
        var v = expression.Accept(this);
        return v.IsMatrix ? throw new ReferenceException($"a matrix at {expression.Position} where a scalar is needed") : v.Scalar;
    }

    private int Parameter(Expr expression, string what, int min, int max) => ParameterEvaluator.EvaluateInt(expression, _environment, min, max, what);

    private T Power(T x, BigInteger e)
    {
        var result = _field.One;
        var square = x;
        while (!e.IsZero)
        {
            if (!e.IsEven) result = _field.Multiply(result, square);
            e >>= 1;
            if (!e.IsZero) square = _field.Multiply(square, square);
        }
        return result;
    }

    private T QInt(int n, T q)
    {
        var sum = _field.Zero;
        var power = _field.One;
        for (var i = 0; i < n; i++)
        {
            sum = _field.Add(sum, power);
            power = _field.Multiply(power, q);
        }
        return sum;
    }

    private static FieldValue<T> Map(FieldValue<T> v, Func<T, T> f)
    {
        if (!v.IsMatrix) return Scalar(f(v.Scalar));
        var m = v.Matrix;
        var r = new T[m.GetLength(0), m.GetLength(1)];
        for (var i = 0; i < m.GetLength(0); i++)
            for (var j = 0; j < m.GetLength(1); j++)
                r[i, j] = f(m[i, j]);
        return FieldValue<T>.FromMatrix(r);
    }

    private static FieldValue<T> Combine(FieldValue<T> a, FieldValue<T> b, string op, Func<T, T, T> f)
    {
        if (a.IsMatrix != b.IsMatrix) throw new ReferenceException($"'{op}' of a matrix and a scalar");
        if (!a.IsMatrix) return Scalar(f(a.Scalar, b.Scalar));
        if (a.Rows != b.Rows || a.Columns != b.Columns) throw new ReferenceException($"'{op}' on matrices of shapes {a.Rows}×{a.Columns} and {b.Rows}×{b.Columns}");
        var r = new T[a.Rows, a.Columns];
        for (var i = 0; i < a.Rows; i++)
            for (var j = 0; j < a.Columns; j++)
                r[i, j] = f(a.Matrix[i, j], b.Matrix[i, j]);
        return FieldValue<T>.FromMatrix(r);
    }

    private T[,] MatrixProduct(T[,] a, T[,] b)
    {
        if (a.GetLength(1) != b.GetLength(0)) throw new ReferenceException($"cannot multiply a {a.GetLength(0)}×{a.GetLength(1)} matrix by a {b.GetLength(0)}×{b.GetLength(1)} matrix");
        var r = new T[a.GetLength(0), b.GetLength(1)];
        for (var i = 0; i < a.GetLength(0); i++)
            for (var j = 0; j < b.GetLength(1); j++)
            {
                var sum = _field.Zero;
                for (var k = 0; k < a.GetLength(1); k++) sum = _field.MultiplyAdd(a[i, k], b[k, j], sum);
                r[i, j] = sum;
            }
        return r;
    }

    private T[,] IdentityMatrix(int n)
    {
        var r = new T[n, n];
        for (var i = 0; i < n; i++)
            for (var j = 0; j < n; j++)
                r[i, j] = i == j ? _field.One : _field.Zero;
        return r;
    }

    private static T[,] RequireSquare(FieldValue<T> v, string what)
    {
        if (!v.IsMatrix) throw new ReferenceException($"{what} needs a matrix, not a scalar");
        if (v.Rows != v.Columns) throw new ReferenceException($"{what} needs a square matrix, not {v.Rows}×{v.Columns}");
        return v.Matrix;
    }

    /// <summary>Gaussian elimination with a nonzero pivot per column; each row swap flips the sign.</summary>
    private T Determinant(T[,] matrix)
    {
        var n = matrix.GetLength(0);
        var a = (T[,])matrix.Clone();
        var det = _field.One;
        for (var c = 0; c < n; c++)
        {
            var pivot = -1;
            for (var r = c; r < n && pivot < 0; r++)
                if (!_field.IsZero(a[r, c])) pivot = r;
            if (pivot < 0) return _field.Zero;
            if (pivot != c)
            {
                for (var j = 0; j < n; j++) (a[c, j], a[pivot, j]) = (a[pivot, j], a[c, j]);
                det = _field.Negate(det);
            }
            det = _field.Multiply(det, a[c, c]);
            _field.TryInvert(a[c, c], out var inverse);
            for (var r = c + 1; r < n; r++)
            {
                var factor = _field.Multiply(a[r, c], inverse);
                if (_field.IsZero(factor)) continue;
                for (var j = c; j < n; j++) a[r, j] = _field.Subtract(a[r, j], _field.Multiply(factor, a[c, j]));
            }
        }
        return det;
    }

    private T Permanent(T[,] m)
    {
        var n = m.GetLength(0);
        if (n > ReferenceLimits.MaxLeibnizOrder) throw new ReferenceException($"perm of order {n} is beyond the reference limit {ReferenceLimits.MaxLeibnizOrder}");
        var sum = _field.Zero;
        foreach (var (permutation, _) in Permutations.All(n))
        {
            var term = _field.One;
            for (var i = 0; i < n; i++) term = _field.Multiply(term, m[i, permutation[i]]);
            sum = _field.Add(sum, term);
        }
        return sum;
    }

    private T Pfaffian(T[,] m)
    {
        var n = m.GetLength(0);
        if (n % 2 != 0) throw new ReferenceException($"pf needs a matrix of even order, not {n}");
        if (n > ReferenceLimits.MaxPfaffianOrder) throw new ReferenceException($"pf of order {n} is beyond the reference limit {ReferenceLimits.MaxPfaffianOrder}");
        for (var i = 0; i < n; i++)
            for (var j = i; j < n; j++)
                if (!_field.AreEqual(m[i, j], _field.Negate(m[j, i]))) throw new ReferenceException("pf needs a skew-symmetric matrix (it is not at this point)");
        return PfaffianOf(m, Enumerable.Range(0, n).ToList());
    }

    private T PfaffianOf(T[,] m, List<int> indices)
    {
        if (indices.Count == 0) return _field.One;
        var sum = _field.Zero;
        for (var t = 1; t < indices.Count; t++)
        {
            var rest = indices.Where((_, u) => u != 0 && u != t).ToList();
            var term = _field.Multiply(m[indices[0], indices[t]], PfaffianOf(m, rest));
            sum = t % 2 == 1 ? _field.Add(sum, term) : _field.Subtract(sum, term);
        }
        return sum;
    }

    /// <summary>Binds <paramref name="variable"/> to each value of A..B in turn (restoring any outer binding afterwards).</summary>
    private IEnumerable<BigInteger> Range(string variable, Expr fromExpr, Expr toExpr)
    {
        var from = ParameterEvaluator.Evaluate(fromExpr, _environment);
        var to = ParameterEvaluator.Evaluate(toExpr, _environment);
        if (to - from >= ReferenceLimits.MaxRangeLength) throw new ReferenceException($"the range {from}..{to} of {variable} is beyond the reference limit {ReferenceLimits.MaxRangeLength}");
        var hadOuter = _environment.TryGetValue(variable, out var outer);
        try
        {
            for (var v = from; v <= to; v++)
            {
                _environment[variable] = v;
                yield return v;
            }
        }
        finally
        {
            if (hadOuter) _environment[variable] = outer;
            else _environment.Remove(variable);
        }
    }

    /// <summary>Signals a vanished denominator; caught at the top and turned into an undefined result.</summary>
    private sealed class UndefinedException(string message) : Exception(message);
}
