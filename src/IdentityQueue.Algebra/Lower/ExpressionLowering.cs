using System.Numerics;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Exact;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Lower;

/// <summary>
/// The visitor that gives the expression tree its meaning, once: it lowers each node to registers of the program being
/// built (<see cref="ProgramBuilder"/>), with bound sums and products, ranges, family parameters and conditions evaluated,
/// and types (scalar or matrix of a shape) checked. The functions and matrix constructs are written out by
/// <see cref="FunctionLowering"/> and <see cref="MatrixLowering"/>, sums of written-out monomials by <see cref="MonomialSums"/>.
/// </summary>
internal sealed class ExpressionLowering : IExprVisitor<LoweredValue>
{
    private readonly LoweringContext _c;
    private readonly ProgramBuilder _b;
    private readonly MonomialSums _monomials;
    private readonly FunctionLowering _functions;
    private readonly MatrixLowering _matrices;

    public ExpressionLowering(LoweringContext context)
    {
        _c = context;
        _b = context.Builder;
        _monomials = new MonomialSums(context);
        _functions = new FunctionLowering(context, this);
        _matrices = new MatrixLowering(context, this);
    }

    /// <summary>
    /// The program of lhs − rhs (entrywise for matrices, after the side conditions), and the shape of the sides: null for
    /// scalars, (rows, columns) for matrices (0×0 included).
    /// </summary>
    public (StraightLineProgram Program, (int Rows, int Columns)? Shape) LowerDifference(Expr left, Expr right)
    {
        _c.Side = "lhs";
        var l = left.Accept(this);
        _c.Side = "rhs";
        var r = right.Accept(this);
        _c.Side = null;
        if (!l.IsMatrix && !r.IsMatrix)
        {
            var d = _b.RawSubtract(l.Scalar, r.Scalar);
            return (Build([d], []), null);
        }
        // A matrix compared with the literal 0 means the zero matrix.
        if (!r.IsMatrix && IsLiteralZero(right)) r = _matrices.ZeroMatrix(l.Rows, l.Columns);
        if (!l.IsMatrix && IsLiteralZero(left)) l = _matrices.ZeroMatrix(r.Rows, r.Columns);
        if (l.IsMatrix != r.IsMatrix || l.Rows != r.Rows || l.Columns != r.Columns)
            throw new CompileError(right.Position, $"the two sides differ in type: the left is {l.Describe()}, the right is {r.Describe()}");
        var outputs = new int[l.Rows * l.Columns];
        var names = new string[outputs.Length];
        for (var i = 0; i < l.Rows; i++)
            for (var j = 0; j < l.Columns; j++)
            {
                outputs[i * l.Columns + j] = _b.RawSubtract(l[i, j], r[i, j]);
                names[i * l.Columns + j] = $"[{i + 1},{j + 1}]";
            }
        // Two 0×0 matrices (or 0×n) are equal: the identity is 0 = 0, decided exactly.
        if (outputs.Length == 0) return (Build([_b.RawSubtract(_b.Constant(Rational.Zero), _b.Constant(Rational.Zero))], []), (l.Rows, l.Columns));
        return (Build(outputs, names), (l.Rows, l.Columns));
    }

    private StraightLineProgram Build(int[] outputs, string[] names) =>
        _c.Conditions.Count == 0 ? _b.Build(outputs, names)
            : _b.Build([.. _c.Conditions.Select(c => c.Register), .. outputs], names, [.. _c.Conditions.Select(c => c.Name)]);

    private static bool IsLiteralZero(Expr e) => e is IntegerLiteral { Value.IsZero: true };

    public int ScalarOf(Expr e, string role)
    {
        var v = e.Accept(this);
        if (v.IsMatrix) throw new CompileError(e.Position, $"{role} must be a scalar, but it is {v.Describe()}");
        return v.Scalar;
    }

    public LoweredValue MatrixOf(Expr e, string role)
    {
        var v = e.Accept(this);
        if (!v.IsMatrix) throw new CompileError(e.Position, $"{role} must be a matrix, but it is a scalar");
        return v;
    }

