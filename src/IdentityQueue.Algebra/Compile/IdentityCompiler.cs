using System.Numerics;
using System.Runtime.CompilerServices;
using IdentityQueue.Algebra.Bounds;
using IdentityQueue.Algebra.Exact;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Compile;

/// <summary>One instance of an identity, compiled: the program of lhs − rhs, its bounds, and where it came from. Immutable.</summary>
public sealed record CompiledIdentity(
    IdentityEntry Entry,
    IReadOnlyDictionary<string, BigInteger> Parameters,
    StraightLineProgram Program,
    IdentityBounds Bounds)
{
    public FieldSpec Field => Entry.Field;
    public bool IsMatrixIdentity => Program.OutputNames.Length > 0;
}

/// <summary>
/// Compiles an identity (with its family parameters fixed) into a straight-line program of lhs − rhs:
/// sums, products, q-functions and matrix operations are expanded, types (scalar or matrix of a shape)
/// are checked, and integer parameter expressions are evaluated exactly. Stateless; thread-safe.
/// </summary>
public static class IdentityCompiler
{
    private static readonly IReadOnlyDictionary<string, BigInteger> NoParameters = new Dictionary<string, BigInteger>();

    /// <summary>Compiles one instance; errors come back as a <see cref="Diagnostic"/> with the position, never as an exception.</summary>
    public static Result<CompiledIdentity> Compile(IdentityEntry entry, IReadOnlyDictionary<string, BigInteger>? parameters = null, Limits? limits = null)
    {
        limits ??= Limits.Default;
        parameters ??= NoParameters;
        if (entry.Field.CharacteristicParameter is not null)
        {
            // over GF(p) with p a family parameter: this instance's field.
            var field = entry.Field.Bind(parameters, limits.MaxFieldBits, out var error);
            if (field is null) return Result<CompiledIdentity>.Fail(new Diagnostic(entry.Field.ParameterPosition, error!));
            entry = entry with { Field = field };
        }
        var walker = new Walker(limits, parameters, shareParameters: false, Series(entry.Field));
        try
        {
            var program = walker.CompileDifference(entry.Left, entry.Right);
            var bounds = BoundAnalysis.Analyse(program);
            return Result<CompiledIdentity>.Ok(new CompiledIdentity(entry, parameters, program, bounds));
        }
        catch (CompileError e)
        {
            var order = entry.Parameters.Count > 0 ? entry.Parameters.Select(p => p.Name).ToList()
                : parameters.Keys.OrderBy(k => k, StringComparer.Ordinal).ToList();
            return Result<CompiledIdentity>.Fail(e.ToDiagnostic(walker.Side, parameters, order));
        }
        catch (ProgramTooLargeException)
        {
            return Result<CompiledIdentity>.Fail(new Diagnostic(walker.LastPosition,
                $"the identity expands to more than {limits.MaxProgramSize} instructions (the limit MaxProgramSize)"));
        }
        catch (InsufficientExecutionStackException)
        {
            return Result<CompiledIdentity>.Fail(new Diagnostic(walker.LastPosition,
                $"the expression is nested too deeply to compile (see the limit MaxNestingDepth, {limits.MaxNestingDepth})"));
        }
    }

    /// <summary>
    /// Compiles a family's expression once for all its instances, with its parameters kept as constants of their own
    /// (<paramref name="parameters"/> is any one instance's values). Null when that cannot be: a parameter fixes the
    /// structure (a range, an exponent, an index, a matrix size, an argument of binom or a q-function), or this instance does
    /// not compile; then each instance is compiled with its parameters fixed.
    /// </summary>
    public static FamilyTemplate? CompileTemplate(IdentityEntry entry, IReadOnlyDictionary<string, BigInteger> parameters, Limits? limits = null)
    {
        if (parameters.Count == 0 || entry.Field.CharacteristicParameter is not null) return null;
        limits ??= Limits.Default;
        var walker = new Walker(limits, parameters, shareParameters: true, Series(entry.Field));
        try
        {
            var program = walker.CompileDifference(entry.Left, entry.Right);
            return walker.ParameterFixesStructure ? null : new FamilyTemplate(entry, program);
        }
        catch (Exception e) when (e is CompileError or ProgramTooLargeException or InsufficientExecutionStackException)
        {
            return null;
        }
    }

    private static (string, int)? Series(FieldSpec field) => field.SeriesVariable is { } q ? (q, field.SeriesOrder) : null;

    /// <summary>A scalar register or a matrix of registers.</summary>
    private readonly struct Value
    {
        private Value(int scalar, int rows, int columns, int[]? entries)
        {
            Scalar = scalar;
            Rows = rows;
            Columns = columns;
            Entries = entries;
        }

        public int Scalar { get; }
        public int Rows { get; }
        public int Columns { get; }
        public int[]? Entries { get; }
        public bool IsMatrix => Entries is not null;

        public static Value Of(int register) => new(register, 0, 0, null);
        public static Value Matrix(int rows, int columns, int[] entries) => new(-1, rows, columns, entries);

        public int this[int i, int j] => Entries![i * Columns + j];

        public string Describe() => IsMatrix ? $"a {Rows}×{Columns} matrix" : "a scalar";
    }

