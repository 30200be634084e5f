using System.Numerics;
using IdentityQueue.Algebra.Exact;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Tests.Reference;

/// <summary>
/// The exact expansion of one side or the difference of an identity: a polynomial for a scalar identity, or the
/// matrix of entrywise differences for a matrix identity.
/// </summary>
public sealed record ExpandedDifference(ReferencePolynomial? Scalar, ReferenceMatrix? Matrix)
{
    public bool IsMatrix => Matrix is not null;

    /// <summary>The scalar difference, or the matrix entries row by row.</summary>
    public IEnumerable<ReferencePolynomial> Entries => Matrix is not null ? Matrix.Entries : [Scalar!];

    /// <summary>True when the identity holds over Q (every difference expands to 0).</summary>
    public bool IsZero => Entries.All(e => e.IsZero);

    /// <summary>True when the identity holds as polynomials over GF(p) (coefficients reduced mod the prime p).</summary>
    public bool IsZeroModulo(BigInteger p) => Entries.All(e => e.ReduceModulo(p).IsZero);

    /// <summary>The largest total degree among the entries (−1 when all are zero).</summary>
    public int TotalDegree => Entries.Max(e => e.TotalDegree);

    public override string ToString() => Matrix?.ToString() ?? Scalar!.ToString();
}

/// <summary>One instance of a family line: its parameter values and the expanded difference.</summary>
public sealed record FamilyInstance(IReadOnlyDictionary<string, BigInteger> Parameters, ExpandedDifference Difference);

/// <summary>
/// Expands a scalar expression of the catalogue language into an exact <see cref="ReferencePolynomial"/>
/// (SPEC §3), with matrices handled by <see cref="ExpandMatrix"/>. A name bound in the integer-parameter
/// environment (family parameters and the bound names of sum/prod/matrix) is that integer; any other name is a
/// variable; <c>x[i]</c> becomes the variable named <c>x[3]</c> (indices evaluated, no spaces).
/// Division is handled only by a nonzero constant: this is the reference for polynomial expressions.
/// Errors throw <see cref="ReferenceException"/>. Not thread-safe (the environment changes during a walk).
/// </summary>
public sealed class PolynomialExpander : IExprVisitor<ReferencePolynomial>
{
    private readonly Dictionary<string, BigInteger> _environment;
    private readonly MatrixVisitor _matrices;

    public PolynomialExpander(IReadOnlyDictionary<string, BigInteger>? parameters = null)
    {
        _environment = parameters is null ? [] : new Dictionary<string, BigInteger>(parameters);
        _matrices = new MatrixVisitor(this);
    }

    /// <summary>Expands a scalar expression.</summary>
    public ReferencePolynomial Expand(Expr expression)
    {
        if (IsMatrixValued(expression)) throw new ReferenceException($"the expression at {expression.Position} is matrix-valued; use ExpandMatrix");
        return expression.Accept(this);
    }

    /// <summary>Expands a matrix-valued expression.</summary>
    public ReferenceMatrix ExpandMatrix(Expr expression)
    {
        if (!IsMatrixValued(expression)) throw new ReferenceException($"the expression at {expression.Position} is scalar; use Expand");
        return expression.Accept(_matrices);
    }

    /// <summary>Expands lhs − rhs (entrywise for matrices); throws when one side is a matrix and the other is not, or the shapes differ.</summary>
    public ExpandedDifference ExpandDifference(Expr lhs, Expr rhs)
    {
        var leftMatrix = IsMatrixValued(lhs);
        if (leftMatrix != IsMatrixValued(rhs)) throw new ReferenceException("one side of the identity is a matrix and the other a scalar");
        return leftMatrix
            ? new ExpandedDifference(null, ExpandMatrix(lhs).Subtract(ExpandMatrix(rhs)))
            : new ExpandedDifference(Expand(lhs) - Expand(rhs), null);
    }

