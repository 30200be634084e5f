using System.Numerics;
using System.Runtime.CompilerServices;
using System.Text;
using IdentityQueue.Algebra;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Exact;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Screening.HandOff;

/// <summary>
/// One candidate's proof obligation in SMT-LIB 2 over the reals: the variables to declare, the shared subterms, and the
/// assertions whose conjunction says "the identity fails somewhere". <c>unsat</c> from a solver proves the identity.
/// Immutable.
/// </summary>
public sealed record SmtLibObligation(
    IReadOnlyList<string> Declarations,
    IReadOnlyList<string> Definitions,
    IReadOnlyList<string> Assertions,
    int Denominators,
    int Entries);

/// <summary>The outcome of translating one candidate: an obligation, or why it was skipped (never an exception). Immutable.</summary>
public readonly record struct SmtLibTranslation(SmtLibObligation? Obligation, string? SkipReason)
{
    public bool Success => Obligation is not null;
}

/// <summary>
/// Translates an identity with its parameters fixed into an SMT-LIB 2 script asserting its negation over the reals
/// (<c>QF_NRA</c>). Everything is expanded into + − × and rational constants: sums, products, binom, fact, the q-functions,
/// matrix literals and comprehensions, matrix sums, products, powers and transposes, tr, id(n), and det, perm and pf
/// (Laplace expansion along the first row with shared minors). Division is cleared: each side becomes N/D, every divisor
/// met on the way is asserted nonzero, and the last assertion is N_l·D_r ≠ N_r·D_l; for a matrix identity, some entry
/// differs. An identity of rational functions over Q holds exactly when no real point with all divisors nonzero tells the
/// sides apart (a nonzero polynomial over Q does not vanish on the dense set where the divisors do not), so the script is
/// <c>unsat</c> exactly when the identity is true. <c>over GF(p)</c> identities are skipped (they are not statements
/// about the reals). Limits: <see cref="HandOffLimits"/>. Stateless; thread-safe.
/// </summary>
public static class SmtLibWriter
{
    /// <summary>The SMT-LIB logic of every script: quantifier-free nonlinear real arithmetic.</summary>
    public const string Logic = "QF_NRA";

    /// <summary>The caution each script carries: screening is evidence, not proof.</summary>
    public const string Caution = "Screened by random evaluation over finite fields: very likely true, not proven; the error bound is only as good as the degree bound.";

    public static SmtLibTranslation Translate(IdentityEntry entry, IReadOnlyDictionary<string, BigInteger>? parameters = null,
        HandOffLimits? limits = null, Limits? algebraLimits = null)
    {
        limits ??= HandOffLimits.Default;
        algebraLimits ??= Limits.Default;
        parameters ??= new Dictionary<string, BigInteger>();
        if (entry.Field.IsSeries)
            return new(null, $"it is a truncated power series identity (up to {entry.Field.SeriesVariable}^{entry.Field.SeriesOrder}): it compares coefficients, which is not a statement about real values");
        if (!entry.Field.IsRationals)
            return new(null, $"it is stated over {entry.Field}, an identity of polynomials over a finite field, which cannot be stated over the reals");
        try
        {
            var expansion = new Expansion(limits, algebraLimits, parameters);
            var obligation = expansion.Negation(entry.Left, entry.Right);
            // The compiler's checks (types, and pf's skew-symmetry, which the expansion takes on trust) must pass too.
            var compiled = IdentityCompiler.Compile(entry, parameters, algebraLimits);
            if (!compiled.Success) return new(null, $"it does not compile: {compiled.Error}");
            return new(obligation, null);
        }
        catch (HandOffSkip e)
        {
            return new(null, e.Message);
        }
        catch (CompileError e)
        {
            return new(null, e.ToDiagnostic().ToString());
        }
        catch (InsufficientExecutionStackException)
        {
            return new(null, "it is nested too deeply to expand");
        }
    }