    private sealed class Walker(Limits limits, IReadOnlyDictionary<string, BigInteger> parameters, bool shareParameters,
        (string Variable, int Order)? series = null) : IExprVisitor<Value>
    {
        private readonly ProgramBuilder _b = new(limits);
        private readonly Dictionary<string, BigInteger> _scope = new(parameters, StringComparer.Ordinal);
        // Sharing: the names whose binding in scope is the family parameter (not shadowed by a bound variable).
        private readonly HashSet<string>? _shared = shareParameters ? new HashSet<string>(parameters.Keys, StringComparer.Ordinal) : null;
        private long _steps;

        /// <summary>Sharing: a family parameter was read where an integer is needed, so its value shapes the program.</summary>
        public bool ParameterFixesStructure { get; private set; }

        public SourcePosition LastPosition { get; private set; } = new(1, 1);

        /// <summary>The side being compiled, <c>lhs</c> or <c>rhs</c>, for messages; null once both are done.</summary>
        public string? Side { get; private set; }

        public StraightLineProgram CompileDifference(Expr left, Expr right)
        {
            Side = "lhs";
            var l = left.Accept(this);
            Side = "rhs";
            var r = right.Accept(this);
            Side = null;
            if (!l.IsMatrix && !r.IsMatrix)
            {
                var d = _b.RawSubtract(l.Scalar, r.Scalar);
                return Build([d], []);
            }
            // A matrix compared with the literal 0 means the zero matrix.
            if (!r.IsMatrix && IsLiteralZero(right)) r = ZeroMatrix(l.Rows, l.Columns);
            if (!l.IsMatrix && IsLiteralZero(left)) l = ZeroMatrix(r.Rows, r.Columns);
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
            if (outputs.Length == 0) return Build([_b.RawSubtract(_b.Constant(Rational.Zero), _b.Constant(Rational.Zero))], []);
            return Build(outputs, names);
        }

        /// <summary>
        /// Side conditions found while compiling (the skew-symmetry of a Pfaffian's argument where its entries are not
        /// written as negatives of each other): registers that must vanish, with their names. They come first among the
        /// program's outputs (<see cref="StraightLineProgram.ConditionNames"/>), so a trial checks them at its point.
        /// </summary>
        private readonly List<(int Register, string Name)> _conditions = [];

        private StraightLineProgram Build(int[] outputs, string[] names) =>
            _conditions.Count == 0 ? _b.Build(outputs, names)
                : _b.Build([.. _conditions.Select(c => c.Register), .. outputs], names, [.. _conditions.Select(c => c.Name)]);

        private static bool IsLiteralZero(Expr e) => e is IntegerLiteral { Value.IsZero: true };

        private Value ZeroMatrix(int rows, int columns)
        {
            var zero = _b.Constant(Rational.Zero);
            return Value.Matrix(rows, columns, Enumerable.Repeat(zero, rows * columns).ToArray());
        }

        private void Step(Expr node)
        {
            LastPosition = node.Position;
            if (++_steps > limits.MaxProgramSize)
                throw new CompileError(node.Position, $"the identity expands to more than {limits.MaxProgramSize} terms (the limit MaxProgramSize)");
            RuntimeHelpers.EnsureSufficientExecutionStack();
        }

        private BigInteger Integer(Expr e, string context) =>
            ParameterEvaluator.EvaluateInteger(e, _shared is null ? _scope : new WatchedScope(this), limits, context);

        private Rational Exact(Expr e, string context) =>
            ParameterEvaluator.EvaluateRational(e, _shared is null ? _scope : new WatchedScope(this), limits, context);

        /// <summary>The scope as the integer evaluator sees it while sharing: reading a family parameter marks the structure as fixed by it.</summary>
        private sealed class WatchedScope(Walker walker) : IReadOnlyDictionary<string, BigInteger>
        {
            public bool TryGetValue(string key, out BigInteger value)
            {
                if (walker._shared!.Contains(key)) walker.ParameterFixesStructure = true;
                return walker._scope.TryGetValue(key, out value);
            }

            public BigInteger this[string key] => TryGetValue(key, out var value) ? value : throw new KeyNotFoundException(key);
            public IEnumerable<string> Keys => walker._scope.Keys;
            public IEnumerable<BigInteger> Values => walker._scope.Values;
            public int Count => walker._scope.Count;
            public bool ContainsKey(string key) => TryGetValue(key, out _);
            public IEnumerator<KeyValuePair<string, BigInteger>> GetEnumerator() => walker._scope.GetEnumerator();
            System.Collections.IEnumerator System.Collections.IEnumerable.GetEnumerator() => GetEnumerator();
        }

        /// <summary>Binds a bound variable for a body: it shadows a family parameter of the same name.</summary>
        private bool Shadow(string name) => _shared?.Remove(name) ?? false;

        private void Unshadow(string name, bool wasShared)
        {
            if (wasShared) _shared!.Add(name);
        }

        private int ScalarOf(Expr e, string role)
        {
            var v = e.Accept(this);
            if (v.IsMatrix) throw new CompileError(e.Position, $"{role} must be a scalar, but it is {v.Describe()}");
            return v.Scalar;
        }

        private Value MatrixOf(Expr e, string role)
        {
            var v = e.Accept(this);
            if (!v.IsMatrix) throw new CompileError(e.Position, $"{role} must be a matrix, but it is a scalar");
            return v;
        }

        public Value VisitInteger(IntegerLiteral node)
        {
            Step(node);
            return Value.Of(_b.Constant(node.Value));
        }

        public Value VisitName(NameRef node)
        {
            Step(node);
            if (!_scope.TryGetValue(node.Name, out var p)) return Value.Of(_b.Variable(node.Name));
            return Value.Of(_shared?.Contains(node.Name) == true ? _b.Parameter(node.Name, p) : _b.Constant(p));
        }

        public Value VisitIndexed(IndexedName node)
        {
            Step(node);
            if (_scope.ContainsKey(node.Name))
                throw new CompileError(node.Position, $"'{node.Name}' is an integer parameter here and cannot be indexed");
            var indices = new string[node.Indices.Count];
            for (var i = 0; i < indices.Length; i++) indices[i] = Integer(node.Indices[i], "an index").ToString();
            return Value.Of(_b.Variable($"{node.Name}[{string.Join(',', indices)}]"));
        }

        public Value VisitUnary(UnaryExpr node)
        {
            Step(node);
            var v = node.Operand.Accept(this);
            return Map(v, _b.Negate);
        }

        private Value Map(Value v, Func<int, int> f)
        {
            if (!v.IsMatrix) return Value.Of(f(v.Scalar));
            var e = new int[v.Entries!.Length];
            for (var i = 0; i < e.Length; i++) e[i] = f(v.Entries[i]);
            return Value.Matrix(v.Rows, v.Columns, e);
        }

        /// <summary>
        /// A sum, left to right. Its terms that are monomials written out (<c>3*x^2*y</c>, <c>-x*z/2</c>: integer coefficients,
        /// variables, literal exponents) are compiled together first: every distinct monomial once, in ascending degree, each
        /// from an already built one times one power where it can (x^2·y·z from x^2·y, or from y·z times x^2), so an expanded
        /// polynomial costs about one product per term plus its coefficient and its '+'. Other terms compile as they are.
        /// </summary>
        public Value VisitSum(SumExpr node)
        {
            Step(node);
            var terms = node.Terms;
            var monomials = new Monomial?[terms.Count];
            var registers = new Dictionary<string, int>(StringComparer.Ordinal);
            var built = BuildMonomials(terms, monomials, registers);
            if (built && monomials.All(m => m is not null)) return Value.Of(SumOfMonomials(terms, monomials!, registers));
            Value? acc = null;
            for (var i = 0; i < terms.Count; i++)
            {
                var term = terms[i];
                Value value;
                if (built && monomials[i] is { } m)
                {
                    Step(term.Value);
                    var coefficient = _b.Constant(m.Coefficient);
                    value = Value.Of(m.Key.Length == 0 ? coefficient : _b.Multiply(registers[m.Key], coefficient));
                }
                else value = term.Value.Accept(this);
                acc = acc is null ? value : AddOrSubtract(acc.Value, value, term.OperatorPosition, term.Subtract);
            }
            return acc!.Value;
        }

        /// <summary>
        /// A sum whose every term is a monomial: the monomials of equal coefficient (up to sign) are added first and multiplied
        /// by their coefficient once, Σ_c c·(Σ ±m), so a coefficient shared by many terms (multinomials, small integers) costs
        /// one product and one constant. Addition is exact in a field, so the order does not change the value.
        /// </summary>
        private int SumOfMonomials(IReadOnlyList<SumTerm> terms, Monomial[] monomials, Dictionary<string, int> registers)
        {
            var groups = new Dictionary<Rational, int>(); // |coefficient| → the running sum of its ±monomials
            var order = new List<Rational>();
            for (var i = 0; i < terms.Count; i++)
            {
                Step(terms[i].Value);
                var m = monomials[i];
                if (m.Coefficient.IsZero) continue;
                var magnitude = m.Coefficient.Sign < 0 ? -m.Coefficient : m.Coefficient;
                var subtract = terms[i].Subtract != (m.Coefficient.Sign < 0);
                var value = m.Key.Length == 0 ? _b.Constant(Rational.One) : registers[m.Key];
                if (groups.TryGetValue(magnitude, out var sum)) groups[magnitude] = subtract ? _b.Subtract(sum, value) : _b.Add(sum, value);
                else
                {
                    groups[magnitude] = subtract ? _b.Negate(value) : value;
                    order.Add(magnitude);
                }
            }
            var acc = -1;
            foreach (var c in order)
            {
                var part = _b.Multiply(groups[c], _b.Constant(c));
                acc = acc < 0 ? part : _b.Add(acc, part);
            }
            return acc < 0 ? _b.Constant(Rational.Zero) : acc;
        }

        /// <summary>A term c·Π x_v^e_v: its exact coefficient, its (variable register, exponent) pairs by register, and their key.</summary>
        private sealed record Monomial(Rational Coefficient, (int Variable, int Exponent)[] Powers, string Key, long Degree);

        /// <summary>
        /// Reads the monomial terms of a sum (null for the others) and builds the register of every distinct monomial, by
        /// ascending degree; false when fewer than two terms are monomials (nothing to share).
        /// </summary>
        private bool BuildMonomials(IReadOnlyList<SumTerm> terms, Monomial?[] monomials, Dictionary<string, int> registers)
        {
            var count = 0;
            for (var i = 0; i < terms.Count; i++)
                if ((monomials[i] = ReadMonomial(terms[i].Value)) is not null) count++;
            if (count < 2) return false;
            var order = monomials.Where(m => m is not null && m.Key.Length > 0).Select(m => m!).DistinctBy(m => m.Key).OrderBy(m => m.Degree).ToList();
            foreach (var m in order) registers[m.Key] = BuildMonomial(m.Powers, registers);
            return true;
        }

        /// <summary>One monomial from the ones built so far: a parent with one exponent one lower, or without one variable, times one power; else prefix by prefix.</summary>
        private int BuildMonomial((int Variable, int Exponent)[] powers, Dictionary<string, int> registers)
        {
            if (powers.Length == 1) return _b.Power(powers[0].Variable, powers[0].Exponent);
            for (var j = 0; j < powers.Length; j++)
            {
                var (v, e) = powers[j];
                var key = e > 1 ? KeyOf(powers.Select((p, k) => k == j ? (v, e - 1) : p)) : KeyOf(powers.Where((_, k) => k != j));
                if (registers.TryGetValue(key, out var r)) return _b.Multiply(r, v);
            }
            for (var j = 0; j < powers.Length; j++)
            {
                var (v, e) = powers[j];
                if (e > 1 && registers.TryGetValue(KeyOf(powers.Where((_, k) => k != j)), out var r)) return _b.Multiply(r, _b.Power(v, e));
            }
            var acc = _b.Power(powers[0].Variable, powers[0].Exponent);
            for (var k = 1; k < powers.Length; k++)
            {
                var key = KeyOf(powers.Take(k + 1));
                if (!registers.TryGetValue(key, out var prefix))
                {
                    prefix = _b.Multiply(acc, _b.Power(powers[k].Variable, powers[k].Exponent));
                    if (k < powers.Length - 1) registers[key] = prefix;
                }
                acc = prefix;
            }
            return acc;
        }

        private static string KeyOf(IEnumerable<(int Variable, int Exponent)> powers) =>
            string.Join('*', powers.Select(p => p.Exponent == 1 ? $"{p.Variable}" : $"{p.Variable}^{p.Exponent}"));

        /// <summary>
        /// The term as a monomial, or null: an optional minus, then factors that are integer literals, divisions by nonzero
        /// integer literals, variables (names not bound here) and variables to literal exponents up to MaxChainedExponent.
        /// Only the variables' registers are made here; anything else is left to the ordinary visit.
        /// </summary>
        private Monomial? ReadMonomial(Expr term)
        {
            var coefficient = Rational.One;
            while (term is UnaryExpr { Operator: UnaryOperator.Negate } negation)
            {
                coefficient = -coefficient;
                term = negation.Operand;
            }
            IReadOnlyList<ProductFactor> factors = term is ProductExpr product ? product.Factors : [new ProductFactor(term, false, term.Position)];
            var names = new List<(NameRef Name, int Exponent)>(factors.Count);
            foreach (var factor in factors)
            {
                switch (factor.Value)
                {
                    case IntegerLiteral literal when !factor.Divide:
                        coefficient *= literal.Value;
                        break;
                    case IntegerLiteral { Value.IsZero: false } literal:
                        coefficient /= literal.Value;
                        break;
                    case NameRef name when !factor.Divide && !_scope.ContainsKey(name.Name):
                        names.Add((name, 1));
                        break;
                    case BinaryExpr { Operator: BinaryOperator.Power, Left: NameRef name, Right: IntegerLiteral exponent }
                        when !factor.Divide && !_scope.ContainsKey(name.Name) && exponent.Value.Sign > 0 && exponent.Value <= ProgramBuilder.MaxChainedExponent:
                        names.Add((name, (int)exponent.Value));
                        break;
                    default:
                        return null;
                }
            }
            var powers = new SortedDictionary<int, int>();
            foreach (var (name, exponent) in names)
            {
                var register = VisitName(name).Scalar;
                powers[register] = powers.GetValueOrDefault(register) + exponent;
            }
            var pairs = powers.Select(p => (p.Key, p.Value)).ToArray();
            return new Monomial(coefficient, pairs, KeyOf(pairs), pairs.Sum(p => (long)p.Item2));
        }

        /// <summary>
        /// Left to right, except that scalar constant factors are folded together and multiplied in last: <c>3*x^2*y</c> and
        /// <c>5*x^2*y*z</c> then share <c>x^2*y</c> (hash-consing), which keeps an expanded polynomial's program small.
        /// Scalars commute with everything, so the value is the same.
        /// </summary>
        public Value VisitProduct(ProductExpr node)
        {
            Step(node);
            Value? acc = null;
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
                if (acc is null) acc = factor.Divide ? Divide(Value.Of(_b.Constant(Rational.One)), value, factor) : value;
                else acc = factor.Divide ? Divide(acc.Value, value, factor) : Multiply(acc.Value, value, factor.OperatorPosition);
            }
            if (acc is null) return Value.Of(constant);
            return constant < 0 ? acc.Value : Multiply(acc.Value, Value.Of(constant), node.Position);
        }

