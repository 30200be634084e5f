using System.Numerics;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Exact;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Lower;

/// <summary>The counting functions written out as plain arithmetic: fact, binom, and the q-functions qint, qfact, qbinom.</summary>
internal sealed class FunctionLowering(LoweringContext context, ExpressionLowering expressions)
{
    private readonly ProgramBuilder _b = context.Builder;

    /// <summary>n! as a product of constants (folded while small).</summary>
    public int Factorial(CallExpr node)
    {
        var argument = node.Arguments[0];
        var n = context.Integer(argument, "fact's argument");
        if (n.Sign < 0) throw new CompileError(argument.Position, $"fact's argument must be non-negative, but it is {n}");
        var count = context.CheckedCount(n, argument, "fact's argument");
        var acc = _b.Constant(Rational.One);
        for (var i = 2; i <= count; i++) acc = _b.Multiply(acc, _b.Constant(i));
        return acc;
    }

    /// <summary>binom(a, k) = a(a−1)…(a−k+1)/k!, and 0 for k &lt; 0.</summary>
    public int Binomial(CallExpr node)
    {
        var args = node.Arguments;
        var a = expressions.ScalarOf(args[0], "binom's first argument");
        var k = context.Integer(args[1], "binom's second argument");
        if (k.Sign < 0) return _b.Constant(Rational.Zero);
        var count = context.CheckedCount(k, args[1], "binom's second argument");
        // A constant first argument gives an exact constant, with no 1/k! in the program: binom(10, 3) stays
        // defined over GF(3) (Lucas' congruences), where the constant 1/3! is not.
        if (_b.TryGetConstant(a, out var constant)
            && (long)count * (Math.Max(constant.Numerator.GetBitLength(), constant.Denominator.GetBitLength()) + 1) <= ProgramBuilder.MaxFoldedBits)
        {
            var exact = Rational.One;
            for (var i = 0; i < count; i++) exact = exact * (constant - i) / (i + 1);
            return _b.Constant(exact);
        }
        var acc = _b.Constant(Rational.One);
        var factorial = BigInteger.One;
        for (var i = 0; i < count; i++)
        {
            acc = _b.Multiply(acc, _b.Subtract(a, _b.Constant(i)));
            factorial *= i + 1;
        }
        return _b.Multiply(acc, _b.Constant(Rational.Create(1, factorial)));
    }

    /// <summary>qint(n, q) = 1 + q + … + q^(n−1).</summary>
    public int QInteger(CallExpr node)
    {
        var n = QCount(node.Arguments[0], "qint's first argument");
        var q = expressions.ScalarOf(node.Arguments[1], "qint's second argument");
        return QInts(q, n)[n];
    }

    /// <summary>qfact(n, q) = qint(1, q)·…·qint(n, q).</summary>
    public int QFactorial(CallExpr node)
    {
        var n = QCount(node.Arguments[0], "qfact's first argument");
        var q = expressions.ScalarOf(node.Arguments[1], "qfact's second argument");
        var ints = QInts(q, n);
        var acc = _b.Constant(Rational.One);
        for (var i = 1; i <= n; i++) acc = _b.Multiply(acc, ints[i]);
        return acc;
    }

    private int QCount(Expr e, string what)
    {
        var n = context.Integer(e, what);
        if (n.Sign < 0) throw new CompileError(e.Position, $"{what} must be non-negative, but it is {n}");
        return context.CheckedCount(n, e, what);
    }

    /// <summary>qint(0..n, q) with qint(i+1) = qint(i) + q^i.</summary>
    private int[] QInts(int q, int n)
    {
        var ints = new int[n + 1];
        ints[0] = _b.Constant(Rational.Zero);
        var power = _b.Constant(Rational.One);
        for (var i = 0; i < n; i++)
        {
            ints[i + 1] = _b.Add(ints[i], power);
            power = _b.Multiply(power, q);
        }
        return ints;
    }

    /// <summary>Gaussian binomial by the q-Pascal rule [n,k] = [n−1,k−1] + q^k·[n−1,k], division-free.</summary>
    public int QBinomial(CallExpr node)
    {
        var args = node.Arguments;
        var nValue = context.Integer(args[0], "qbinom's first argument");
        var kValue = context.Integer(args[1], "qbinom's second argument");
        var q = expressions.ScalarOf(args[2], "qbinom's third argument");
        if (nValue.Sign < 0) throw new CompileError(args[0].Position, $"qbinom's first argument must be non-negative, but it is {nValue}");
        if (kValue.Sign < 0 || kValue > nValue) return _b.Constant(Rational.Zero);
        var n = context.CheckedCount(nValue, args[0], "qbinom's first argument");
        var k = (int)kValue;
        if ((long)n * (k + 1) > context.Limits.MaxProgramSize)
            throw new CompileError(node.Position, $"qbinom({n}, {k}, ·) expands to more than {context.Limits.MaxProgramSize} instructions (the limit MaxProgramSize)");
        var powers = new int[k + 1];
        powers[0] = _b.Constant(Rational.One);
        for (var j = 1; j <= k; j++) powers[j] = _b.Multiply(powers[j - 1], q);
        // row[j] = [m, j] for the current m, j = 0..k
        var row = new int[k + 1];
        var zero = _b.Constant(Rational.Zero);
        row[0] = _b.Constant(Rational.One);
        for (var j = 1; j <= k; j++) row[j] = zero;
        for (var m = 1; m <= n; m++)
            for (var j = Math.Min(m, k); j >= 1; j--)
                row[j] = _b.Add(row[j - 1], _b.Multiply(powers[j], row[j]));
        return row[k];
    }
}
