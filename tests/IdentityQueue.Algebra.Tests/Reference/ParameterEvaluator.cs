using System.Numerics;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Tests.Reference;

/// <summary>
/// Evaluates integer parameter expressions exactly (exponents, range ends, indices, binom's k, fact's n):
/// integer literals, names bound in the environment, unary minus, <c>+ - *</c>, <c>/</c> when the division is
/// exact, <c>^</c> with a non-negative exponent, <c>fact(n)</c> and <c>binom(n, k)</c> on integers.
/// Anything else (a free variable, a bound form, a matrix, another function) throws <see cref="ReferenceException"/>.
/// </summary>
public static class ParameterEvaluator
{
    public static BigInteger Evaluate(Expr expression, IReadOnlyDictionary<string, BigInteger> environment) =>
        expression.Accept(new Visitor(environment));

    /// <summary>Evaluates and checks that the value fits in an int within [min, max].</summary>
    public static int EvaluateInt(Expr expression, IReadOnlyDictionary<string, BigInteger> environment, int min, int max, string what)
    {
        var value = Evaluate(expression, environment);
        if (value < min || value > max)
            throw new ReferenceException($"{what} must lie in {min}..{max} but is {value} (at {expression.Position})");
        return (int)value;
    }

    /// <summary>n! for 0 ≤ n ≤ <see cref="ReferenceLimits.MaxFunctionArgument"/>.</summary>
    public static BigInteger Factorial(BigInteger n)
    {
        if (n.Sign < 0) throw new ReferenceException($"fact needs a non-negative argument, not {n}");
        if (n > ReferenceLimits.MaxFunctionArgument) throw new ReferenceException($"fact({n}) is beyond the reference limit {ReferenceLimits.MaxFunctionArgument}");
        var result = BigInteger.One;
        for (var i = 2; i <= (int)n; i++) result *= i;
        return result;
    }

    /// <summary>binom(n, k) = n(n−1)…(n−k+1)/k! for any integer n; 0 for k &lt; 0.</summary>
    public static BigInteger Binomial(BigInteger n, BigInteger k)
    {
        if (k.Sign < 0) return BigInteger.Zero;
        if (k > ReferenceLimits.MaxFunctionArgument) throw new ReferenceException($"binom's k = {k} is beyond the reference limit {ReferenceLimits.MaxFunctionArgument}");
        var numerator = BigInteger.One;
        for (var i = 0; i < (int)k; i++) numerator *= n - i;
        return numerator / Factorial(k);
    }

    private sealed class Visitor(IReadOnlyDictionary<string, BigInteger> environment) : IExprVisitor<BigInteger>
    {
        public BigInteger VisitInteger(IntegerLiteral node) => node.Value;

        public BigInteger VisitName(NameRef node) =>
            environment.TryGetValue(node.Name, out var value)
                ? value
                : throw new ReferenceException($"'{node.Name}' at {node.Position} is not an integer parameter here (an integer parameter expression is required)");

        public BigInteger VisitIndexed(IndexedName node) =>
            throw new ReferenceException($"the indexed variable {node.Name}[...] at {node.Position} cannot appear in an integer parameter expression");

        public BigInteger VisitUnary(UnaryExpr node) => -node.Operand.Accept(this);

        public BigInteger VisitSum(SumExpr node)
        {
            var acc = node.Terms[0].Value.Accept(this);
            foreach (var term in node.Terms.Skip(1)) acc = term.Subtract ? acc - term.Value.Accept(this) : acc + term.Value.Accept(this);
            return acc;
        }

        public BigInteger VisitProduct(ProductExpr node)
        {
            var acc = node.Factors[0].Value.Accept(this);
            foreach (var factor in node.Factors.Skip(1))
            {
                var b = factor.Value.Accept(this);
                if (!factor.Divide)
                {
                    acc *= b;
                    continue;
                }
                if (b.IsZero) throw new ReferenceException($"division by zero in an integer parameter expression at {factor.OperatorPosition}");
                var q = BigInteger.DivRem(acc, b, out var r);
                if (!r.IsZero) throw new ReferenceException($"{acc}/{b} at {factor.OperatorPosition} is not an integer");
                acc = q;
            }
            return acc;
        }