        public Value VisitBinary(BinaryExpr node)
        {
            Step(node);
            // A comparison (a hand-built tree may hold one outside iverson/when) is 1 or 0.
            if (Builtins.IsComparison(node.Operator)) return Value.Of(_b.Constant(Exact(node, "a condition")));
            return Power(node);
        }

        private Value AddOrSubtract(Value l, Value r, SourcePosition at, bool subtract)
        {
            var verb = subtract ? "subtract" : "add";
            if (!l.IsMatrix && !r.IsMatrix)
                return Value.Of(subtract ? _b.Subtract(l.Scalar, r.Scalar) : _b.Add(l.Scalar, r.Scalar));
            if (l.IsMatrix != r.IsMatrix || l.Rows != r.Rows || l.Columns != r.Columns)
                throw new CompileError(at, subtract
                    ? $"cannot subtract {r.Describe()} from {l.Describe()}"
                    : $"cannot {verb} {l.Describe()} and {r.Describe()}");
            var e = new int[l.Entries!.Length];
            for (var i = 0; i < e.Length; i++)
                e[i] = subtract ? _b.Subtract(l.Entries[i], r.Entries![i]) : _b.Add(l.Entries[i], r.Entries![i]);
            return Value.Matrix(l.Rows, l.Columns, e);
        }