    /// <summary>The comment lines that open a candidate's script: where it came from, its evidence, and the caution.</summary>
    public static string Header(HandOffCandidate candidate)
    {
        var text = new StringBuilder();
        void Line(string s) => text.Append("; ").AppendLine(OneLine(s));
        Line($"candidate {candidate.Id}: {candidate.Label}");
        if (candidate.Family is not null) Line($"family {candidate.Family}, params {candidate.Params ?? "{}"}");
        Line($"identity: {candidate.Identity}");
        var evidence = $"screening: {candidate.State ?? "no result"}, degree bound {candidate.DegreeBound ?? "unknown"}, {candidate.Trials} trial{(candidate.Trials == 1 ? "" : "s")}";
        if (candidate.ErrorBoundExponent is { } e) evidence += $", error bound 2^{e} (error_bound_log2 {candidate.ErrorBoundLog2!.Value.ToString("R", System.Globalization.CultureInfo.InvariantCulture)})";
        Line(evidence);
        Line(Caution);
        Line("This script asserts the negation over the reals: unsat proves the identity, sat refutes it.");
        return text.ToString();
    }

    /// <summary>A whole script for one candidate: header, logic, declarations, definitions, assertions, check-sat.</summary>
    public static string Script(HandOffCandidate candidate, SmtLibObligation obligation)
    {
        var text = new StringBuilder(Header(candidate));
        text.AppendLine($"(set-logic {Logic})");
        Body(text, obligation, "");
        return text.ToString();
    }

    /// <summary>One candidate as a <c>(push 1)</c> … <c>(pop 1)</c> block of a multi-candidate script (after one set-logic).</summary>
    public static string Block(HandOffCandidate candidate, SmtLibObligation obligation)
    {
        var text = new StringBuilder(Header(candidate));
        text.AppendLine("(push 1)");
        Body(text, obligation, "  ");
        text.AppendLine("(pop 1)");
        return text.ToString();
    }

    private static void Body(StringBuilder text, SmtLibObligation obligation, string indent)
    {
        foreach (var line in obligation.Declarations.Concat(obligation.Definitions).Concat(obligation.Assertions))
            text.Append(indent).AppendLine(line);
        text.Append(indent).AppendLine("(check-sat)");
    }

    private static string OneLine(string s) => s.Replace('\r', ' ').Replace('\n', ' ');

    /// <summary>A rational function N/D of terms; <see cref="Den"/> is −1 for D = 1 and is never a constant.</summary>
    private readonly record struct Fraction(int Num, int Den)
    {
        public bool IsPolynomial => Den < 0;
    }

    /// <summary>A scalar, or a matrix of fractions in row-major order.</summary>
    private readonly record struct Value(Fraction Scalar, int Rows, int Columns, Fraction[]? Entries)
    {
        public bool IsMatrix => Entries is not null;
        public Fraction this[int i, int j] => Entries![i * Columns + j];
        public static Value Of(Fraction f) => new(f, 0, 0, null);
        public static Value Matrix(int rows, int columns, Fraction[] entries) => new(default, rows, columns, entries);
        public string Describe() => IsMatrix ? $"a {Rows}×{Columns} matrix" : "a scalar";
    }