    /// <summary>Expands the identity lhs = rhs under the given family parameters (none by default).</summary>
    public static ExpandedDifference ExpandIdentity(Expr lhs, Expr rhs, IReadOnlyDictionary<string, BigInteger>? parameters = null) =>
        new PolynomialExpander(parameters).ExpandDifference(lhs, rhs);

    /// <summary>
    /// Every instance of an entry, its family parameters taken in order (a range end may use the earlier
    /// parameters); a non-family entry has one instance with no parameters.
    /// </summary>
    public static IEnumerable<FamilyInstance> ExpandInstances(IdentityEntry entry)
    {
        foreach (var parameters in Instances(entry.Parameters, 0, new Dictionary<string, BigInteger>()))
            yield return new FamilyInstance(parameters, ExpandIdentity(entry.Left, entry.Right, parameters));
    }

    private static IEnumerable<IReadOnlyDictionary<string, BigInteger>> Instances(IReadOnlyList<ParameterRange> ranges, int index, Dictionary<string, BigInteger> bound)
    {
        if (index == ranges.Count)
        {
            yield return new Dictionary<string, BigInteger>(bound);
            yield break;
        }
        var range = ranges[index];
        var from = ParameterEvaluator.Evaluate(range.From, bound);
        var to = ParameterEvaluator.Evaluate(range.To, bound);
        if (to - from >= ReferenceLimits.MaxRangeLength) throw new ReferenceException($"the family range of {range.Name} is beyond the reference limit");
        for (var v = from; v <= to; v++)
        {
            bound[range.Name] = v;
            foreach (var instance in Instances(ranges, index + 1, bound)) yield return instance;
            bound.Remove(range.Name);
        }
    }

    /// <summary>
    /// Whether an expression denotes a matrix, decided from its form: matrix literals and comprehensions,
    /// transpose and id, and + − × ^ unary minus and sum/prod built on them (× is a matrix when either side is).
    /// </summary>
    public static bool IsMatrixValued(Expr expression) => expression switch
    {
        MatrixLiteral or MatrixComprehension => true,
        CallExpr c => c.Function is Builtins.Transpose or Builtins.Identity,
        UnaryExpr u => IsMatrixValued(u.Operand),
        BinaryExpr b => IsMatrixValued(b.Left),
        SumExpr s => s.Terms.Any(t => IsMatrixValued(t.Value)),
        ProductExpr p => p.Factors.Any(f => !f.Divide && IsMatrixValued(f.Value)),
        BoundExpr s => IsMatrixValued(s.Body),
        _ => false,
    };

    // ---- scalar visitor ----

    public ReferencePolynomial VisitInteger(IntegerLiteral node) => ReferencePolynomial.Constant(node.Value);

    public ReferencePolynomial VisitName(NameRef node) =>
        _environment.TryGetValue(node.Name, out var value) ? ReferencePolynomial.Constant(value) : ReferencePolynomial.Variable(node.Name);

    public ReferencePolynomial VisitIndexed(IndexedName node) => ReferencePolynomial.Variable(IndexedVariableName(node, _environment));

    /// <summary>The evaluated name of an indexed variable: <c>x[3]</c>, <c>a[1,2]</c> (no spaces).</summary>
    public static string IndexedVariableName(IndexedName node, IReadOnlyDictionary<string, BigInteger> environment) =>
        $"{node.Name}[{string.Join(",", node.Indices.Select(i => ParameterEvaluator.Evaluate(i, environment)))}]";

    public ReferencePolynomial VisitUnary(UnaryExpr node) => Scalar(node.Operand).Negate();

    public ReferencePolynomial VisitSum(SumExpr node)
    {
        if (IsMatrixValued(node)) throw new ReferenceException($"the sum at {node.Position} is matrix-valued where a scalar is needed");
        var result = Scalar(node.Terms[0].Value);
        foreach (var term in node.Terms.Skip(1)) result = term.Subtract ? result - Scalar(term.Value) : result + Scalar(term.Value);
        return result;
    }