        private Value Multiply(Value l, Value r, SourcePosition at)
        {
            if (!l.IsMatrix && !r.IsMatrix) return Value.Of(_b.Multiply(l.Scalar, r.Scalar));
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
            return Value.Matrix(l.Rows, r.Columns, e);
        }

        private Value Divide(Value l, Value r, ProductFactor divisor)
        {
            if (r.IsMatrix) throw new CompileError(divisor.Value.Position, $"cannot divide by a matrix ({r.Describe()})");
            if (_b.TryGetConstant(r.Scalar, out var c) && c.IsZero)
                throw new CompileError(divisor.OperatorPosition, "division by zero");
            var inverse = _b.Invert(r.Scalar);
            return Map(l, x => _b.Multiply(x, inverse));
        }

        private Value Power(BinaryExpr node)
        {
            var b = node.Left.Accept(this);
            var e = Integer(node.Right, "an exponent");
            var bits = BigInteger.Abs(e).GetBitLength();
            if (bits > limits.MaxExponentBits)
                throw new CompileError(node.Right.Position, $"the exponent has {bits} bits; the limit MaxExponentBits is {limits.MaxExponentBits}");
            if (e.Sign < 0)
            {
                // A negative exponent is a reciprocal, b^e = 1/b^(−e), undefined only where b vanishes (an Invert instruction: such a
                // point is resampled). The bounds follow from the rules for Power and Invert.
                if (b.IsMatrix) throw new CompileError(node.Right.Position, $"the exponent is {e}; a matrix has only non-negative integer powers");
                if (_b.TryGetConstant(b.Scalar, out var c) && c.IsZero)
                    throw new CompileError(node.OperatorPosition, $"0 raised to the negative power {e}");
                return Value.Of(_b.Invert(_b.Power(b.Scalar, -e)));
            }
            if (!b.IsMatrix) return Value.Of(_b.Power(b.Scalar, e));
            if (b.Rows != b.Columns) throw new CompileError(node.Left.Position, $"only a square matrix has powers, not {b.Describe()}");
            var result = Identity(b.Rows);
            var square = b;
            while (!e.IsZero)
            {
                if (!e.IsEven) result = Multiply(result, square, node.OperatorPosition);
                e >>= 1;
                if (!e.IsZero) square = Multiply(square, square, node.OperatorPosition);
            }
            return result;
        }

