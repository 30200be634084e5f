using System.Numerics;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Exact;
using IdentityQueue.Algebra.Lower;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Screening.HandOff;

/// <summary>
/// Reads a lowered identity (<see cref="Lowering"/>) into the term graph of + − × and rational constants, instruction by
/// instruction: each register becomes a fraction N/D, every inverse met on the way has its numerator asserted nonzero, a
/// power is written out as a product, and det, perm and pf are expanded along the first row with shared minors. The
/// negation says that a side condition (the skew-symmetry of a Pfaffian's argument) fails or that some pair of sides
/// differs, N_l·D_r ≠ N_r·D_l. Limits: <see cref="HandOffLimits"/>; over one, <see cref="HandOffSkip"/>. One per script.
/// </summary>
internal sealed class LoweredTerms(HandOffLimits limits)
{
    private readonly TermGraph _g = new(limits);
    private readonly List<int> _divisors = [];
    private readonly List<int> _conditions = [];

    /// <summary>A rational function N/D of terms; <see cref="Den"/> is −1 for D = 1 and is never a constant.</summary>
    private readonly record struct Fraction(int Num, int Den)
    {
        public bool IsPolynomial => Den < 0;
    }

    public SmtLibObligation Negation(LoweredIdentity lowered)
    {
        var program = lowered.Program;
        var registers = Registers(program);
        var conditionCount = program.ConditionNames.Length;
        for (var o = 0; o < conditionCount; o++)
        {
            var condition = registers[program.Outputs[o]];
            if (!_g.IsZero(condition.Num)) _conditions.Add(condition.Num);
        }
        // Each output after the conditions is the unfolded lhs − rhs of a pair of sides; two 0×0 matrices have no pair.
        var pairs = new List<(Fraction Left, Fraction Right)>();
        if (lowered.Shape is not { Rows: 0 } and not { Columns: 0 })
            for (var o = conditionCount; o < program.Outputs.Length; o++)
            {
                var difference = program.Instructions[program.Outputs[o]];
                if (difference.Op != OpCode.Subtract) throw new InvalidOperationException("a lowered output is not lhs − rhs");
                pairs.Add((registers[difference.A], registers[difference.B]));
            }
        var sides = new List<(int, int)>();
        foreach (var (a, b) in pairs)
            sides.Add(a.IsPolynomial && b.IsPolynomial ? (a.Num, b.Num) : (_g.Product(a.Num, Den(b)), _g.Product(b.Num, Den(a))));

        var roots = _divisors.Concat(_conditions).Concat(sides.SelectMany(s => new[] { s.Item1, s.Item2 })).ToList();
        var (definitions, terms) = _g.Write(roots);
        var assertions = new List<string>();
        for (var i = 0; i < _divisors.Count; i++) assertions.Add($"(assert (not (= {terms[i]} 0)))");
        var offset = _divisors.Count + _conditions.Count;
        var differences = Enumerable.Range(0, _conditions.Count).Select(k => $"(not (= {terms[_divisors.Count + k]} 0))")
            .Concat(Enumerable.Range(0, sides.Count).Select(k => $"(not (= {terms[offset + 2 * k]} {terms[offset + 2 * k + 1]}))")).ToList();
        // Two 0×0 matrices are equal: nothing can differ, and `false` is unsat.
        assertions.Add(differences.Count switch
        {
            0 => "(assert false)",
            1 => $"(assert {differences[0]})",
            _ => $"(assert (or {string.Join(' ', differences)}))",
        });
        var declarations = DeclarationOrder(lowered.Entry).Select(v => $"(declare-const {TermGraph.Symbol(v)} Real)").ToList();
        return new SmtLibObligation(declarations, definitions, assertions, _divisors.Count, sides.Count);
    }