    public ReferencePolynomial VisitProduct(ProductExpr node)
    {
        if (IsMatrixValued(node)) throw new ReferenceException($"the product at {node.Position} is matrix-valued where a scalar is needed");
        var result = Scalar(node.Factors[0].Value);
        foreach (var factor in node.Factors.Skip(1))
        {
            if (!factor.Divide)
            {
                result *= Scalar(factor.Value);
                continue;
            }
            if (!Scalar(factor.Value).TryGetConstant(out var divisor))
                throw new ReferenceException($"the reference expander handles division by constants only (the divisor at {factor.OperatorPosition} is not constant); it is meant for polynomial expressions");
            if (divisor.IsZero) throw new ReferenceException($"division by zero at {factor.OperatorPosition}");
            result = result.Scale(Rational.One / divisor);
        }
        return result;
    }

    public ReferencePolynomial VisitBinary(BinaryExpr node)
    {
        if (IsMatrixValued(node)) throw new ReferenceException($"the operation at {node.OperatorPosition} is matrix-valued where a scalar is needed");
        return Scalar(node.Left).Pow(Exponent(node.Right));
    }

    public ReferencePolynomial VisitCall(CallExpr node)
    {
        CheckArity(node);
        var args = node.Arguments;
        switch (node.Function)
        {
            case Builtins.Binom:
            {
                var k = Parameter(args[1], "binom's k", int.MinValue, ReferenceLimits.MaxFunctionArgument);
                if (k < 0) return ReferencePolynomial.Zero;
                var a = Scalar(args[0]);
                var product = ReferencePolynomial.One;
                for (var i = 0; i < k; i++) product *= a - i;
                return product.Scale(Rational.One / ParameterEvaluator.Factorial(k));
            }
            case Builtins.Fact:
                return ReferencePolynomial.Constant(ParameterEvaluator.Factorial(Parameter(args[0], "fact's argument", 0, ReferenceLimits.MaxFunctionArgument)));
            case Builtins.QInt:
                return QInt(Parameter(args[0], "qint's n", 0, ReferenceLimits.MaxFunctionArgument), Scalar(args[1]));
            case Builtins.QFact:
            {
                var n = Parameter(args[0], "qfact's n", 0, ReferenceLimits.MaxFunctionArgument);
                var q = Scalar(args[1]);
                var product = ReferencePolynomial.One;
                for (var i = 1; i <= n; i++) product *= QInt(i, q);
                return product;
            }
            case Builtins.QBinom:
                return QBinomial(
                    Parameter(args[0], "qbinom's n", 0, ReferenceLimits.MaxFunctionArgument),
                    Parameter(args[1], "qbinom's k", int.MinValue, int.MaxValue),
                    Scalar(args[2]));
            case Builtins.Det: return ExpandMatrix(args[0]).Determinant();
            case Builtins.Permanent: return ExpandMatrix(args[0]).Permanent();
            case Builtins.Pfaffian: return ExpandMatrix(args[0]).Pfaffian();
            case Builtins.Trace: return ExpandMatrix(args[0]).Trace();
            case Builtins.Transpose:
            case Builtins.Identity:
                throw new ReferenceException($"{node.Function}(...) at {node.Position} is a matrix where a scalar is needed");
            default:
                throw new ReferenceException($"unknown function {node.Function} at {node.Position}");
        }
    }

    public ReferencePolynomial VisitBound(BoundExpr node)
    {
        var result = node.Kind == BoundKind.Sum ? ReferencePolynomial.Zero : ReferencePolynomial.One;
        foreach (var _ in Range(node.Variable, node.From, node.To, allowEmpty: true))
        {
            var body = Scalar(node.Body);
            result = node.Kind == BoundKind.Sum ? result + body : result * body;
        }
        return result;
    }

    public ReferencePolynomial VisitMatrixComprehension(MatrixComprehension node) =>
        throw new ReferenceException($"the matrix at {node.Position} is not a scalar");