    public LoweredValue VisitInteger(IntegerLiteral node)
    {
        _c.Step(node);
        return LoweredValue.Of(_b.Constant(node.Value));
    }

    public LoweredValue VisitName(NameRef node) => LoweredValue.Of(_c.Name(node));

    public LoweredValue VisitIndexed(IndexedName node)
    {
        _c.Step(node);
        if (_c.Scope.ContainsKey(node.Name))
            throw new CompileError(node.Position, $"'{node.Name}' is an integer parameter here and cannot be indexed");
        var indices = new string[node.Indices.Count];
        for (var i = 0; i < indices.Length; i++) indices[i] = _c.Integer(node.Indices[i], "an index").ToString();
        return LoweredValue.Of(_b.Variable($"{node.Name}[{string.Join(',', indices)}]"));
    }

    public LoweredValue VisitUnary(UnaryExpr node)
    {
        _c.Step(node);
        var v = node.Operand.Accept(this);
        return Map(v, _b.Negate);
    }

    public static LoweredValue Map(LoweredValue v, Func<int, int> f)
    {
        if (!v.IsMatrix) return LoweredValue.Of(f(v.Scalar));
        var e = new int[v.Entries!.Length];
        for (var i = 0; i < e.Length; i++) e[i] = f(v.Entries[i]);
        return LoweredValue.Matrix(v.Rows, v.Columns, e);
    }

    /// <summary>
    /// A sum, left to right. Its terms that are monomials written out are lowered together first (<see cref="MonomialSums"/>);
    /// other terms are lowered as they are.
    /// </summary>
    public LoweredValue VisitSum(SumExpr node)
    {
        _c.Step(node);
        var terms = node.Terms;
        var monomials = new MonomialSums.Monomial?[terms.Count];
        var registers = new Dictionary<string, int>(StringComparer.Ordinal);
        var built = _monomials.BuildMonomials(terms, monomials, registers);
        if (built && monomials.All(m => m is not null)) return LoweredValue.Of(_monomials.SumOfMonomials(terms, monomials!, registers));
        LoweredValue? acc = null;
        for (var i = 0; i < terms.Count; i++)
        {
            var term = terms[i];
            LoweredValue value;
            if (built && monomials[i] is { } m)
            {
                _c.Step(term.Value);
                var coefficient = _b.Constant(m.Coefficient);
                value = LoweredValue.Of(m.Key.Length == 0 ? coefficient : _b.Multiply(registers[m.Key], coefficient));
            }
            else value = term.Value.Accept(this);
            acc = acc is null ? value : AddOrSubtract(acc.Value, value, term.OperatorPosition, term.Subtract);
        }
        return acc!.Value;
    }

    /// <summary>
    /// Left to right, except that scalar constant factors are folded together and multiplied in last: <c>3*x^2*y</c> and
    /// <c>5*x^2*y*z</c> then share <c>x^2*y</c> (hash-consing), which keeps an expanded polynomial's program small.
    /// Scalars commute with everything, so the value is the same.
    /// </summary>
    public LoweredValue VisitProduct(ProductExpr node)
    {
        _c.Step(node);
        LoweredValue? acc = null;
        var constant = -1; // the register of the constant factors' product, or none
        foreach (var factor in node.Factors)
        {
            var value = factor.Value.Accept(this);
            if (!value.IsMatrix && _b.TryGetConstant(value.Scalar, out var c))
            {
                if (factor.Divide && c.IsZero) throw new CompileError(factor.OperatorPosition, "division by zero");
                var register = factor.Divide ? _b.Invert(value.Scalar) : value.Scalar;
                constant = constant < 0 ? register : _b.Multiply(constant, register);
                continue;
            }
            if (acc is null) acc = factor.Divide ? Divide(LoweredValue.Of(_b.Constant(Rational.One)), value, factor) : value;
            else acc = factor.Divide ? Divide(acc.Value, value, factor) : Multiply(acc.Value, value, factor.OperatorPosition);
        }
        if (acc is null) return LoweredValue.Of(constant);
        return constant < 0 ? acc.Value : Multiply(acc.Value, LoweredValue.Of(constant), node.Position);
    }