    /// <summary>
    /// The variables in the order a reader meets them: by the first place their name (<c>x</c> of <c>x[3]</c>) is written
    /// in the identity, then in the order the lowering made them (<c>x[1]</c>, <c>x[2]</c>, … of one written <c>x[i]</c>).
    /// </summary>
    private List<string> DeclarationOrder(IdentityEntry entry)
    {
        var rank = new Dictionary<string, int>(StringComparer.Ordinal);
        var stack = new Stack<Expr>([entry.Right, entry.Left]);
        while (stack.Count > 0)
        {
            IEnumerable<Expr> children;
            switch (stack.Pop())
            {
                case NameRef name:
                    rank.TryAdd(name.Name, rank.Count);
                    continue;
                case IndexedName indexed:
                    rank.TryAdd(indexed.Name, rank.Count);
                    children = indexed.Indices;
                    break;
                case UnaryExpr unary: children = [unary.Operand]; break;
                case SumExpr sum: children = sum.Terms.Select(t => t.Value); break;
                case ProductExpr product: children = product.Factors.Select(f => f.Value); break;
                case BinaryExpr binary: children = [binary.Left, binary.Right]; break;
                case CallExpr call: children = call.Arguments; break;
                case BoundExpr bound: children = [bound.From, bound.To, bound.Body]; break;
                case MatrixComprehension m: children = [m.RowFrom, m.RowTo, m.ColumnFrom, m.ColumnTo, m.Body]; break;
                case MatrixLiteral literal: children = literal.Rows.SelectMany(r => r); break;
                default: continue;
            }
            foreach (var child in children.Reverse()) stack.Push(child);
        }
        static string Base(string variable) => variable.IndexOf('[') is var i and >= 0 ? variable[..i] : variable;
        return [.. _g.Variables.Select((v, i) => (v, i)).OrderBy(p => rank.GetValueOrDefault(Base(p.v), int.MaxValue)).ThenBy(p => p.i).Select(p => p.v)];
    }

    /// <summary>Every register of the program as a fraction of terms, in program order (operands come first).</summary>
    private Fraction[] Registers(StraightLineProgram program)
    {
        var instructions = program.Instructions;
        var r = new Fraction[instructions.Length];
        for (var i = 0; i < instructions.Length; i++)
        {
            var (op, a, b) = instructions[i];
            r[i] = op switch
            {
                OpCode.Constant => Constant(program.Constants[a]),
                OpCode.Variable => Poly(_g.Variable(program.Variables[a])),
                OpCode.Add => Commuted(r[a], r[b], (x, y) => Add(x, y, subtract: false)),
                OpCode.Subtract => Add(r[a], r[b], subtract: true),
                OpCode.Multiply => Commuted(r[a], r[b], Multiply),
                OpCode.Negate => Negate(r[a]),
                OpCode.Invert => Divide(Constant(Rational.One), r[a]),
                OpCode.Power => Power(r[a], program.Exponents[b]),
                OpCode.Determinant or OpCode.Permanent or OpCode.Pfaffian => MatrixFunction(op, Entries(program, a, b, r), b),
                _ => throw new InvalidOperationException($"no SMT-LIB form for {op}"),
            };
        }
        return r;
    }

    /// <summary>
    /// A commutative operation with its operands as they are written, a constant last (<c>x + 1</c>): the program keeps its
    /// operands in register order, where a constant often comes first.
    /// </summary>
    private Fraction Commuted(Fraction a, Fraction b, Func<Fraction, Fraction, Fraction> operation) =>
        IsConstant(a) && !IsConstant(b) ? operation(b, a) : operation(a, b);

    private bool IsConstant(Fraction f) => f.IsPolynomial && _g.TryGetConstant(f.Num, out _);

    private static Fraction[] Entries(StraightLineProgram program, int start, int order, Fraction[] registers)
    {
        var entries = new Fraction[order * order];
        for (var k = 0; k < entries.Length; k++) entries[k] = registers[program.Operands[start + k]];
        return entries;
    }

    private int Den(Fraction f) => f.IsPolynomial ? _g.One : f.Den;

    private static Fraction Poly(int term) => new(term, -1);

    private Fraction Constant(Rational c) => Poly(_g.Constant(c));

    private Fraction Add(Fraction a, Fraction b, bool subtract)
    {
        int Combine(int x, int y) => subtract ? _g.Difference(x, y) : _g.Sum(x, y);
        if (a.Den == b.Den) return new(Combine(a.Num, b.Num), a.Den);
        return Normal(Combine(_g.Product(a.Num, Den(b)), _g.Product(b.Num, Den(a))), _g.Product(Den(a), Den(b)));
    }

    private Fraction Multiply(Fraction a, Fraction b) => Normal(_g.Product(a.Num, b.Num), _g.Product(Den(a), Den(b)));

    private Fraction Negate(Fraction a) => new(_g.Negation(a.Num), a.Den);

