using System.Globalization;
using System.Numerics;
using System.Text;
using IdentityQueue.Algebra.Exact;

namespace IdentityQueue.Screening.HandOff;

/// <summary>Thrown inside the hand-off translation to skip one candidate; caught at <see cref="SmtLibWriter.Translate"/>.</summary>
internal sealed class HandOffSkip(string reason) : Exception(reason);

/// <summary>
/// A hash-consed graph of polynomial terms over Q (constants, variables, +, −, ×, negation) with exact constant folding,
/// written out as SMT-LIB 2 real terms: a subterm used more than once becomes one <c>define-fun</c> (a macro, so the
/// prover sees the same term). Not thread-safe; one per translation.
/// </summary>
internal sealed class TermGraph(HandOffLimits limits)
{
    private enum Kind { Constant, Variable, Add, Subtract, Multiply, Negate }

    private readonly record struct Node(Kind Kind, int A, int B);

    private readonly List<Node> _nodes = [];
    private readonly List<Rational> _constants = [];
    private readonly List<string> _variables = [];
    private readonly Dictionary<Node, int> _index = [];
    private readonly Dictionary<Rational, int> _constantIndex = [];
    private readonly Dictionary<string, int> _variableIndex = new(StringComparer.Ordinal);
    private long _steps;

    /// <summary>Names of the variables in the order they were first met.</summary>
    public IReadOnlyList<string> Variables => _variables;

    public int Zero => Constant(Rational.Zero);
    public int One => Constant(Rational.One);

    /// <summary>Counts one step of expansion against <see cref="HandOffLimits.MaxExpansionSteps"/>.</summary>
    public void Step(long count = 1)
    {
        _steps += count;
        if (_steps > limits.MaxExpansionSteps)
            throw new HandOffSkip($"it expands to more than {limits.MaxExpansionSteps} steps (the limit MaxExpansionSteps)");
    }

    public int Constant(Rational value)
    {
        if (_constantIndex.TryGetValue(value, out var id)) return id;
        if (value.Numerator.GetBitLength() > limits.MaxConstantBits || value.Denominator.GetBitLength() > limits.MaxConstantBits)
            throw new HandOffSkip($"it needs a constant of more than {limits.MaxConstantBits} bits (the limit MaxConstantBits)");
        id = Add(new Node(Kind.Constant, _constants.Count, 0));
        _constants.Add(value);
        _constantIndex[value] = id;
        return id;
    }

    public int Variable(string name)
    {
        if (_variableIndex.TryGetValue(name, out var id)) return id;
        id = Add(new Node(Kind.Variable, _variables.Count, 0));
        _variables.Add(name);
        _variableIndex[name] = id;
        return id;
    }

    public bool TryGetConstant(int id, out Rational value)
    {
        var node = _nodes[id];
        value = node.Kind == Kind.Constant ? _constants[node.A] : Rational.Zero;
        return node.Kind == Kind.Constant;
    }

    public bool IsZero(int id) => TryGetConstant(id, out var c) && c.IsZero;

    public int Sum(int a, int b)
    {
        Step();
        if (TryGetConstant(a, out var x) && TryGetConstant(b, out var y)) return Constant(x + y);
        if (IsZero(a)) return b;
        if (IsZero(b)) return a;
        return Make(Kind.Add, a, b);
    }

    public int Difference(int a, int b)
    {
        Step();
        if (TryGetConstant(a, out var x) && TryGetConstant(b, out var y)) return Constant(x - y);
        if (a == b) return Zero;
        if (IsZero(b)) return a;
        if (IsZero(a)) return Negation(b);
        return Make(Kind.Subtract, a, b);
    }

    public int Product(int a, int b)
    {
        Step();
        if (TryGetConstant(a, out var x))
        {
            if (TryGetConstant(b, out var y)) return Constant(x * y);
            if (x.IsZero) return Zero;
            if (x == Rational.One) return b;
            if (x == -Rational.One) return Negation(b);
        }
        else if (TryGetConstant(b, out var y))
        {
            if (y.IsZero) return Zero;
            if (y == Rational.One) return a;
            if (y == -Rational.One) return Negation(a);
        }
        return Make(Kind.Multiply, a, b);
    }