    public ReferencePolynomial VisitMatrixLiteral(MatrixLiteral node) =>
        throw new ReferenceException($"the matrix at {node.Position} is not a scalar");

    // ---- helpers ----

    /// <summary>qint(n, q) = 1 + q + … + q^(n−1); 0 for n = 0.</summary>
    public static ReferencePolynomial QInt(int n, ReferencePolynomial q)
    {
        var sum = ReferencePolynomial.Zero;
        var power = ReferencePolynomial.One;
        for (var i = 0; i < n; i++)
        {
            sum += power;
            power *= q;
        }
        return sum;
    }

    /// <summary>The Gaussian binomial [n, k]_q by the q-Pascal rule [n,k] = [n−1,k−1] + q^k [n−1,k]; 0 for k &lt; 0 or k &gt; n.</summary>
    public static ReferencePolynomial QBinomial(int n, int k, ReferencePolynomial q)
    {
        if (k < 0 || k > n) return ReferencePolynomial.Zero;
        // row[j] holds [m, j] for the current m, j = 0..k.
        var row = new ReferencePolynomial[k + 1];
        row[0] = ReferencePolynomial.One;
        for (var j = 1; j <= k; j++) row[j] = ReferencePolynomial.Zero;
        var qPowers = new ReferencePolynomial[k + 1];
        qPowers[0] = ReferencePolynomial.One;
        for (var j = 1; j <= k; j++) qPowers[j] = qPowers[j - 1] * q;
        for (var m = 1; m <= n; m++)
            for (var j = Math.Min(m, k); j >= 1; j--)
                row[j] = row[j - 1] + qPowers[j] * row[j];
        return row[k];
    }

    private ReferencePolynomial Scalar(Expr expression) => Expand(expression);

    private int Exponent(Expr expression) => Parameter(expression, "an exponent", 0, ReferenceLimits.MaxExponent);

    private int Parameter(Expr expression, string what, int min, int max) => ParameterEvaluator.EvaluateInt(expression, _environment, min, max, what);

    private static void CheckArity(CallExpr node)
    {
        if (!Builtins.Arity.TryGetValue(node.Function, out var arity)) throw new ReferenceException($"unknown function {node.Function} at {node.Position}");
        if (node.Arguments.Count < arity.Min || node.Arguments.Count > arity.Max) throw new ReferenceException($"{node.Function} takes {arity} argument(s), not {node.Arguments.Count} (at {node.Position})");
    }