    public LoweredValue VisitBinary(BinaryExpr node)
    {
        _c.Step(node);
        // A comparison (a hand-built tree may hold one outside iverson/when) is 1 or 0.
        if (Builtins.IsComparison(node.Operator)) return LoweredValue.Of(_b.Constant(_c.Exact(node, "a condition")));
        return Power(node);
    }

    private LoweredValue AddOrSubtract(LoweredValue l, LoweredValue r, SourcePosition at, bool subtract)
    {
        var verb = subtract ? "subtract" : "add";
        if (!l.IsMatrix && !r.IsMatrix)
            return LoweredValue.Of(subtract ? _b.Subtract(l.Scalar, r.Scalar) : _b.Add(l.Scalar, r.Scalar));
        if (l.IsMatrix != r.IsMatrix || l.Rows != r.Rows || l.Columns != r.Columns)
            throw new CompileError(at, subtract
                ? $"cannot subtract {r.Describe()} from {l.Describe()}"
                : $"cannot {verb} {l.Describe()} and {r.Describe()}");
        var e = new int[l.Entries!.Length];
        for (var i = 0; i < e.Length; i++)
            e[i] = subtract ? _b.Subtract(l.Entries[i], r.Entries![i]) : _b.Add(l.Entries[i], r.Entries![i]);
        return LoweredValue.Matrix(l.Rows, l.Columns, e);
    }

    private LoweredValue Multiply(LoweredValue l, LoweredValue r, SourcePosition at)
    {
        if (!l.IsMatrix && !r.IsMatrix) return LoweredValue.Of(_b.Multiply(l.Scalar, r.Scalar));
        if (!l.IsMatrix) return Map(r, x => _b.Multiply(l.Scalar, x));
        if (!r.IsMatrix) return Map(l, x => _b.Multiply(x, r.Scalar));
        if (l.Columns != r.Rows)
            throw new CompileError(at, $"cannot multiply {l.Describe()} by {r.Describe()}: the inner dimensions differ");
        var e = new int[l.Rows * r.Columns];
        for (var i = 0; i < l.Rows; i++)
            for (var j = 0; j < r.Columns; j++)
            {
                var acc = l.Columns == 0 ? _b.Constant(Rational.Zero) : _b.Multiply(l[i, 0], r[0, j]);
                for (var k = 1; k < l.Columns; k++) acc = _b.Add(acc, _b.Multiply(l[i, k], r[k, j]));
                e[i * r.Columns + j] = acc;
            }
        return LoweredValue.Matrix(l.Rows, r.Columns, e);
    }

    private LoweredValue Divide(LoweredValue l, LoweredValue r, ProductFactor divisor)
    {
        if (r.IsMatrix) throw new CompileError(divisor.Value.Position, $"cannot divide by a matrix ({r.Describe()})");
        if (_b.TryGetConstant(r.Scalar, out var c) && c.IsZero)
            throw new CompileError(divisor.OperatorPosition, "division by zero");
        var inverse = _b.Invert(r.Scalar);
        return Map(l, x => _b.Multiply(x, inverse));
    }