    public int Negation(int a)
    {
        Step();
        if (TryGetConstant(a, out var x)) return Constant(-x);
        if (_nodes[a].Kind == Kind.Negate) return _nodes[a].A;
        return Make(Kind.Negate, a, 0);
    }

    /// <summary>a^e by repeated squaring; e ≥ 0.</summary>
    public int Power(int a, int e)
    {
        var result = One;
        var square = a;
        while (e > 0)
        {
            if ((e & 1) == 1) result = Product(result, square);
            e >>= 1;
            if (e > 0) square = Product(square, square);
        }
        return result;
    }

    /// <summary>Whether b is, as a term, the negation of a (after folding).</summary>
    public bool AreNegatives(int a, int b) => Negation(a) == b || Negation(b) == a;

    private int Make(Kind kind, int a, int b) => _index.TryGetValue(new Node(kind, a, b), out var id) ? id : Add(new Node(kind, a, b));

    private int Add(Node node)
    {
        Step();
        var id = _nodes.Count;
        _nodes.Add(node);
        _index[node] = id;
        return id;
    }

    /// <summary>An SMT-LIB symbol for a variable: bare when it is a plain ASCII identifier, else quoted (<c>|x[3]|</c>).</summary>
    public static string Symbol(string name)
    {
        var bare = name.Length > 0 && char.IsAsciiLetter(name[0]) && name.All(c => char.IsAsciiLetterOrDigit(c) || c == '_')
            && !ReservedWords.Contains(name);
        return bare ? name : $"|{name}|";
    }

    // SMT-LIB's reserved words and core symbols, and the arithmetic names a solver may predefine.
    private static readonly HashSet<string> ReservedWords = new(StringComparer.Ordinal)
    {
        "par", "as", "let", "exists", "forall", "match", "and", "or", "not", "xor", "ite", "true", "false", "distinct",
        "div", "mod", "abs", "to_real", "to_int", "is_int", "pi", "euler", "exp", "sin", "cos", "tan", "root", "sqrt",
        "Real", "Int", "Bool", "assert", "define", "declare",
    };

    /// <summary>An SMT-LIB numeral term for a rational: <c>5</c>, <c>(- 5)</c>, <c>(/ 5 6)</c>, <c>(/ (- 5) 6)</c>.</summary>
    public static string Numeral(Rational value)
    {
        var n = BigInteger.Abs(value.Numerator).ToString(CultureInfo.InvariantCulture);
        var signed = value.Sign < 0 ? $"(- {n})" : n;
        return value.IsInteger ? signed : $"(/ {signed} {value.Denominator.ToString(CultureInfo.InvariantCulture)})";
    }