    /// <summary>The visitor over the closed expression tree that expands it into the term graph.</summary>
    private sealed class Expansion(HandOffLimits limits, Limits algebraLimits, IReadOnlyDictionary<string, BigInteger> parameters)
        : IExprVisitor<Value>
    {
        private readonly TermGraph _g = new(limits);
        private readonly Dictionary<string, BigInteger> _scope = new(parameters, StringComparer.Ordinal);
        private readonly List<int> _divisors = [];
        // Side conditions that must hold for the identity to make sense: the sums [i,j] + [j,i] (and diagonal entries) of a
        // Pfaffian's argument, which must vanish; the negation asserts that one does not, or that the sides differ.
        private readonly List<int> _conditions = [];

        public SmtLibObligation Negation(Expr left, Expr right)
        {
            var l = left.Accept(this);
            var r = right.Accept(this);
            if (l.IsMatrix && !r.IsMatrix && right is IntegerLiteral { Value.IsZero: true }) r = Zeros(l.Rows, l.Columns);
            if (r.IsMatrix && !l.IsMatrix && left is IntegerLiteral { Value.IsZero: true }) l = Zeros(r.Rows, r.Columns);
            if (l.IsMatrix != r.IsMatrix || l.Rows != r.Rows || l.Columns != r.Columns)
                throw new HandOffSkip($"the two sides differ in type: the left is {l.Describe()}, the right is {r.Describe()}");
            var pairs = l.IsMatrix ? l.Entries!.Zip(r.Entries!).ToList() : [(l.Scalar, r.Scalar)];
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
            var declarations = _g.Variables.Select(v => $"(declare-const {TermGraph.Symbol(v)} Real)").ToList();
            return new SmtLibObligation(declarations, definitions, assertions, _divisors.Count, sides.Count);
        }

        private int Den(Fraction f) => f.IsPolynomial ? _g.One : f.Den;

        private Value Zeros(int rows, int columns) =>
            Value.Matrix(rows, columns, Enumerable.Repeat(Poly(_g.Zero), rows * columns).ToArray());

        private static Fraction Poly(int term) => new(term, -1);

        private Fraction Constant(Rational c) => Poly(_g.Constant(c));

        // ---- fractions ----

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

        private Fraction Power(Fraction a, int e) => Normal(_g.Power(a.Num, e), a.IsPolynomial ? _g.One : _g.Power(a.Den, e));

        /// <summary>N/D with a constant D folded into N.</summary>
        private Fraction Normal(int num, int den)
        {
            if (!_g.TryGetConstant(den, out var c)) return new(num, den);
            return Poly(c == Rational.One ? num : _g.Product(num, _g.Constant(Rational.One / c)));
        }

        // ---- values ----

        private Value Map(Value v, Func<Fraction, Fraction> f) =>
            v.IsMatrix ? Value.Matrix(v.Rows, v.Columns, v.Entries!.Select(f).ToArray()) : Value.Of(f(v.Scalar));

        private Value AddValues(Value l, Value r, bool subtract)
        {
            if (!l.IsMatrix && !r.IsMatrix) return Value.Of(Add(l.Scalar, r.Scalar, subtract));
            if (l.IsMatrix != r.IsMatrix || l.Rows != r.Rows || l.Columns != r.Columns)
                throw new HandOffSkip(subtract ? $"it subtracts {r.Describe()} from {l.Describe()}" : $"it adds {l.Describe()} and {r.Describe()}");
            return Value.Matrix(l.Rows, l.Columns, l.Entries!.Zip(r.Entries!, (a, b) => Add(a, b, subtract)).ToArray());
        }

        private Value MultiplyValues(Value l, Value r)
        {
            if (!l.IsMatrix && !r.IsMatrix) return Value.Of(Multiply(l.Scalar, r.Scalar));
            if (!l.IsMatrix) return Map(r, x => Multiply(l.Scalar, x));
            if (!r.IsMatrix) return Map(l, x => Multiply(x, r.Scalar));
            if (l.Columns != r.Rows) throw new HandOffSkip($"it multiplies {l.Describe()} by {r.Describe()}");
            var e = new Fraction[l.Rows * r.Columns];
            for (var i = 0; i < l.Rows; i++)
                for (var j = 0; j < r.Columns; j++)
                {
                    var acc = l.Columns == 0 ? Constant(Rational.Zero) : Multiply(l[i, 0], r[0, j]);
                    for (var k = 1; k < l.Columns; k++) acc = Add(acc, Multiply(l[i, k], r[k, j]), subtract: false);
                    e[i * r.Columns + j] = acc;
                }
            return Value.Matrix(l.Rows, r.Columns, e);
        }

        private Value Identity(int n)
        {
            CheckOrder(n, n);
            var e = new Fraction[n * n];
            for (var i = 0; i < n; i++)
                for (var j = 0; j < n; j++) e[i * n + j] = Poly(i == j ? _g.One : _g.Zero);
            return Value.Matrix(n, n, e);
        }

        private void CheckOrder(BigInteger rows, BigInteger columns)
        {
            if (rows > limits.MaxMatrixOrder || columns > limits.MaxMatrixOrder)
                throw new HandOffSkip($"it has a {rows}×{columns} matrix; the limit MaxMatrixOrder is {limits.MaxMatrixOrder}");
        }

        private BigInteger Integer(Expr e, string context) => ParameterEvaluator.EvaluateInteger(e, _scope, algebraLimits, context);

        private Fraction Exact(Expr e, string context)
        {
            var value = ParameterEvaluator.EvaluateRational(e, _scope, algebraLimits, context);
            if (value.Numerator.GetBitLength() > limits.MaxConstantBits || value.Denominator.GetBitLength() > limits.MaxConstantBits)
                throw new HandOffSkip($"{ExprPrinter.Print(e)} has more than {limits.MaxConstantBits} bits (the limit MaxConstantBits)");
            return Constant(value);
        }

        private int Count(Expr e, string what)
        {
            var n = Integer(e, what);
            if (n.Sign < 0) throw new HandOffSkip($"{what} must be non-negative, but it is {n}");
            if (n > limits.MaxExpansionSteps) throw new HandOffSkip($"{what} is {n}, more than the limit MaxExpansionSteps ({limits.MaxExpansionSteps})");
            return (int)n;
        }

        private Fraction ScalarOf(Expr e, string role)
        {
            var v = e.Accept(this);
            return v.IsMatrix ? throw new HandOffSkip($"{role} must be a scalar, but it is {v.Describe()}") : v.Scalar;
        }

        private Value MatrixOf(Expr e, string role)
        {
            var v = e.Accept(this);
            return v.IsMatrix ? v : throw new HandOffSkip($"{role} must be a matrix, but it is a scalar");
        }

        private void Visit()
        {
            _g.Step();
            RuntimeHelpers.EnsureSufficientExecutionStack();
        }

        // ---- the visitor ----

        public Value VisitInteger(IntegerLiteral node)
        {
            Visit();
            return Value.Of(Constant(node.Value));
        }

        public Value VisitName(NameRef node)
        {
            Visit();
            return Value.Of(_scope.TryGetValue(node.Name, out var p) ? Constant(p) : Poly(_g.Variable(node.Name)));
        }

        public Value VisitIndexed(IndexedName node)
        {
            Visit();
            if (_scope.ContainsKey(node.Name)) throw new HandOffSkip($"'{node.Name}' is an integer parameter and cannot be indexed");
            var indices = node.Indices.Select(i => Integer(i, "an index").ToString(System.Globalization.CultureInfo.InvariantCulture));
            return Value.Of(Poly(_g.Variable($"{node.Name}[{string.Join(',', indices)}]")));
        }

        public Value VisitUnary(UnaryExpr node)
        {
            Visit();
            return Map(node.Operand.Accept(this), Negate);
        }

        public Value VisitSum(SumExpr node)
        {
            Visit();
            var acc = node.Terms[0].Value.Accept(this);
            for (var i = 1; i < node.Terms.Count; i++)
                acc = AddValues(acc, node.Terms[i].Value.Accept(this), node.Terms[i].Subtract);
            return acc;
        }

        public Value VisitProduct(ProductExpr node)
        {
            Visit();
            var acc = node.Factors[0].Value.Accept(this);
            for (var i = 1; i < node.Factors.Count; i++)
            {
                var r = node.Factors[i].Value.Accept(this);
                if (!node.Factors[i].Divide) acc = MultiplyValues(acc, r);
                else if (r.IsMatrix) throw new HandOffSkip($"it divides by a matrix ({r.Describe()})");
                else acc = Map(acc, x => Divide(x, r.Scalar));
            }
            return acc;
        }

        public Value VisitBinary(BinaryExpr node)
        {
            Visit();
            if (Builtins.IsComparison(node.Operator)) return Value.Of(Exact(node, "a condition"));
            return PowerOf(node);
        }

        private Value PowerOf(BinaryExpr node)
        {
            var b = node.Left.Accept(this);
            var e = Integer(node.Right, "an exponent");
            if (BigInteger.Abs(e) > limits.MaxExponent)
                throw new HandOffSkip($"it has the exponent {e}; the limit MaxExponent is {limits.MaxExponent} (a power is written out as a product)");
            var k = (int)BigInteger.Abs(e);
            if (e.Sign < 0)
            {
                // b^(−k) = 1/b^k: a division, so b^k is asserted nonzero like every divisor.
                if (b.IsMatrix) throw new HandOffSkip($"the exponent is {e}; a matrix has only non-negative integer powers");
                return Value.Of(Divide(Constant(Rational.One), Power(b.Scalar, k)));
            }
            if (!b.IsMatrix) return Value.Of(Power(b.Scalar, k));
            if (b.Rows != b.Columns) throw new HandOffSkip($"only a square matrix has powers, not {b.Describe()}");
            var result = Identity(b.Rows);
            var square = b;
            while (k > 0)
            {
                if ((k & 1) == 1) result = MultiplyValues(result, square);
                k >>= 1;
                if (k > 0) square = MultiplyValues(square, square);
            }
            return result;
        }

        public Value VisitCall(CallExpr node)
        {
            Visit();
            var args = node.Arguments;
            switch (node.Function)
            {
                case Builtins.Fact:
                {
                    var n = Count(args[0], "fact's argument");
                    var f = BigInteger.One;
                    for (var i = 2; i <= n; i++)
                    {
                        f *= i;
                        if (f.GetBitLength() > limits.MaxConstantBits)
                            throw new HandOffSkip($"fact({n}) has more than {limits.MaxConstantBits} bits (the limit MaxConstantBits)");
                    }
                    return Value.Of(Constant(f));
                }
                case Builtins.Binom:
                {
                    // binom(a, k) = a(a−1)…(a−k+1)/k!, and 0 for k < 0.
                    var a = ScalarOf(args[0], "binom's first argument");
                    var k = Integer(args[1], "binom's second argument");
                    if (k.Sign < 0) return Value.Of(Constant(Rational.Zero));
                    var count = Count(args[1], "binom's second argument");
                    var acc = Constant(Rational.One);
                    var factorial = BigInteger.One;
                    for (var i = 0; i < count; i++)
                    {
                        acc = Multiply(acc, Add(a, Constant(i), subtract: true));
                        factorial *= i + 1;
                        if (factorial.GetBitLength() > limits.MaxConstantBits)
                            throw new HandOffSkip($"binom's {count}! has more than {limits.MaxConstantBits} bits (the limit MaxConstantBits)");
                    }
                    return Value.Of(Multiply(acc, Constant(Rational.Create(1, factorial))));
                }
                case Builtins.QInt:
                {
                    var n = Count(args[0], "qint's first argument");
                    return Value.Of(QInts(ScalarOf(args[1], "qint's second argument"), n)[n]);
                }
                case Builtins.QFact:
                {
                    var n = Count(args[0], "qfact's first argument");
                    var ints = QInts(ScalarOf(args[1], "qfact's second argument"), n);
                    var acc = Constant(Rational.One);
                    for (var i = 1; i <= n; i++) acc = Multiply(acc, ints[i]);
                    return Value.Of(acc);
                }
                case Builtins.QBinom:
                    return Value.Of(QBinomial(node));
                case Builtins.When:
                    // Decided once the parameters are fixed: only the chosen branch is written.
                    return ParameterEvaluator.EvaluateRational(args[0], _scope, algebraLimits, "when's condition").IsZero
                        ? args[2].Accept(this) : args[1].Accept(this);
                case Builtins.Det:
                case Builtins.Permanent:
                case Builtins.Pfaffian:
                    return Value.Of(MatrixFunction(node));
                case Builtins.Trace:
                {
                    var m = MatrixOf(args[0], "tr's argument");
                    if (m.Rows != m.Columns) throw new HandOffSkip($"tr needs a square matrix, not {m.Describe()}");
                    var acc = Constant(Rational.Zero);
                    for (var i = 0; i < m.Rows; i++) acc = Add(acc, m[i, i], subtract: false);
                    return Value.Of(acc);
                }
                case Builtins.Transpose:
                {
                    var m = MatrixOf(args[0], "transpose's argument");
                    var e = new Fraction[m.Entries!.Length];
                    for (var i = 0; i < m.Rows; i++)
                        for (var j = 0; j < m.Columns; j++) e[j * m.Rows + i] = m[i, j];
                    return Value.Matrix(m.Columns, m.Rows, e);
                }
                case Builtins.Identity:
                    return Identity(Order(args[0], "id's argument"));
                case Builtins.Zero:
                {
                    var rows = Order(args[0], "zero's first argument");
                    var columns = args.Count == 2 ? Order(args[1], "zero's second argument") : rows;
                    CheckOrder(rows, columns);
                    return Zeros(rows, columns);
                }
                case Builtins.Diagonal:
                {
                    var values = args.Select(a => a.Accept(this)).ToList();
                    var entries = values is [{ IsMatrix: true } v] && (v.Rows == 1 || v.Columns == 1) ? v.Entries!.ToList()
                        : values.Select(x => x.IsMatrix ? throw new HandOffSkip($"an argument of diag is {x.Describe()}") : x.Scalar).ToList();
                    CheckOrder(entries.Count, entries.Count);
                    var e = Enumerable.Repeat(Poly(_g.Zero), entries.Count * entries.Count).ToArray();
                    for (var i = 0; i < entries.Count; i++) e[i * entries.Count + i] = entries[i];
                    return Value.Matrix(entries.Count, entries.Count, e);
                }
                case Builtins.Entry:
                {
                    var m = MatrixOf(args[0], "the matrix of an entry");
                    var i = Integer(args[1], "a row index");
                    var j = Integer(args[2], "a column index");
                    if (i < 1 || i > m.Rows || j < 1 || j > m.Columns) throw new HandOffSkip($"the entry [{i},{j}] is outside {m.Describe()}");
                    return Value.Of(m[(int)i - 1, (int)j - 1]);
                }
                case Builtins.Submatrix:
                    return Submatrix(node);
                case Builtins.Minor:
                {
                    var sub = Submatrix(node);
                    if (sub.Rows != sub.Columns) throw new HandOffSkip($"minor selects {sub.Rows} rows and {sub.Columns} columns");
                    return Value.Of(Determinant(sub, "minor"));
                }
                case Builtins.Adjugate:
                    return Adjugate(SquareOf(args[0], "adj"));
                case Builtins.Inverse:
                {
                    // inv(M) = adj(M)/det(M), with det(M) asserted nonzero like every divisor.
                    var m = SquareOf(args[0], "inv");
                    var det = Determinant(m, "inv");
                    return Map(Adjugate(m), x => Divide(x, det));
                }
                default:
                    // The integer and number functions of integer arguments are exact rational constants here.
                    if (Builtins.ParameterFunctions.Contains(node.Function)) return Value.Of(Exact(node, $"an argument of {node.Function}"));
                    throw new HandOffSkip($"it uses the unknown function '{node.Function}'");
            }
        }

        /// <summary>qint(0..n, q) with qint(i+1) = qint(i) + q^i.</summary>
        private Fraction[] QInts(Fraction q, int n)
        {
            var ints = new Fraction[n + 1];
            ints[0] = Constant(Rational.Zero);
            var power = Constant(Rational.One);
            for (var i = 0; i < n; i++)
            {
                ints[i + 1] = Add(ints[i], power, subtract: false);
                power = Multiply(power, q);
            }
            return ints;
        }

        /// <summary>Gaussian binomial by the q-Pascal rule [m,j] = [m−1,j−1] + q^j·[m−1,j], division-free.</summary>
        private Fraction QBinomial(CallExpr node)
        {
            var args = node.Arguments;
            var nValue = Integer(args[0], "qbinom's first argument");
            var kValue = Integer(args[1], "qbinom's second argument");
            var q = ScalarOf(args[2], "qbinom's third argument");
            if (nValue.Sign < 0) throw new HandOffSkip($"qbinom's first argument must be non-negative, but it is {nValue}");
            if (kValue.Sign < 0 || kValue > nValue) return Constant(Rational.Zero);
            var n = Count(args[0], "qbinom's first argument");
            var k = (int)kValue;
            _g.Step((long)n * (k + 1));
            var powers = new Fraction[k + 1];
            powers[0] = Constant(Rational.One);
            for (var j = 1; j <= k; j++) powers[j] = Multiply(powers[j - 1], q);
            var row = new Fraction[k + 1];
            row[0] = Constant(Rational.One);
            for (var j = 1; j <= k; j++) row[j] = Constant(Rational.Zero);
            for (var m = 1; m <= n; m++)
                for (var j = Math.Min(m, k); j >= 1; j--)
                    row[j] = Add(row[j - 1], Multiply(powers[j], row[j]), subtract: false);
            return row[k];
        }

        private Fraction MatrixFunction(CallExpr node)
        {
            var m = SquareOf(node.Arguments[0], node.Function);
            var n = m.Rows;
            if (n > limits.MaxExpansionOrder)
                throw new HandOffSkip($"it has {node.Function} of a {n}×{n} matrix; the limit MaxExpansionOrder is {limits.MaxExpansionOrder}");
            var memo = new Dictionary<int, Fraction>();
            switch (node.Function)
            {
                case Builtins.Det: return Laplace(m, 0, (1 << n) - 1, signed: true, memo);
                case Builtins.Permanent: return Laplace(m, 0, (1 << n) - 1, signed: false, memo);
                default:
                    if (n % 2 == 1) throw new HandOffSkip($"pf needs a skew-symmetric matrix of even order, but this one is {n}×{n}");
                    // Skew-symmetry as the compiler checks it: as values, not as spelling.
                    for (var i = 0; i < n; i++)
                    {
                        if (!_g.IsZero(m[i, i].Num)) _conditions.Add(m[i, i].Num);
                        for (var j = i + 1; j < n; j++)
                        {
                            var sum = Add(m[i, j], m[j, i], subtract: false);
                            if (!_g.IsZero(sum.Num)) _conditions.Add(sum.Num);
                        }
                    }
                    return Pfaffian(m, (1 << n) - 1, memo);
            }
        }

        private Value SquareOf(Expr e, string function)
        {
            var m = MatrixOf(e, $"{function}'s argument");
            return m.Rows == m.Columns ? m : throw new HandOffSkip($"{function} needs a square matrix, not {m.Describe()}");
        }

        private Fraction Determinant(Value m, string function)
        {
            if (m.Rows > limits.MaxExpansionOrder)
                throw new HandOffSkip($"it has {function} of a {m.Rows}×{m.Rows} matrix; the limit MaxExpansionOrder is {limits.MaxExpansionOrder}");
            return Laplace(m, 0, (1 << m.Rows) - 1, signed: true, new Dictionary<int, Fraction>());
        }

        /// <summary>adj(M)[i,j] = (−1)^(i+j)·det(M without row j and column i).</summary>
        private Value Adjugate(Value m)
        {
            var n = m.Rows;
            var e = new Fraction[n * n];
            for (var i = 0; i < n; i++)
                for (var j = 0; j < n; j++)
                {
                    var minor = new List<Fraction>();
                    for (var r = 0; r < n; r++)
                        for (var c = 0; c < n; c++)
                            if (r != j && c != i) minor.Add(m[r, c]);
                    var cofactor = Determinant(Value.Matrix(n - 1, n - 1, [.. minor]), "adj");
                    e[i * n + j] = (i + j) % 2 == 0 ? cofactor : Negate(cofactor);
                }
            return Value.Matrix(n, n, e);
        }

        private int Order(Expr e, string what)
        {
            var n = Integer(e, what);
            if (n.Sign < 0) throw new HandOffSkip($"{what} is {n}; it must be at least 0");
            CheckOrder(n, n);
            return (int)n;
        }

        private Value Submatrix(CallExpr node)
        {
            var m = MatrixOf(node.Arguments[0], $"{node.Function}'s first argument");
            var rows = Indices(node.Arguments[1], m.Rows, "row");
            var columns = Indices(node.Arguments[2], m.Columns, "column");
            var e = new Fraction[rows.Count * columns.Count];
            for (var i = 0; i < rows.Count; i++)
                for (var j = 0; j < columns.Count; j++) e[i * columns.Count + j] = m[rows[i], columns[j]];
            return Value.Matrix(rows.Count, columns.Count, e);
        }

        private List<int> Indices(Expr list, int size, string what)
        {
            if (list is not CallExpr { Function: Builtins.IndexList } call) throw new HandOffSkip($"a list of {what} indices is missing");
            var result = new List<int>();
            foreach (var item in call.Arguments)
            {
                var (from, to) = item is CallExpr { Function: Builtins.Range } range
                    ? (Integer(range.Arguments[0], "a range start"), Integer(range.Arguments[1], "a range end"))
                    : (Integer(item, $"a {what} index"), Integer(item, $"a {what} index"));
                for (var k = from; k <= to; k++)
                {
                    if (k < 1 || k > size) throw new HandOffSkip($"the {what} index {k} is outside 1..{size}");
                    CheckOrder(result.Count, 0);
                    result.Add((int)k - 1);
                }
            }
            return result;
        }

        /// <summary>
        /// det (or perm) of the rows row..n−1 and the columns in <paramref name="columns"/>, by expansion along the first
        /// of those rows; one value per set of columns (the minor of the rows below depends only on the columns left).
        /// </summary>
        private Fraction Laplace(Value m, int row, int columns, bool signed, Dictionary<int, Fraction> memo)
        {
            if (columns == 0) return Constant(Rational.One);
            if (memo.TryGetValue(columns, out var known)) return known;
            Fraction? acc = null;
            var position = 0;
            for (var j = 0; j < m.Columns; j++)
            {
                if ((columns & (1 << j)) == 0) continue;
                var entry = m[row, j];
                if (!_g.IsZero(entry.Num))
                {
                    var term = Multiply(entry, Laplace(m, row + 1, columns & ~(1 << j), signed, memo));
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
        private Fraction Pfaffian(Value m, int set, Dictionary<int, Fraction> memo)
        {
            if (set == 0) return Constant(Rational.One);
            if (memo.TryGetValue(set, out var known)) return known;
            var i = BitOperations.TrailingZeroCount(set);
            var rest = set & ~(1 << i);
            Fraction? acc = null;
            var position = 0;
            for (var j = i + 1; j < m.Columns; j++)
            {
                if ((rest & (1 << j)) == 0) continue;
                var entry = m[i, j];
                if (!_g.IsZero(entry.Num))
                {
                    var term = Multiply(entry, Pfaffian(m, rest & ~(1 << j), memo));
                    var subtract = position % 2 == 1;
                    acc = acc is null ? (subtract ? Negate(term) : term) : Add(acc.Value, term, subtract);
                }
                position++;
            }
            var result = acc ?? Constant(Rational.Zero);
            memo[set] = result;
            return result;
        }

        public Value VisitBound(BoundExpr node)
        {
            Visit();
            var from = Integer(node.From, "a range start");
            var to = Integer(node.To, "a range end");
            if (to - from + 1 > limits.MaxExpansionSteps)
                throw new HandOffSkip($"the range {from}..{to} has more than {limits.MaxExpansionSteps} terms (the limit MaxExpansionSteps)");
            var saved = _scope.TryGetValue(node.Variable, out var outer);
            Value? acc = null;
            try
            {
                for (var k = from; k <= to; k++)
                {
                    _scope[node.Variable] = k;
                    var term = node.Body.Accept(this);
                    acc = acc is null ? term : node.Kind == BoundKind.Sum ? AddValues(acc.Value, term, subtract: false) : MultiplyValues(acc.Value, term);
                }
            }
            finally
            {
                if (saved) _scope[node.Variable] = outer; else _scope.Remove(node.Variable);
            }
            return acc ?? Value.Of(Constant(node.Kind == BoundKind.Sum ? Rational.Zero : Rational.One));
        }

        public Value VisitMatrixComprehension(MatrixComprehension node)
        {
            Visit();
            var r0 = Integer(node.RowFrom, "a range start");
            var r1 = Integer(node.RowTo, "a range end");
            var c0 = Integer(node.ColumnFrom, "a range start");
            var c1 = Integer(node.ColumnTo, "a range end");
            var rows = r1 - r0 + 1;
            var columns = c1 - c0 + 1;
            if (rows < 0) rows = 0;
            if (columns < 0) columns = 0;
            CheckOrder(rows, columns);
            var e = new Fraction[(int)rows * (int)columns];
            var savedRow = _scope.TryGetValue(node.RowVariable, out var outerRow);
            var savedColumn = _scope.TryGetValue(node.ColumnVariable, out var outerColumn);
            try
            {
                for (var i = 0; i < (int)rows; i++)
                    for (var j = 0; j < (int)columns; j++)
                    {
                        _scope[node.RowVariable] = r0 + i;
                        _scope[node.ColumnVariable] = c0 + j;
                        e[i * (int)columns + j] = ScalarOf(node.Body, "a matrix entry");
                    }
            }
            finally
            {
                if (savedRow) _scope[node.RowVariable] = outerRow; else _scope.Remove(node.RowVariable);
                if (savedColumn) _scope[node.ColumnVariable] = outerColumn; else _scope.Remove(node.ColumnVariable);
            }
            return Value.Matrix((int)rows, (int)columns, e);
        }

        public Value VisitMatrixLiteral(MatrixLiteral node)
        {
            Visit();
            var rows = node.Rows.Count;
            var columns = node.Rows[0].Count;
            CheckOrder(rows, columns);
            var e = new Fraction[rows * columns];
            for (var i = 0; i < rows; i++)
            {
                if (node.Rows[i].Count != columns) throw new HandOffSkip($"row {i + 1} of a matrix has {node.Rows[i].Count} entries but row 1 has {columns}");
                for (var j = 0; j < columns; j++) e[i * columns + j] = ScalarOf(node.Rows[i][j], "a matrix entry");
            }
            return Value.Matrix(rows, columns, e);
        }
    }
}