        private Value Identity(int n)
        {
            var one = _b.Constant(Rational.One);
            var zero = _b.Constant(Rational.Zero);
            var e = new int[n * n];
            for (var i = 0; i < n; i++)
                for (var j = 0; j < n; j++) e[i * n + j] = i == j ? one : zero;
            return Value.Matrix(n, n, e);
        }

        private int CheckedCount(BigInteger count, Expr at, string what)
        {
            if (count > limits.MaxFunctionArgument)
                throw new CompileError(at.Position, $"{what} is {count}; the limit MaxFunctionArgument is {limits.MaxFunctionArgument}");
            return (int)count;
        }

        public Value VisitCall(CallExpr node)
        {
            Step(node);
            var args = node.Arguments;
            switch (node.Function)
            {
                case Builtins.Fact:
                {
                    var n = Integer(args[0], "fact's argument");
                    if (n.Sign < 0) throw new CompileError(args[0].Position, $"fact's argument must be non-negative, but it is {n}");
                    var count = CheckedCount(n, args[0], "fact's argument");
                    var acc = _b.Constant(Rational.One);
                    for (var i = 2; i <= count; i++) acc = _b.Multiply(acc, _b.Constant(i));
                    return Value.Of(acc);
                }
                case Builtins.Binom:
                {
                    var a = ScalarOf(args[0], "binom's first argument");
                    var k = Integer(args[1], "binom's second argument");
                    if (k.Sign < 0) return Value.Of(_b.Constant(Rational.Zero));
                    var count = CheckedCount(k, args[1], "binom's second argument");
                    // A constant first argument gives an exact constant, with no 1/k! in the program: binom(10, 3) stays
                    // defined over GF(3) (Lucas' congruences), where the constant 1/3! is not.
                    if (_b.TryGetConstant(a, out var constant)
                        && (long)count * (Math.Max(constant.Numerator.GetBitLength(), constant.Denominator.GetBitLength()) + 1) <= ProgramBuilder.MaxFoldedBits)
                    {
                        var exact = Rational.One;
                        for (var i = 0; i < count; i++) exact = exact * (constant - i) / (i + 1);
                        return Value.Of(_b.Constant(exact));
                    }
                    var acc = _b.Constant(Rational.One);
                    var factorial = BigInteger.One;
                    for (var i = 0; i < count; i++)
                    {
                        acc = _b.Multiply(acc, _b.Subtract(a, _b.Constant(i)));
                        factorial *= i + 1;
                    }
                    return Value.Of(_b.Multiply(acc, _b.Constant(Rational.Create(1, factorial))));
                }
                case Builtins.QInt:
                {
                    var n = QCount(args[0], "qint's first argument");
                    var q = ScalarOf(args[1], "qint's second argument");
                    return Value.Of(QInts(q, n)[n]);
                }
                case Builtins.QFact:
                {
                    var n = QCount(args[0], "qfact's first argument");
                    var q = ScalarOf(args[1], "qfact's second argument");
                    var ints = QInts(q, n);
                    var acc = _b.Constant(Rational.One);
                    for (var i = 1; i <= n; i++) acc = _b.Multiply(acc, ints[i]);
                    return Value.Of(acc);
                }
                case Builtins.QBinom:
                    return Value.Of(QBinomial(node));
                case Builtins.When:
                    // The condition is decided once the parameters are fixed; only the chosen branch is compiled.
                    return Exact(args[0], "when's condition").IsZero ? args[2].Accept(this) : args[1].Accept(this);
                case Builtins.Det:
                case Builtins.Permanent:
                case Builtins.Pfaffian:
                    return Value.Of(MatrixFunction(node));
                case Builtins.Trace:
                {
                    var m = MatrixOf(args[0], "tr's argument");
                    if (m.Rows != m.Columns) throw new CompileError(args[0].Position, $"tr needs a square matrix, not {m.Describe()}");
                    var acc = _b.Constant(Rational.Zero);
                    for (var i = 0; i < m.Rows; i++) acc = _b.Add(acc, m[i, i]);
                    return Value.Of(acc);
                }
                case Builtins.Transpose:
                {
                    var m = MatrixOf(args[0], "transpose's argument");
                    var e = new int[m.Entries!.Length];
                    for (var i = 0; i < m.Rows; i++)
                        for (var j = 0; j < m.Columns; j++) e[j * m.Rows + i] = m[i, j];
                    return Value.Matrix(m.Columns, m.Rows, e);
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
                    var m = MatrixOf(args[0], "the matrix of an entry");
                    var i = Integer(args[1], "a row index");
                    var j = Integer(args[2], "a column index");
                    if (i < 1 || i > m.Rows || j < 1 || j > m.Columns)
                        throw new CompileError(args[i < 1 || i > m.Rows ? 1 : 2].Position,
                            $"the entry [{i},{j}] is outside {m.Describe()} (rows and columns count from 1)");
                    return Value.Of(m[(int)i - 1, (int)j - 1]);
                }
                case Builtins.Submatrix:
                    return Submatrix(node);
                case Builtins.Minor:
                {
                    var sub = Submatrix(node);
                    if (sub.Rows != sub.Columns)
                        throw new CompileError(node.Position, $"minor needs as many rows as columns, but it selects {sub.Rows} rows and {sub.Columns} columns");
                    return Value.Of(Determinant(sub));
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
                    return Map(Adjugate(m), x => _b.Multiply(x, inverse));
                }
                default:
                    // The integer and number functions of integer arguments are exact constants once the parameters are fixed, so their
                    // degree is 0 and their height that of the constant (the rule for Constant).
                    if (Builtins.ParameterFunctions.Contains(node.Function)) return Value.Of(_b.Constant(Exact(node, $"an argument of {node.Function}")));
                    throw new CompileError(node.Position, $"unknown function '{node.Function}'");
            }
        }