    /// <summary>
    /// Writes <paramref name="roots"/> as SMT-LIB terms: the definitions they need (<c>(define-fun t!1 () Real …)</c>, in
    /// dependency order) and one term text per root. A non-atomic subterm is named when it is used more than once, or
    /// when it would nest more than <paramref name="maxInlineDepth"/> levels deep (so that no line grows without end).
    /// Names <c>t!K</c> cannot clash with a catalogue name, which has no '!'.
    /// </summary>
    public (List<string> Definitions, List<string> Terms) Write(IReadOnlyList<int> roots, int maxInlineDepth = 24)
    {
        var order = PostOrder(roots);
        var uses = new Dictionary<int, int>();
        foreach (var id in order)
            foreach (var child in Children(id)) uses[child] = uses.GetValueOrDefault(child) + 1;
        foreach (var r in roots) uses[r] = uses.GetValueOrDefault(r) + 1;

        var rootSet = roots.ToHashSet();
        var names = new Dictionary<int, string>();
        var depth = new Dictionary<int, int>();
        var definitions = new List<string>();
        foreach (var id in order)
        {
            var kind = _nodes[id].Kind;
            if (kind is Kind.Constant or Kind.Variable)
            {
                depth[id] = 0;
                continue;
            }
            // A child of the same n-ary kind is flattened into this application, so it adds no nesting.
            var d = 1 + Children(id).Select(c => names.ContainsKey(c) ? 0
                : kind is Kind.Add or Kind.Multiply && _nodes[c].Kind == kind ? depth[c] - 1 : depth[c]).DefaultIfEmpty(0).Max();
            var atomicNegation = kind == Kind.Negate && _nodes[_nodes[id].A].Kind is Kind.Constant or Kind.Variable;
            if (!atomicNegation && (uses.GetValueOrDefault(id) > 1 || d > maxInlineDepth) && !rootSet.Contains(id))
            {
                var name = $"t!{names.Count + 1}";
                definitions.Add($"(define-fun {name} () Real {Inline(id, names)})");
                names[id] = name;
                d = 0;
            }
            depth[id] = d;
        }
        return (definitions, roots.Select(r => Inline(r, names)).ToList());
    }

    private IEnumerable<int> Children(int id)
    {
        var node = _nodes[id];
        switch (node.Kind)
        {
            case Kind.Add or Kind.Subtract or Kind.Multiply: yield return node.A; yield return node.B; break;
            case Kind.Negate: yield return node.A; break;
        }
    }

    private List<int> PostOrder(IReadOnlyList<int> roots)
    {
        var order = new List<int>();
        var seen = new HashSet<int>();
        var stack = new Stack<(int Id, bool Expanded)>();
        foreach (var root in roots.Reverse()) stack.Push((root, false));
        while (stack.Count > 0)
        {
            var (id, expanded) = stack.Pop();
            if (expanded)
            {
                order.Add(id);
                continue;
            }
            if (!seen.Add(id)) continue;
            stack.Push((id, true));
            foreach (var child in Children(id).Reverse()) if (!seen.Contains(child)) stack.Push((child, false));
        }
        return order;
    }

    /// <summary>The text of a node with named subterms by name; chains of + and × flattened into one n-ary application.</summary>
    private string Inline(int id, Dictionary<int, string> names)
    {
        var text = new StringBuilder();
        Append(text, id, names, top: true);
        return text.ToString();
    }

    private void Append(StringBuilder text, int id, Dictionary<int, string> names, bool top)
    {
        if (!top && names.TryGetValue(id, out var name))
        {
            text.Append(name);
            return;
        }
        var node = _nodes[id];
        switch (node.Kind)
        {
            case Kind.Constant: text.Append(Numeral(_constants[node.A])); return;
            case Kind.Variable: text.Append(Symbol(_variables[node.A])); return;
            case Kind.Negate:
                text.Append("(- ");
                Append(text, node.A, names, top: false);
                text.Append(')');
                return;
            case Kind.Subtract:
                text.Append("(- ");
                Append(text, node.A, names, top: false);
                text.Append(' ');
                Append(text, node.B, names, top: false);
                text.Append(')');
                return;
            default:
                var operands = new List<int>();
                Flatten(id, node.Kind, names, operands);
                text.Append(node.Kind == Kind.Add ? "(+" : "(*");
                foreach (var operand in operands)
                {
                    text.Append(' ');
                    Append(text, operand, names, top: false);
                }
                text.Append(')');
                return;
        }
    }

    private void Flatten(int id, Kind kind, Dictionary<int, string> names, List<int> operands)
    {
        var stack = new Stack<int>();
        stack.Push(_nodes[id].B);
        stack.Push(_nodes[id].A);
        while (stack.Count > 0)
        {
            var next = stack.Pop();
            if (_nodes[next].Kind == kind && !names.ContainsKey(next))
            {
                stack.Push(_nodes[next].B);
                stack.Push(_nodes[next].A);
            }
            else operands.Add(next);
        }
    }
}