    private LoweredValue Power(BinaryExpr node)
    {
        var b = node.Left.Accept(this);
        var e = _c.Integer(node.Right, "an exponent");
        var bits = BigInteger.Abs(e).GetBitLength();
        if (bits > _c.Limits.MaxExponentBits)
            throw new CompileError(node.Right.Position, $"the exponent has {bits} bits; the limit MaxExponentBits is {_c.Limits.MaxExponentBits}");
        if (e.Sign < 0)
        {
            // A negative exponent is a reciprocal, b^e = 1/b^(−e), undefined only where b vanishes (an Invert instruction: such a
            // point is resampled). The bounds follow from the rules for Power and Invert.
            if (b.IsMatrix) throw new CompileError(node.Right.Position, $"the exponent is {e}; a matrix has only non-negative integer powers");
            if (_b.TryGetConstant(b.Scalar, out var c) && c.IsZero)
                throw new CompileError(node.OperatorPosition, $"0 raised to the negative power {e}");
            return LoweredValue.Of(_b.Invert(_b.Power(b.Scalar, -e)));
        }
        if (!b.IsMatrix) return LoweredValue.Of(_b.Power(b.Scalar, e));
        if (b.Rows != b.Columns) throw new CompileError(node.Left.Position, $"only a square matrix has powers, not {b.Describe()}");
        var result = _matrices.Identity(b.Rows);
        var square = b;
        while (!e.IsZero)
        {
            if (!e.IsEven) result = Multiply(result, square, node.OperatorPosition);
            e >>= 1;
            if (!e.IsZero) square = Multiply(square, square, node.OperatorPosition);
        }
        return result;
    }

    public LoweredValue VisitCall(CallExpr node)
    {
        _c.Step(node);
        var args = node.Arguments;
        switch (node.Function)
        {
            case Builtins.Fact:
                return LoweredValue.Of(_functions.Factorial(node));
            case Builtins.Binom:
                return LoweredValue.Of(_functions.Binomial(node));
            case Builtins.QInt:
                return LoweredValue.Of(_functions.QInteger(node));
            case Builtins.QFact:
                return LoweredValue.Of(_functions.QFactorial(node));
            case Builtins.QBinom:
                return LoweredValue.Of(_functions.QBinomial(node));
            case Builtins.When:
                // The condition is decided once the parameters are fixed; only the chosen branch is lowered.
                return _c.Exact(args[0], "when's condition").IsZero ? args[2].Accept(this) : args[1].Accept(this);
            default:
                if (_matrices.Call(node) is { } matrix) return matrix;
                // The integer and number functions of integer arguments are exact constants once the parameters are fixed, so their
                // degree is 0 and their height that of the constant (the rule for Constant).
                if (Builtins.ParameterFunctions.Contains(node.Function)) return LoweredValue.Of(_b.Constant(_c.Exact(node, $"an argument of {node.Function}")));
                throw new CompileError(node.Position, $"unknown function '{node.Function}'");
        }
    }

    public LoweredValue VisitBound(BoundExpr node)
    {
        _c.Step(node);
        IEnumerable<BigInteger> values;
        var scope = _c.Scope;
        var infiniteFrom = SeriesValuation.IsInfinity(node.From, scope, negative: true);
        var infiniteTo = SeriesValuation.IsInfinity(node.To, scope, negative: false);
        if (infiniteFrom || infiniteTo)
        {
            if (_c.Series is not { } s)
                throw new CompileError(node.Position, $"an infinite range needs a truncated power series entry: add 'up to q^N' (q the series variable) after the right side");
            if (_c.Shared is not null) _c.ParameterFixesStructure = true;
            values = SeriesValuation.Terms(node, infiniteFrom ? null : _c.Integer(node.From, "a range start"),
                infiniteTo ? null : _c.Integer(node.To, "a range end"), scope, s.Variable, s.Order, _c.Limits);
        }
        else
        {
            var from = _c.Integer(node.From, "a range start");
            var to = _c.Integer(node.To, "a range end");
            if (to - from + 1 > _c.Limits.MaxProgramSize)
                throw new CompileError(node.Position, $"the range {from}..{to} has more than {_c.Limits.MaxProgramSize} terms (the limit MaxProgramSize)");
            values = Range(from, to);
        }
        var saved = scope.TryGetValue(node.Variable, out var outer);
        var shadowed = _c.Shadow(node.Variable);
        LoweredValue? acc = null;
        try
        {
            foreach (var k in values)
            {
                scope[node.Variable] = k;
                LoweredValue term;
                try
                {
                    term = node.Body.Accept(this);
                }
                catch (CompileError e)
                {
                    e.Bindings.Add((node.Variable, k));
                    throw;
                }
                acc = acc is null ? term
                    : node.Kind == BoundKind.Sum ? AddOrSubtract(acc.Value, term, node.Body.Position, subtract: false)
                    : Multiply(acc.Value, term, node.Position);
            }
        }
        finally
        {
            if (saved) scope[node.Variable] = outer; else scope.Remove(node.Variable);
            _c.Unshadow(node.Variable, shadowed);
        }
        return acc ?? LoweredValue.Of(_b.Constant(node.Kind == BoundKind.Sum ? Rational.Zero : Rational.One));
    }