        private int QCount(Expr e, string what)
        {
            var n = Integer(e, what);
            if (n.Sign < 0) throw new CompileError(e.Position, $"{what} must be non-negative, but it is {n}");
            return CheckedCount(n, e, what);
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
        private int QBinomial(CallExpr node)
        {
            var args = node.Arguments;
            var nValue = Integer(args[0], "qbinom's first argument");
            var kValue = Integer(args[1], "qbinom's second argument");
            var q = ScalarOf(args[2], "qbinom's third argument");
            if (nValue.Sign < 0) throw new CompileError(args[0].Position, $"qbinom's first argument must be non-negative, but it is {nValue}");
            if (kValue.Sign < 0 || kValue > nValue) return _b.Constant(Rational.Zero);
            var n = CheckedCount(nValue, args[0], "qbinom's first argument");
            var k = (int)kValue;
            if ((long)n * (k + 1) > limits.MaxProgramSize)
                throw new CompileError(node.Position, $"qbinom({n}, {k}, ·) expands to more than {limits.MaxProgramSize} instructions (the limit MaxProgramSize)");
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

        private int MatrixFunction(CallExpr node)
        {
            var m = MatrixOf(node.Arguments[0], $"{node.Function}'s argument");
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
                    if (n > limits.MaxPermanentOrder)
                        throw new CompileError(node.Position, $"perm of a {n}×{n} matrix exceeds the limit MaxPermanentOrder ({limits.MaxPermanentOrder})");
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
        private void SkewConditions(Value m, SourcePosition at)
        {
            var n = m.Rows;
            var where = $"pf's argument at {at}";
            for (var i = 0; i < n; i++)
            {
                if (_b.TryGetConstant(m[i, i], out var d))
                {
                    if (!d.IsZero) throw new CompileError(at, $"pf needs a skew-symmetric matrix, but entry [{i + 1},{i + 1}] is {d}, not 0");
                }
                else _conditions.Add((m[i, i], $"{where}: entry [{i + 1},{i + 1}]"));
                for (var j = i + 1; j < n; j++)
                {
                    if (_b.AreNegatives(m[i, j], m[j, i])) continue;
                    var sum = _b.Add(m[i, j], m[j, i]);
                    if (_b.TryGetConstant(sum, out var c))
                    {
                        if (c.IsZero) continue;
                        throw new CompileError(at, $"pf needs a skew-symmetric matrix, but entry [{j + 1},{i + 1}] is not the negative of entry [{i + 1},{j + 1}] (their sum is {c})");
                    }
                    _conditions.Add((sum, $"{where}: entry [{i + 1},{j + 1}] + entry [{j + 1},{i + 1}]"));
                }
            }
        }

        private int Determinant(Value m) => m.Rows switch
        {
            0 => _b.Constant(Rational.One),
            1 => m[0, 0],
            _ => ConstantDeterminant(m) is { } d ? _b.Constant(d) : _b.MatrixFunction(OpCode.Determinant, m.Rows, m.Entries),
        };

        /// <summary>
        /// The exact determinant of a small matrix of constants (Gaussian elimination over Q), so that inv(zero(2)) is seen
        /// to divide by 0; null when an entry is not a constant, or the matrix is larger than 8×8.
        /// </summary>
        private Rational? ConstantDeterminant(Value m)
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

        private Value SquareOf(Expr e, string function)
        {
            var m = MatrixOf(e, $"{function}'s argument");
            if (m.Rows != m.Columns) throw new CompileError(e.Position, $"{function} needs a square matrix, not {m.Describe()}");
            return m;
        }

        /// <summary>adj(M)[i,j] = (−1)^(i+j)·det(M without row j and column i): n² determinants of order n − 1; adj of 1×1 is [[1]].</summary>
        private Value Adjugate(Value m)
        {
            var n = m.Rows;
            if ((long)n * n * Math.Max(1, (long)(n - 1) * (n - 1)) > limits.MaxProgramSize)
                throw new CompileError(LastPosition, $"adj of a {n}×{n} matrix needs more than {limits.MaxProgramSize} operands (the limit MaxProgramSize)");
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
                    var cofactor = Determinant(Value.Matrix(n - 1, n - 1, (int[])minor.Clone()));
                    e[i * n + j] = (i + j) % 2 == 0 ? cofactor : _b.Negate(cofactor);
                }
            return Value.Matrix(n, n, e);
        }

        /// <summary>An order (rows or columns of id, zero): 0 up to the limit MaxMatrixOrder.</summary>
        private int Order(Expr e, string what)
        {
            var n = Integer(e, what);
            if (n < 0 || n > limits.MaxMatrixOrder)
                throw new CompileError(e.Position, $"{what} is {n}; it must be between 0 and the limit MaxMatrixOrder ({limits.MaxMatrixOrder})");
            return (int)n;
        }

        /// <summary><c>diag(a, b, …)</c>, or <c>diag(v)</c> of a row or column vector v: the square matrix with these entries on its diagonal.</summary>
        private Value Diagonal(CallExpr node)
        {
            var entries = new List<int>();
            var values = node.Arguments.Select(a => a.Accept(this)).ToList();
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
            if (n > limits.MaxMatrixOrder)
                throw new CompileError(node.Position, $"the matrix is {n}×{n}; the limit MaxMatrixOrder is {limits.MaxMatrixOrder}");
            var zero = _b.Constant(Rational.Zero);
            var e = Enumerable.Repeat(zero, n * n).ToArray();
            for (var i = 0; i < n; i++) e[i * n + i] = entries[i];
            return Value.Matrix(n, n, e);
        }

        /// <summary><c>submatrix(M, ROWS, COLUMNS)</c>: the rows and columns listed, in the order given (indices from 1).</summary>
        private Value Submatrix(CallExpr node)
        {
            var m = MatrixOf(node.Arguments[0], $"{node.Function}'s first argument");
            var rows = Indices(node.Arguments[1], m.Rows, "row");
            var columns = Indices(node.Arguments[2], m.Columns, "column");
            var e = new int[rows.Count * columns.Count];
            for (var i = 0; i < rows.Count; i++)
                for (var j = 0; j < columns.Count; j++) e[i * columns.Count + j] = m[rows[i], columns[j]];
            return Value.Matrix(rows.Count, columns.Count, e);
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
                    from = Integer(range.Arguments[0], "a range start");
                    to = Integer(range.Arguments[1], "a range end");
                }
                else from = to = Integer(item, $"a {what} index");
                for (var k = from; k <= to; k++)
                {
                    if (k < 1 || k > size)
                        throw new CompileError(item.Position, $"the {what} index {k} is outside 1..{size}");
                    if (result.Count >= limits.MaxMatrixOrder)
                        throw new CompileError(item.Position, $"the list has more than {limits.MaxMatrixOrder} {what}s (the limit MaxMatrixOrder)");
                    result.Add((int)k - 1);
                }
            }
            return result;
        }

