using System.Numerics;
using IdentityQueue.Algebra.Compile;

namespace IdentityQueue.Algebra.Bounds;

/// <summary>
/// What the structure of lhs − rhs guarantees, written as N/Q with integer polynomials N and Q:
/// <see cref="Degree"/> ≥ total degree of N (and so of the cleared difference), <see cref="HeightLog2"/>
/// ≥ log2 of N's coefficient 1-norm, and <see cref="DivisorDegree"/> ≥ the total degree of everything the
/// program divides by (so a random point is undefined with probability at most DivisorDegree/|F|). Immutable.
/// </summary>
public sealed record IdentityBounds(BigInteger Degree, double HeightLog2, BigInteger DivisorDegree);

/// <summary>Bounds of one register: the value is num/den with num, den integer polynomials.</summary>
internal readonly record struct RegisterBound(BigInteger NumDegree, BigInteger DenDegree, double NumLog2, double DenLog2)
{
    /// <summary>True when the denominator is the constant 1.</summary>
    public bool IsPolynomial => DenDegree.IsZero && DenLog2 == 0;
}

/// <summary>
/// Computes <see cref="IdentityBounds"/> by one pass over a program — one rule per instruction, each valid
/// for the 1-norm (subadditive, submultiplicative) and for total degree. Stateless.
/// </summary>
public static class BoundAnalysis
{
    public static IdentityBounds Analyse(StraightLineProgram program)
    {
        var bounds = Registers(program);
        var degree = BigInteger.Zero;
        var height = double.NegativeInfinity;
        foreach (var o in program.Outputs)
        {
            degree = BigInteger.Max(degree, bounds[o].NumDegree);
            height = Math.Max(height, bounds[o].NumLog2);
        }
        var divisors = BigInteger.Zero;
        foreach (var ins in program.Instructions)
            if (ins.Op == OpCode.Invert) divisors += bounds[ins.A].NumDegree;
        return new IdentityBounds(degree, height, divisors);
    }

    /// <summary>
    /// An estimate of the bits held by an exact rational evaluation of every register at a point whose integer coordinates
    /// have <paramref name="coordinateBits"/> bits; stops counting once past <paramref name="cap"/>.
    /// </summary>
    public static double ExactEvaluationBits(StraightLineProgram program, double coordinateBits, double cap)
    {
        double total = 0;
        foreach (var b in Registers(program))
        {
            total += Math.Max(0, b.NumLog2) + Math.Max(0, b.DenLog2) + (double)(b.NumDegree + b.DenDegree) * Math.Max(1, coordinateBits);
            if (total > cap) break;
        }
        return total;
    }

    internal static RegisterBound[] Registers(StraightLineProgram program)
    {
        var ins = program.Instructions;
        var b = new RegisterBound[ins.Length];
        for (var i = 0; i < ins.Length; i++)
        {
            var x = ins[i];
            b[i] = x.Op switch
            {
                OpCode.Constant => Constant(program.Constants[x.A]),
                OpCode.Variable => new RegisterBound(1, 0, 0, 0),
                OpCode.Add or OpCode.Subtract => Sum(b[x.A], b[x.B]),
                OpCode.Multiply => new RegisterBound(b[x.A].NumDegree + b[x.B].NumDegree, b[x.A].DenDegree + b[x.B].DenDegree,
                    b[x.A].NumLog2 + b[x.B].NumLog2, b[x.A].DenLog2 + b[x.B].DenLog2),
                OpCode.Negate => b[x.A],
                OpCode.Invert => new RegisterBound(b[x.A].DenDegree, b[x.A].NumDegree, b[x.A].DenLog2, b[x.A].NumLog2),
                OpCode.Power => Power(b[x.A], program.Exponents[x.B]),
                OpCode.Determinant or OpCode.Permanent => Square(b, program.Operands.AsSpan(x.A, x.B * x.B), x.B, half: false),
                OpCode.Pfaffian => Square(b, program.Operands.AsSpan(x.A, x.B * x.B), x.B, half: true),
                _ => throw new InvalidOperationException($"no bound rule for {x.Op}"),
            };
        }
        return b;
    }

    private static RegisterBound Constant(Exact.Rational c) =>
        new(0, 0, c.IsZero ? double.NegativeInfinity : Log2Up(BigInteger.Abs(c.Numerator)), Log2Up(c.Denominator));