    private static IEnumerable<BigInteger> Range(BigInteger from, BigInteger to)
    {
        for (var k = from; k <= to; k++) yield return k;
    }

    public LoweredValue VisitMatrixComprehension(MatrixComprehension node)
    {
        _c.Step(node);
        var r0 = _c.Integer(node.RowFrom, "a range start");
        var r1 = _c.Integer(node.RowTo, "a range end");
        var c0 = _c.Integer(node.ColumnFrom, "a range start");
        var c1 = _c.Integer(node.ColumnTo, "a range end");
        var rows = r1 - r0 + 1;
        var columns = c1 - c0 + 1;
        // An empty range gives no rows (or columns): 0×0 matrices have det = pf = perm = 1.
        if (rows < 0) rows = 0;
        if (columns < 0) columns = 0;
        var max = _c.Limits.MaxMatrixOrder;
        if (rows > max || columns > max)
            throw new CompileError(node.Position, $"the matrix is {rows}×{columns}; the limit MaxMatrixOrder is {max}");
        var e = new int[(int)rows * (int)columns];
        var scope = _c.Scope;
        var savedRow = scope.TryGetValue(node.RowVariable, out var outerRow);
        var savedColumn = scope.TryGetValue(node.ColumnVariable, out var outerColumn);
        var shadowedRow = _c.Shadow(node.RowVariable);
        var shadowedColumn = _c.Shadow(node.ColumnVariable);
        try
        {
            for (var i = 0; i < (int)rows; i++)
                for (var j = 0; j < (int)columns; j++)
                {
                    scope[node.RowVariable] = r0 + i;
                    scope[node.ColumnVariable] = c0 + j;
                    try
                    {
                        e[i * (int)columns + j] = ScalarOf(node.Body, "a matrix entry");
                    }
                    catch (CompileError error)
                    {
                        error.Bindings.Add((node.ColumnVariable, c0 + j));
                        error.Bindings.Add((node.RowVariable, r0 + i));
                        throw;
                    }
                }
        }
        finally
        {
            if (savedRow) scope[node.RowVariable] = outerRow; else scope.Remove(node.RowVariable);
            if (savedColumn) scope[node.ColumnVariable] = outerColumn; else scope.Remove(node.ColumnVariable);
            _c.Unshadow(node.RowVariable, shadowedRow);
            _c.Unshadow(node.ColumnVariable, shadowedColumn);
        }
        return LoweredValue.Matrix((int)rows, (int)columns, e);
    }

    public LoweredValue VisitMatrixLiteral(MatrixLiteral node)
    {
        _c.Step(node);
        var rows = node.Rows.Count;
        var columns = node.Rows[0].Count;
        var max = _c.Limits.MaxMatrixOrder;
        if (rows > max || columns > max)
            throw new CompileError(node.Position, $"the matrix is {rows}×{columns}; the limit MaxMatrixOrder is {max}");
        var e = new int[rows * columns];
        for (var i = 0; i < rows; i++)
        {
            if (node.Rows[i].Count != columns)
                throw new CompileError(node.Rows[i].Count > 0 ? node.Rows[i][0].Position : node.Position, $"row {i + 1} has {node.Rows[i].Count} entries but row 1 has {columns}");
            for (var j = 0; j < columns; j++) e[i * columns + j] = ScalarOf(node.Rows[i][j], "a matrix entry");
        }
        return LoweredValue.Matrix(rows, columns, e);
    }
}