    private Fraction Divide(Fraction a, Fraction b)
    {
        if (_g.TryGetConstant(b.Num, out var c))
        {
            if (c.IsZero) throw new HandOffSkip("it divides by zero");
            return Normal(_g.Product(a.Num, _g.Product(Den(b), _g.Constant(Rational.One / c))), Den(a));
        }
        // b ≠ 0 at a point where b's own divisors are nonzero means exactly b.Num ≠ 0.
        if (!_divisors.Contains(b.Num)) _divisors.Add(b.Num);
        return Normal(_g.Product(a.Num, Den(b)), _g.Product(Den(a), b.Num));
    }

    /// <summary>a^e written out as a product (e ≥ 0: a negative power is lowered to the inverse of a positive one).</summary>
    private Fraction Power(Fraction a, BigInteger e)
    {
        if (e > limits.MaxExponent)
            throw new HandOffSkip($"it has the exponent {e}; the limit MaxExponent is {limits.MaxExponent} (a power is written out as a product)");
        var k = (int)e;
        return Normal(_g.Power(a.Num, k), a.IsPolynomial ? _g.One : _g.Power(a.Den, k));
    }

    /// <summary>N/D with a constant D folded into N.</summary>
    private Fraction Normal(int num, int den)
    {
        if (!_g.TryGetConstant(den, out var c)) return new(num, den);
        return Poly(c == Rational.One ? num : _g.Product(num, _g.Constant(Rational.One / c)));
    }

    private Fraction MatrixFunction(OpCode op, Fraction[] m, int n)
    {
        var name = op switch { OpCode.Determinant => "det", OpCode.Permanent => "perm", _ => "pf" };
        if (n > limits.MaxExpansionOrder)
            throw new HandOffSkip($"it has {name} of a {n}×{n} matrix; the limit MaxExpansionOrder is {limits.MaxExpansionOrder}");
        var memo = new Dictionary<int, Fraction>();
        return op == OpCode.Pfaffian ? Pfaffian(m, n, (1 << n) - 1, memo) : Laplace(m, n, 0, (1 << n) - 1, op == OpCode.Determinant, memo);
    }

    /// <summary>
    /// det (or perm) of the rows row..n−1 and the columns in <paramref name="columns"/>, by expansion along the first
    /// of those rows; one value per set of columns (the minor of the rows below depends only on the columns left).
    /// </summary>
    private Fraction Laplace(Fraction[] m, int n, int row, int columns, bool signed, Dictionary<int, Fraction> memo)
    {
        if (columns == 0) return Constant(Rational.One);
        if (memo.TryGetValue(columns, out var known)) return known;
        Fraction? acc = null;
        var position = 0;
        for (var j = 0; j < n; j++)
        {
            if ((columns & (1 << j)) == 0) continue;
            var entry = m[row * n + j];
            if (!_g.IsZero(entry.Num))
            {
                var term = Multiply(entry, Laplace(m, n, row + 1, columns & ~(1 << j), signed, memo));
                var subtract = signed && position % 2 == 1;
                acc = acc is null ? (subtract ? Negate(term) : term) : Add(acc.Value, term, subtract);
            }
            position++;
        }
        var result = acc ?? Constant(Rational.Zero);
        memo[columns] = result;
        return result;
    }

    /// <summary>
    /// The Pfaffian of the principal submatrix on the indices in <paramref name="set"/>, from the entries above the
    /// diagonal: pf = Σ_j (−1)^(position of j after i) a_ij · pf(set without i, j), i the smallest index.
    /// </summary>
    private Fraction Pfaffian(Fraction[] m, int n, int set, Dictionary<int, Fraction> memo)
    {
        if (set == 0) return Constant(Rational.One);
        if (memo.TryGetValue(set, out var known)) return known;
        var i = BitOperations.TrailingZeroCount(set);
        var rest = set & ~(1 << i);
        Fraction? acc = null;
        var position = 0;
        for (var j = i + 1; j < n; j++)
        {
            if ((rest & (1 << j)) == 0) continue;
            var entry = m[i * n + j];
            if (!_g.IsZero(entry.Num))
            {
                var term = Multiply(entry, Pfaffian(m, n, rest & ~(1 << j), memo));
                var subtract = position % 2 == 1;
                acc = acc is null ? (subtract ? Negate(term) : term) : Add(acc.Value, term, subtract);
            }
            position++;
        }
        var result = acc ?? Constant(Rational.Zero);
        memo[set] = result;
        return result;
    }
}