        public Value VisitBound(BoundExpr node)
        {
            Step(node);
            IEnumerable<BigInteger> values;
            var infiniteFrom = SeriesValuation.IsInfinity(node.From, _scope, negative: true);
            var infiniteTo = SeriesValuation.IsInfinity(node.To, _scope, negative: false);
            if (infiniteFrom || infiniteTo)
            {
                if (series is not { } s)
                    throw new CompileError(node.Position, $"an infinite range needs a truncated power series entry: add 'up to q^N' (q the series variable) after the right side");
                if (_shared is not null) ParameterFixesStructure = true;
                values = SeriesValuation.Terms(node, infiniteFrom ? null : Integer(node.From, "a range start"),
                    infiniteTo ? null : Integer(node.To, "a range end"), _scope, s.Variable, s.Order, limits);
            }
            else
            {
                var from = Integer(node.From, "a range start");
                var to = Integer(node.To, "a range end");
                if (to - from + 1 > limits.MaxProgramSize)
                    throw new CompileError(node.Position, $"the range {from}..{to} has more than {limits.MaxProgramSize} terms (the limit MaxProgramSize)");
                values = Range(from, to);
            }
            var saved = _scope.TryGetValue(node.Variable, out var outer);
            var shadowed = Shadow(node.Variable);
            Value? acc = null;
            try
            {
                foreach (var k in values)
                {
                    _scope[node.Variable] = k;
                    Value term;
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
                if (saved) _scope[node.Variable] = outer; else _scope.Remove(node.Variable);
                Unshadow(node.Variable, shadowed);
            }
            return acc ?? Value.Of(_b.Constant(node.Kind == BoundKind.Sum ? Rational.Zero : Rational.One));
        }

        private static IEnumerable<BigInteger> Range(BigInteger from, BigInteger to)
        {
            for (var k = from; k <= to; k++) yield return k;
        }

        public Value VisitMatrixComprehension(MatrixComprehension node)
        {
            Step(node);
            var r0 = Integer(node.RowFrom, "a range start");
            var r1 = Integer(node.RowTo, "a range end");
            var c0 = Integer(node.ColumnFrom, "a range start");
            var c1 = Integer(node.ColumnTo, "a range end");
            var rows = r1 - r0 + 1;
            var columns = c1 - c0 + 1;
            // An empty range gives no rows (or columns): 0×0 matrices have det = pf = perm = 1.
            if (rows < 0) rows = 0;
            if (columns < 0) columns = 0;
            if (rows > limits.MaxMatrixOrder || columns > limits.MaxMatrixOrder)
                throw new CompileError(node.Position, $"the matrix is {rows}×{columns}; the limit MaxMatrixOrder is {limits.MaxMatrixOrder}");
            var e = new int[(int)rows * (int)columns];
            var savedRow = _scope.TryGetValue(node.RowVariable, out var outerRow);
            var savedColumn = _scope.TryGetValue(node.ColumnVariable, out var outerColumn);
            var shadowedRow = Shadow(node.RowVariable);
            var shadowedColumn = Shadow(node.ColumnVariable);
            try
            {
                for (var i = 0; i < (int)rows; i++)
                    for (var j = 0; j < (int)columns; j++)
                    {
                        _scope[node.RowVariable] = r0 + i;
                        _scope[node.ColumnVariable] = c0 + j;
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
                if (savedRow) _scope[node.RowVariable] = outerRow; else _scope.Remove(node.RowVariable);
                if (savedColumn) _scope[node.ColumnVariable] = outerColumn; else _scope.Remove(node.ColumnVariable);
                Unshadow(node.RowVariable, shadowedRow);
                Unshadow(node.ColumnVariable, shadowedColumn);
            }
            return Value.Matrix((int)rows, (int)columns, e);
        }

        public Value VisitMatrixLiteral(MatrixLiteral node)
        {
            Step(node);
            var rows = node.Rows.Count;
            var columns = node.Rows[0].Count;
            if (rows > limits.MaxMatrixOrder || columns > limits.MaxMatrixOrder)
                throw new CompileError(node.Position, $"the matrix is {rows}×{columns}; the limit MaxMatrixOrder is {limits.MaxMatrixOrder}");
            var e = new int[rows * columns];
            for (var i = 0; i < rows; i++)
            {
                if (node.Rows[i].Count != columns)
                    throw new CompileError(node.Rows[i].Count > 0 ? node.Rows[i][0].Position : node.Position, $"row {i + 1} has {node.Rows[i].Count} entries but row 1 has {columns}");
                for (var j = 0; j < columns; j++) e[i * columns + j] = ScalarOf(node.Rows[i][j], "a matrix entry");
            }
            return Value.Matrix(rows, columns, e);
        }
    }
}