    /// <summary>Binds <paramref name="variable"/> to each value of A..B in turn (restoring any outer binding afterwards).</summary>
    private IEnumerable<BigInteger> Range(string variable, Expr fromExpr, Expr toExpr, bool allowEmpty)
    {
        var from = ParameterEvaluator.Evaluate(fromExpr, _environment);
        var to = ParameterEvaluator.Evaluate(toExpr, _environment);
        if (to - from >= ReferenceLimits.MaxRangeLength) throw new ReferenceException($"the range {from}..{to} of {variable} is beyond the reference limit {ReferenceLimits.MaxRangeLength}");
        if (to < from && !allowEmpty) throw new ReferenceException($"the range {from}..{to} of {variable} is empty (at {fromExpr.Position})");
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

    /// <summary>The matrix-valued half of the expander; shares the parameter environment.</summary>
    private sealed class MatrixVisitor(PolynomialExpander owner) : IExprVisitor<ReferenceMatrix>
    {
        private static ReferenceException NotMatrix(Expr node) => new($"the expression at {node.Position} is a scalar where a matrix is needed");

        public ReferenceMatrix VisitInteger(IntegerLiteral node) => throw NotMatrix(node);
        public ReferenceMatrix VisitName(NameRef node) => throw NotMatrix(node);
        public ReferenceMatrix VisitIndexed(IndexedName node) => throw NotMatrix(node);

        public ReferenceMatrix VisitUnary(UnaryExpr node) => owner.ExpandMatrix(node.Operand).Negate();

        public ReferenceMatrix VisitSum(SumExpr node)
        {
            if (!node.Terms.All(t => IsMatrixValued(t.Value))) throw new ReferenceException($"'+' or '-' of a matrix and a scalar in the sum at {node.Position}");
            var result = owner.ExpandMatrix(node.Terms[0].Value);
            foreach (var term in node.Terms.Skip(1))
                result = term.Subtract ? result.Subtract(owner.ExpandMatrix(term.Value)) : result.Add(owner.ExpandMatrix(term.Value));
            return result;
        }

        public ReferenceMatrix VisitProduct(ProductExpr node)
        {
            // Left to right; the value so far is a matrix or a scalar.
            ReferenceMatrix? matrix = null;
            var scalar = ReferencePolynomial.One;
            foreach (var factor in node.Factors)
            {
                if (factor.Divide) throw new ReferenceException($"a matrix cannot be divided (at {factor.OperatorPosition})");
                if (!IsMatrixValued(factor.Value)) scalar *= owner.Expand(factor.Value);
                else matrix = matrix is null ? owner.ExpandMatrix(factor.Value) : matrix.Multiply(owner.ExpandMatrix(factor.Value));
            }
            return matrix is null ? throw NotMatrix(node) : matrix.Scale(scalar);
        }

        public ReferenceMatrix VisitBinary(BinaryExpr node) => owner.ExpandMatrix(node.Left).Pow(owner.Exponent(node.Right));

        public ReferenceMatrix VisitCall(CallExpr node)
        {
            CheckArity(node);
            return node.Function switch
            {
                Builtins.Transpose => owner.ExpandMatrix(node.Arguments[0]).Transpose(),
                Builtins.Identity => ReferenceMatrix.Identity(owner.Parameter(node.Arguments[0], "id's order", 1, ReferenceLimits.MaxRangeLength)),
                _ => throw NotMatrix(node),
            };
        }

        public ReferenceMatrix VisitBound(BoundExpr node)
        {
            ReferenceMatrix? result = null;
            foreach (var _ in owner.Range(node.Variable, node.From, node.To, allowEmpty: false))
            {
                var body = owner.ExpandMatrix(node.Body);
                result = result is null ? body : node.Kind == BoundKind.Sum ? result.Add(body) : result.Multiply(body);
            }
            return result!;
        }

        public ReferenceMatrix VisitMatrixComprehension(MatrixComprehension node)
        {
            var rows = new List<List<ReferencePolynomial>>();
            foreach (var _ in owner.Range(node.RowVariable, node.RowFrom, node.RowTo, allowEmpty: false))
            {
                var row = new List<ReferencePolynomial>();
                foreach (var __ in owner.Range(node.ColumnVariable, node.ColumnFrom, node.ColumnTo, allowEmpty: false))
                    row.Add(owner.Expand(node.Body));
                rows.Add(row);
            }
            if (rows.Any(r => r.Count != rows[0].Count)) throw new ReferenceException($"the rows of the matrix comprehension at {node.Position} have different lengths");
            return ReferenceMatrix.Create(rows.Count, rows[0].Count, (i, j) => rows[i][j]);
        }

        public ReferenceMatrix VisitMatrixLiteral(MatrixLiteral node)
        {
            if (node.Rows.Count == 0 || node.Rows[0].Count == 0) throw new ReferenceException($"empty matrix literal at {node.Position}");
            var columns = node.Rows[0].Count;
            if (node.Rows.Any(r => r.Count != columns)) throw new ReferenceException($"the rows of the matrix literal at {node.Position} have different lengths");
            var entries = node.Rows.Select(r => r.Select(owner.Expand).ToList()).ToList();
            return ReferenceMatrix.Create(node.Rows.Count, columns, (i, j) => entries[i][j]);
        }
    }
}
