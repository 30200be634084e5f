using System.Numerics;
using IdentityQueue.Algebra.Exact;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Compile;

/// <summary>
/// Evaluates integer parameter expressions (range ends, exponents, indices, the integer arguments of
/// binom/fact/q-functions, the integer and number functions and their conditions) exactly, given the values of the
/// parameters in scope. Sizes are checked
/// before any work that could blow up, against <see cref="Limits.MaxParameterBits"/>.
/// </summary>
internal sealed class ParameterEvaluator(IReadOnlyDictionary<string, BigInteger> scope, Limits limits, string context)
    : IExprVisitor<Rational>
{
    /// <summary>Evaluates <paramref name="expression"/> to an integer; <paramref name="context"/> says where it stands ("an exponent").</summary>
    public static BigInteger EvaluateInteger(Expr expression, IReadOnlyDictionary<string, BigInteger> scope, Limits limits, string context)
    {
        var value = expression.Accept(new ParameterEvaluator(scope, limits, context));
        if (!value.IsInteger)
            throw new CompileError(expression.Position, $"{context} must be an integer, but it is {value}");
        return value.Numerator;
    }

    /// <summary>Evaluates <paramref name="expression"/> to an exact rational (a number function such as harmonic(n) need not be an integer).</summary>
    public static Rational EvaluateRational(Expr expression, IReadOnlyDictionary<string, BigInteger> scope, Limits limits, string context) =>
        expression.Accept(new ParameterEvaluator(scope, limits, context));

    private Rational Checked(Rational value, SourcePosition at)
    {
        if (value.Numerator.GetBitLength() > limits.MaxParameterBits || value.Denominator.GetBitLength() > limits.MaxParameterBits)
            throw new CompileError(at, $"{context} has a value larger than 2^{limits.MaxParameterBits} (the limit MaxParameterBits)");
        return value;
    }

    public Rational VisitInteger(IntegerLiteral node) => Checked(node.Value, node.Position);

    public Rational VisitName(NameRef node) =>
        scope.TryGetValue(node.Name, out var value)
            ? value
            : throw new CompileError(node.Position, $"{context} must be an integer expression in the parameters, but '{node.Name}' is a variable");

    public Rational VisitIndexed(IndexedName node) =>
        throw new CompileError(node.Position, $"{context} must be an integer expression in the parameters, but '{node.Name}[...]' is a variable");

    public Rational VisitUnary(UnaryExpr node) => -node.Operand.Accept(this);

    public Rational VisitSum(SumExpr node)
    {
        var acc = node.Terms[0].Value.Accept(this);
        for (var i = 1; i < node.Terms.Count; i++)
        {
            var term = node.Terms[i];
            var value = term.Value.Accept(this);
            acc = Checked(term.Subtract ? acc - value : acc + value, node.Position);
        }
        return acc;
    }

    public Rational VisitProduct(ProductExpr node)
    {
        var acc = node.Factors[0].Value.Accept(this);
        for (var i = 1; i < node.Factors.Count; i++)
        {
            var factor = node.Factors[i];
            var value = factor.Value.Accept(this);
            if (factor.Divide && value.IsZero) throw new CompileError(factor.OperatorPosition, $"division by zero in {context}");
            acc = Checked(factor.Divide ? acc / value : acc * value, node.Position);
        }
        return acc;
    }

    public Rational VisitBinary(BinaryExpr node)
    {
        // '^' or a comparison.
        var left = node.Left.Accept(this);
        var right = node.Right.Accept(this);
        switch (node.Operator)
        {
            case BinaryOperator.Less: return Truth(left < right);
            case BinaryOperator.LessOrEqual: return Truth(left <= right);
            case BinaryOperator.Greater: return Truth(left > right);
            case BinaryOperator.GreaterOrEqual: return Truth(left >= right);
            case BinaryOperator.Equal: return Truth(left == right);
            case BinaryOperator.NotEqual: return Truth(left != right);
            case BinaryOperator.And: return Truth(!left.IsZero && !right.IsZero);
            case BinaryOperator.Or: return Truth(!left.IsZero || !right.IsZero);
        }
        if (!right.IsInteger)
            throw new CompileError(node.Right.Position, $"an exponent must be an integer, but it is {right}");
        var exponent = right.Numerator;
        if (left.IsZero || left == Rational.One) return exponent.Sign < 0 && left.IsZero
            ? throw new CompileError(node.OperatorPosition, $"0 raised to a negative power in {context}")
            : exponent.IsZero ? Rational.One : left;
        if (left == -Rational.One) return exponent.IsEven ? Rational.One : left;
        var bits = Math.Max(left.Numerator.GetBitLength(), left.Denominator.GetBitLength());
        if (BigInteger.Abs(exponent) * bits > limits.MaxParameterBits)
            throw new CompileError(node.OperatorPosition, $"{context} has a value larger than 2^{limits.MaxParameterBits} (the limit MaxParameterBits)");
        return Rational.Pow(left, (int)exponent);
    }

    public Rational VisitCall(CallExpr node)
    {
        switch (node.Function)
        {
            case Builtins.Fact:
            {
                var n = Integer(node.Arguments[0], "fact's argument");
                if (n.Sign < 0) throw new CompileError(node.Arguments[0].Position, $"fact's argument must be non-negative, but it is {n}");
                if (n > limits.MaxFunctionArgument) throw new CompileError(node.Arguments[0].Position, $"fact({n}) exceeds the limit MaxFunctionArgument ({limits.MaxFunctionArgument})");
                var result = BigInteger.One;
                for (var i = 2; i <= (int)n; i++) result *= i;
                return Checked(result, node.Position);
            }
            case Builtins.Binom:
            {
                var a = node.Arguments[0].Accept(this);
                var k = Integer(node.Arguments[1], "binom's second argument");
                if (k.Sign < 0) return Rational.Zero;
                if (k > limits.MaxFunctionArgument) throw new CompileError(node.Arguments[1].Position, $"binom's second argument {k} exceeds the limit MaxFunctionArgument ({limits.MaxFunctionArgument})");
                var result = Rational.One;
                for (var i = 0; i < (int)k; i++) result = Checked(result * (a - i) / (i + 1), node.Position);
                return result;
            }
            case Builtins.When:
                // Only the chosen branch is evaluated, so the other may be undefined (a negative fact, a division by zero).
                return node.Arguments[0].Accept(this).IsZero ? node.Arguments[2].Accept(this) : node.Arguments[1].Accept(this);
            default:
                if (Builtins.ParameterFunctions.Contains(node.Function)) return Checked(ParameterFunction(node), node.Position);
                throw new CompileError(node.Position, $"{context} must be an integer expression in the parameters; {node.Function}(...) is not allowed there");
        }
    }

    private static Rational Truth(bool value) => value ? Rational.One : Rational.Zero;

    /// <summary>The integer and number functions (<see cref="Builtins.ParameterFunctions"/>), exactly.</summary>
    private Rational ParameterFunction(CallExpr node)
    {
        var a = node.Arguments;
        var name = node.Function;
        try
        {
            switch (name)
            {
                case Builtins.Min:
                case Builtins.Max:
                {
                    var best = a[0].Accept(this);
                    for (var i = 1; i < a.Count; i++)
                    {
                        var v = a[i].Accept(this);
                        if (name == Builtins.Min ? v < best : v > best) best = v;
                    }
                    return best;
                }
                case Builtins.Floor:
                case Builtins.Ceil:
                {
                    var v = a[0].Accept(this);
                    var floor = BigInteger.Divide(v.Numerator, v.Denominator);
                    if (v.Numerator.Sign < 0 && !v.IsInteger) floor -= 1; // BigInteger.Divide truncates toward zero
                    return name == Builtins.Floor || v.IsInteger ? floor : floor + 1;
                }
                case Builtins.Mod:
                {
                    // a mod b = a − b·floor(a/b): in 0..b−1 for b > 0 and in b+1..0 for b < 0 (the sign of the divisor).
                    var x = Integer(a[0], "mod's first argument");
                    var m = Integer(a[1], "mod's second argument");
                    if (m.IsZero) throw new CompileError(a[1].Position, $"mod by zero in {context}");
                    var r = BigInteger.Remainder(x, m);
                    if (!r.IsZero && r.Sign != m.Sign) r += m;
                    return r;
                }
                case Builtins.Gcd:
                {
                    var g = BigInteger.Zero;
                    for (var i = 0; i < a.Count; i++) g = BigInteger.GreatestCommonDivisor(g, Integer(a[i], $"gcd's argument {i + 1}"));
                    return g;
                }
                case Builtins.Abs:
                {
                    var v = a[0].Accept(this);
                    return v.Numerator.Sign < 0 ? -v : v;
                }
                case Builtins.Delta:
                    return Truth(a[0].Accept(this) == a[1].Accept(this));
                case Builtins.Iverson:
                    return a[0].Accept(this);
                case Builtins.Fibonacci:
                    return NumberFunctions.Fibonacci(Integer(a[0], "fib's argument"), limits);
                case Builtins.Lucas:
                    return NumberFunctions.Lucas(Integer(a[0], "lucas's argument"), limits);
                case Builtins.Stirling1:
                    return NumberFunctions.Stirling1(Integer(a[0], "stirling1's first argument"), Integer(a[1], "stirling1's second argument"), limits);
                case Builtins.Stirling2:
                    return NumberFunctions.Stirling2(Integer(a[0], "stirling2's first argument"), Integer(a[1], "stirling2's second argument"), limits);
                case Builtins.Harmonic:
                    return NumberFunctions.Harmonic(Integer(a[0], "harmonic's argument"), limits);
                case Builtins.Bernoulli:
                    return NumberFunctions.Bernoulli(Integer(a[0], "bernoulli's argument"), limits);
                case Builtins.Catalan:
                    return NumberFunctions.Catalan(Integer(a[0], "catalan's argument"), limits);
                default: // multinomial
                    return NumberFunctions.Multinomial(a.Select((e, i) => Integer(e, $"multinomial's argument {i + 1}")).ToArray(), limits);
            }
        }
        catch (NumberFunctionException e)
        {
            throw new CompileError(node.Position, e.Message);
        }
    }

    private BigInteger Integer(Expr e, string what)
    {
        var v = e.Accept(this);
        return v.IsInteger ? v.Numerator : throw new CompileError(e.Position, $"{what} must be an integer, but it is {v}");
    }

    public Rational VisitBound(BoundExpr node)
    {
        var from = Integer(node.From, "a range start");
        var to = Integer(node.To, "a range end");
        if (to - from + 1 > limits.MaxProgramSize)
            throw new CompileError(node.Position, $"the range {from}..{to} has more than {limits.MaxProgramSize} terms (the limit MaxProgramSize)");
        var inner = new Dictionary<string, BigInteger>(scope);
        var acc = node.Kind == BoundKind.Sum ? Rational.Zero : Rational.One;
        for (var k = from; k <= to; k++)
        {
            inner[node.Variable] = k;
            var term = node.Body.Accept(new ParameterEvaluator(inner, limits, context));
            acc = Checked(node.Kind == BoundKind.Sum ? acc + term : acc * term, node.Position);
        }
        return acc;
    }

    public Rational VisitMatrixComprehension(MatrixComprehension node) =>
        throw new CompileError(node.Position, $"{context} must be an integer, not a matrix");

    public Rational VisitMatrixLiteral(MatrixLiteral node) =>
        throw new CompileError(node.Position, $"{context} must be an integer, not a matrix");
}