    private static RegisterBound Sum(RegisterBound a, RegisterBound c)
    {
        if (double.IsNegativeInfinity(a.NumLog2)) return c; // a is the zero polynomial
        if (double.IsNegativeInfinity(c.NumLog2)) return a;
        if (a.IsPolynomial && c.IsPolynomial)
            return new RegisterBound(BigInteger.Max(a.NumDegree, c.NumDegree), 0, LogAdd(a.NumLog2, c.NumLog2), 0);
        // a/b + c/d = (a·d + c·b) / (b·d)
        return new RegisterBound(
            BigInteger.Max(a.NumDegree + c.DenDegree, c.NumDegree + a.DenDegree),
            a.DenDegree + c.DenDegree,
            LogAdd(a.NumLog2 + c.DenLog2, c.NumLog2 + a.DenLog2),
            a.DenLog2 + c.DenLog2);
    }

    private static RegisterBound Power(RegisterBound a, BigInteger e)
    {
        var scale = (double)e;
        return new RegisterBound(a.NumDegree * e, a.DenDegree * e, Scale(a.NumLog2, scale), Scale(a.DenLog2, scale));
    }

    private static double Scale(double log2, double factor) => log2 == double.NegativeInfinity ? log2 : log2 * factor * (1 + 1e-12);

    /// <summary>
    /// det, perm (and pf with <paramref name="half"/>) of entries n_ij/d_ij, as N/Π d_ij. A term of the expansion picks one entry per
    /// row and per column, so deg N ≤ Σ deg d_ij + min(Σ_rows max (deg n − deg d), Σ_columns max (deg n − deg d)); its 1-norm is at most
    /// Π|d_ij| times the permanent of the matrix of |n_ij|/|d_ij|, at most Π of the row sums (or column sums). A Pfaffian picks each
    /// vertex once in a perfect matching, so its degree excess is at most half the row-maximum sum, and hafnian² ≤ permanent for a
    /// non-negative symmetric matrix gives half the log-norm; only the entries above the diagonal enter its denominator.
    /// </summary>
    private static RegisterBound Square(RegisterBound[] b, ReadOnlySpan<int> entries, int n, bool half)
    {
        var denDegree = BigInteger.Zero;
        var denLog = 0.0;
        var rowExcess = BigInteger.Zero;
        var columnExcess = BigInteger.Zero;
        var rowLog = 0.0;
        var columnLog = 0.0;
        for (var i = 0; i < n; i++)
        {
            BigInteger? rowMax = null, columnMax = null;
            var rowSum = double.NegativeInfinity;
            var columnSum = double.NegativeInfinity;
            for (var j = 0; j < n; j++)
            {
                var r = b[entries[i * n + j]];
                var c = b[entries[j * n + i]];
                if (!half || j > i) { denDegree += r.DenDegree; denLog += r.DenLog2; }
                if (r.NumLog2 != double.NegativeInfinity)
                {
                    var e = r.NumDegree - r.DenDegree;
                    rowMax = rowMax is null ? e : BigInteger.Max(rowMax.Value, e);
                    rowSum = LogAdd(rowSum, r.NumLog2 - r.DenLog2);
                }
                if (c.NumLog2 != double.NegativeInfinity)
                {
                    var e = c.NumDegree - c.DenDegree;
                    columnMax = columnMax is null ? e : BigInteger.Max(columnMax.Value, e);
                    columnSum = LogAdd(columnSum, c.NumLog2 - c.DenLog2);
                }
            }
            if (rowMax is null || columnMax is null) return new RegisterBound(0, 0, double.NegativeInfinity, 0); // a zero row or column
            rowExcess += rowMax.Value;
            columnExcess += columnMax.Value;
            rowLog += rowSum;
            columnLog += columnSum;
        }
        var excess = BigInteger.Min(rowExcess, columnExcess);
        var log = Math.Min(rowLog, columnLog);
        if (half) { excess /= 2; log = log / 2 * (1 + 1e-12); }
        var numDegree = BigInteger.Max(BigInteger.Zero, denDegree + excess);
        return new RegisterBound(numDegree, denDegree, denLog + log + 1e-9, denLog);
    }

    /// <summary>An upper bound on log2(2^a + 2^b).</summary>
    public static double LogAdd(double a, double b)
    {
        if (a == double.NegativeInfinity) return b;
        if (b == double.NegativeInfinity) return a;
        var hi = Math.Max(a, b);
        var lo = Math.Min(a, b);
        return hi + Math.Log2(1 + Math.Pow(2, lo - hi)) + 1e-9;
    }

    /// <summary>An upper bound on log2(v), slightly rounded up; −∞ for v ≤ 0.</summary>
    public static double Log2Up(BigInteger v)
    {
        if (v.Sign <= 0) return double.NegativeInfinity;
        if (v.IsOne) return 0;
        var bits = v.GetBitLength();
        if (bits <= 52) return Math.Log2((double)v) + 1e-12;
        // top 52 bits, rounded up
        var shift = (int)(bits - 52);
        var top = (double)(v >> shift) + 1;
        return Math.Log2(top) + shift + 1e-12;
    }
}