        public BigInteger VisitBinary(BinaryExpr node)
        {
            var a = node.Left.Accept(this);
            var b = node.Right.Accept(this);
            switch (node.Operator)
            {
                case BinaryOperator.Less: return a < b ? 1 : 0;
                case BinaryOperator.LessOrEqual: return a <= b ? 1 : 0;
                case BinaryOperator.Greater: return a > b ? 1 : 0;
                case BinaryOperator.GreaterOrEqual: return a >= b ? 1 : 0;
                case BinaryOperator.Equal: return a == b ? 1 : 0;
                case BinaryOperator.NotEqual: return a != b ? 1 : 0;
                case BinaryOperator.And: return !a.IsZero && !b.IsZero ? 1 : 0;
                case BinaryOperator.Or: return !a.IsZero || !b.IsZero ? 1 : 0;
            }
            if (b.Sign < 0) throw new ReferenceException($"negative exponent {b} in an integer parameter expression at {node.OperatorPosition}");
            if (b > ReferenceLimits.MaxExponent) throw new ReferenceException($"exponent {b} is beyond the reference limit {ReferenceLimits.MaxExponent}");
            return BigInteger.Pow(a, (int)b);
        }

        public BigInteger VisitCall(CallExpr node)
        {
            if (node.Function == Builtins.Fact && node.Arguments.Count == 1) return Factorial(node.Arguments[0].Accept(this));
            if (node.Function == Builtins.Binom && node.Arguments.Count == 2) return Binomial(node.Arguments[0].Accept(this), node.Arguments[1].Accept(this));
            var a = node.Arguments;
            switch (node.Function)
            {
                // The integer functions by their textbook definitions (Graham, Knuth, Patashnik, "Concrete Mathematics", ch. 3 [memory]).
                case Builtins.Floor or Builtins.Ceil:
                {
                    // floor(a/b) with a possibly inexact quotient: the only place a division need not be exact.
                    BigInteger num, den = 1;
                    if (a[0] is ProductExpr { Factors: [var n0, { Divide: true } d0] }) { num = n0.Value.Accept(this); den = d0.Value.Accept(this); }
                    else num = a[0].Accept(this);
                    if (den.Sign < 0) { num = -num; den = -den; }
                    var q = BigInteger.Divide(num, den);
                    if (q * den > num) q -= 1;        // now q = floor(num/den)
                    return node.Function == Builtins.Floor || q * den == num ? q : q + 1;
                }
                case Builtins.Mod:
                {
                    var x = a[0].Accept(this);
                    var m = a[1].Accept(this);
                    var r = x - m * (x / m);
                    return r.Sign != 0 && r.Sign != m.Sign ? r + m : r;
                }
                case Builtins.Min: return a.Select(e => e.Accept(this)).Min();
                case Builtins.Max: return a.Select(e => e.Accept(this)).Max();
                case Builtins.Gcd: return a.Select(e => e.Accept(this)).Aggregate(BigInteger.Zero, BigInteger.GreatestCommonDivisor);
                case Builtins.Abs: return BigInteger.Abs(a[0].Accept(this));
                case Builtins.Delta: return a[0].Accept(this) == a[1].Accept(this) ? 1 : 0;
                case Builtins.Iverson: return a[0].Accept(this);
                case Builtins.When: return a[0].Accept(this).IsZero ? a[2].Accept(this) : a[1].Accept(this);
            }
            throw new ReferenceException($"{node.Function}(...) at {node.Position} cannot appear in an integer parameter expression (only fact, binom and the integer functions can)");
        }

        public BigInteger VisitBound(BoundExpr node) =>
            throw new ReferenceException($"a {(node.Kind == BoundKind.Sum ? "sum" : "prod")} at {node.Position} cannot appear in an integer parameter expression");

        public BigInteger VisitMatrixComprehension(MatrixComprehension node) =>
            throw new ReferenceException($"a matrix at {node.Position} cannot appear in an integer parameter expression");

        public BigInteger VisitMatrixLiteral(MatrixLiteral node) =>
            throw new ReferenceException($"a matrix at {node.Position} cannot appear in an integer parameter expression");
    }
}
