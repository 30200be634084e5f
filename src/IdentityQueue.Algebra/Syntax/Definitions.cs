using System.Runtime.CompilerServices;

namespace IdentityQueue.Algebra.Syntax;

/// <summary>
/// A named function defined once in a catalogue file: <c>let NAME(P1, …, Pk) = BODY</c>, or <c>let NAME = BODY</c> with no
/// parameters. Its body is already written out (definitions it uses are expanded), so it holds no calls of definitions.
/// <see cref="FreeNames"/> are the names of the body that are neither parameters nor bound inside it: the identity's variables.
/// Immutable.
/// </summary>
public sealed record Definition(string Name, IReadOnlyList<string> Parameters, Expr Body, int Line, IReadOnlySet<string> FreeNames);

/// <summary>
/// The definitions of one catalogue file, in order: a <c>let</c> line adds one, and every line after it may use it. A name is
/// defined once per file, and a definition may use only definitions above it (so there is no recursion, and writing a use out
/// always ends). Not thread-safe: one scope per file being read.
/// </summary>
public sealed class DefinitionScope
{
    private readonly Dictionary<string, Definition> _definitions = new(StringComparer.Ordinal);

    public int Count => _definitions.Count;

    public IEnumerable<Definition> All => _definitions.Values;

    public bool TryGet(string name, [System.Diagnostics.CodeAnalysis.NotNullWhen(true)] out Definition? definition) =>
        _definitions.TryGetValue(name, out definition);

    public bool Contains(string name) => _definitions.ContainsKey(name);

    internal void Add(Definition definition) => _definitions.Add(definition.Name, definition);
}

/// <summary>
/// Writes a use of a <see cref="Definition"/> out: the body with each parameter replaced by its argument (call by name, as a
/// tree, so no parentheses are lost), and with the body's bound variables renamed where an argument mentions a name of the same
/// spelling (so an argument's <c>i</c> is never captured by the body's <c>sum(i in …)</c>). Stateless.
/// </summary>
internal static class DefinitionExpander
{
    /// <summary>The written-out use; a failure (no position: the caller knows it) when a parameter that the body indexes gets an argument that is not a name.</summary>
    public static Result<Expr> Expand(Definition definition, IReadOnlyList<Expr> arguments)
    {
        if (definition.Parameters.Count == 0) return Result<Expr>.Ok(definition.Body);
        var map = new Dictionary<string, Expr>(StringComparer.Ordinal);
        var avoid = new HashSet<string>(StringComparer.Ordinal);
        for (var i = 0; i < arguments.Count; i++)
        {
            map[definition.Parameters[i]] = arguments[i];
            FreeNames(arguments[i], avoid);
        }
        // Fresh names must differ from every name of the body as well.
        var taken = new HashSet<string>(avoid, StringComparer.Ordinal);
        AllNames(definition.Body, taken);
        var substitution = new Substitution(map, avoid, taken, definition.Name);
        try
        {
            return Result<Expr>.Ok(definition.Body.Accept(substitution));
        }
        catch (SubstitutionError e)
        {
            return Result<Expr>.Fail(e.Message);
        }
    }

    /// <summary>Adds the names that occur free in <paramref name="expr"/> (not bound by a sum, prod or matrix inside it) to <paramref name="names"/>.</summary>
    public static void FreeNames(Expr expr, ISet<string> names) => expr.Accept(new FreeNameCollector(names, []));

    /// <summary>
    /// The number of nodes and the height of <paramref name="expr"/> as it would be printed (shared subtrees counted each time),
    /// counting stops once past <paramref name="cap"/> nodes.
    /// </summary>
    public static (long Nodes, int Height) Measure(Expr expr, long cap)
    {
        long nodes = 0;
        var height = MeasureNode(expr, ref nodes, cap);
        return (nodes, height);
    }

    /// <summary>Every name in <paramref name="expr"/>: variables, indexed names and bound variables.</summary>
    private static void AllNames(Expr expr, ISet<string> names)
    {
        RuntimeHelpers.EnsureSufficientExecutionStack();
        switch (expr)
        {
            case NameRef n: names.Add(n.Name); break;
            case IndexedName n: names.Add(n.Name); break;
            case BoundExpr b: names.Add(b.Variable); break;
            case MatrixComprehension m: names.Add(m.RowVariable); names.Add(m.ColumnVariable); break;
        }
        foreach (var c in Children(expr)) AllNames(c, names);
    }

    private static int MeasureNode(Expr e, ref long nodes, long cap)
    {
        if (++nodes > cap) return 0;
        RuntimeHelpers.EnsureSufficientExecutionStack();
        var children = Children(e);
        var height = 0;
        foreach (var c in children)
        {
            height = Math.Max(height, MeasureNode(c, ref nodes, cap));
            if (nodes > cap) return 0;
        }
        return height + (children.Count == 0 ? 0 : 1);
    }

    private static IReadOnlyList<Expr> Children(Expr e) => e switch
    {
        IndexedName n => n.Indices,
        UnaryExpr u => [u.Operand],
        SumExpr s => s.Terms.Select(t => t.Value).ToArray(),
        ProductExpr p => p.Factors.Select(f => f.Value).ToArray(),
        BinaryExpr b => [b.Left, b.Right],
        CallExpr c => c.Arguments,
        BoundExpr b => [b.From, b.To, b.Body],
        MatrixComprehension m => [m.RowFrom, m.RowTo, m.ColumnFrom, m.ColumnTo, m.Body],
        MatrixLiteral l => l.Rows.SelectMany(r => r).ToArray(),
        _ => [],
    };

    private sealed class SubstitutionError(string message) : Exception(message);

    private sealed class FreeNameCollector(ISet<string> names, HashSet<string> bound) : IExprVisitor<bool>
    {
        public bool VisitInteger(IntegerLiteral node) => true;

        public bool VisitName(NameRef node)
        {
            if (!bound.Contains(node.Name)) names.Add(node.Name);
            return true;
        }

        public bool VisitIndexed(IndexedName node)
        {
            if (!bound.Contains(node.Name)) names.Add(node.Name);
            foreach (var i in node.Indices) i.Accept(this);
            return true;
        }

        public bool VisitUnary(UnaryExpr node) => node.Operand.Accept(this);

        public bool VisitSum(SumExpr node)
        {
            foreach (var t in node.Terms) t.Value.Accept(this);
            return true;
        }

        public bool VisitProduct(ProductExpr node)
        {
            foreach (var f in node.Factors) f.Value.Accept(this);
            return true;
        }

        public bool VisitBinary(BinaryExpr node) => node.Left.Accept(this) && node.Right.Accept(this);

        public bool VisitCall(CallExpr node)
        {
            foreach (var a in node.Arguments) a.Accept(this);
            return true;
        }

        public bool VisitBound(BoundExpr node)
        {
            node.From.Accept(this);
            node.To.Accept(this);
            Inside([node.Variable], node.Body);
            return true;
        }

        public bool VisitMatrixComprehension(MatrixComprehension node)
        {
            foreach (var e in new[] { node.RowFrom, node.RowTo, node.ColumnFrom, node.ColumnTo }) e.Accept(this);
            Inside([node.RowVariable, node.ColumnVariable], node.Body);
            return true;
        }

        public bool VisitMatrixLiteral(MatrixLiteral node)
        {
            foreach (var row in node.Rows)
                foreach (var e in row) e.Accept(this);
            return true;
        }

        private void Inside(string[] variables, Expr body)
        {
            var added = variables.Where(bound.Add).ToArray();
            body.Accept(this);
            foreach (var v in added) bound.Remove(v);
        }
    }

    /// <summary>Replaces parameters by arguments; renames a bound variable of the body that an argument's free names would meet.</summary>
    private sealed class Substitution(Dictionary<string, Expr> map, HashSet<string> avoid, HashSet<string> taken, string definition) : IExprVisitor<Expr>
    {
        private readonly Dictionary<string, string> _renamed = new(StringComparer.Ordinal);
        private int _fresh;

        public Expr VisitInteger(IntegerLiteral node) => node;

        public Expr VisitName(NameRef node)
        {
            if (_renamed.TryGetValue(node.Name, out var renamed)) return node with { Name = renamed };
            return map.TryGetValue(node.Name, out var argument) ? argument : node;
        }

        public Expr VisitIndexed(IndexedName node)
        {
            var indices = node.Indices.Select(i => i.Accept(this)).ToArray();
            if (_renamed.ContainsKey(node.Name) || !map.TryGetValue(node.Name, out var argument)) return node with { Indices = indices };
            // A parameter that the body indexes names a family of variables: its argument must be a name too.
            if (argument is NameRef name) return new IndexedName(name.Name, indices, node.Position);
            throw new SubstitutionError($"the definition of '{definition}' indexes its parameter '{node.Name}' ({node.Name}[...]), so its argument must be a variable name, not {ExprPrinter.Print(argument)}");
        }

        public Expr VisitUnary(UnaryExpr node) => node with { Operand = node.Operand.Accept(this) };

        public Expr VisitSum(SumExpr node) => node with { Terms = node.Terms.Select(t => t with { Value = t.Value.Accept(this) }).ToArray() };

        public Expr VisitProduct(ProductExpr node) => node with { Factors = node.Factors.Select(f => f with { Value = f.Value.Accept(this) }).ToArray() };

        public Expr VisitBinary(BinaryExpr node) => node with { Left = node.Left.Accept(this), Right = node.Right.Accept(this) };

        public Expr VisitCall(CallExpr node) => node with { Arguments = node.Arguments.Select(a => a.Accept(this)).ToArray() };

        public Expr VisitBound(BoundExpr node)
        {
            var from = node.From.Accept(this);
            var to = node.To.Accept(this);
            var (variable, body) = Bind([node.Variable], node.Body);
            return node with { From = from, To = to, Variable = variable[0], Body = body };
        }

        public Expr VisitMatrixComprehension(MatrixComprehension node)
        {
            var rowFrom = node.RowFrom.Accept(this);
            var rowTo = node.RowTo.Accept(this);
            var columnFrom = node.ColumnFrom.Accept(this);
            var columnTo = node.ColumnTo.Accept(this);
            var (variables, body) = Bind([node.RowVariable, node.ColumnVariable], node.Body);
            return node with
            {
                RowFrom = rowFrom,
                RowTo = rowTo,
                ColumnFrom = columnFrom,
                ColumnTo = columnTo,
                RowVariable = variables[0],
                ColumnVariable = variables[1],
                Body = body,
            };
        }

        public Expr VisitMatrixLiteral(MatrixLiteral node) =>
            node with { Rows = node.Rows.Select(r => (IReadOnlyList<Expr>)r.Select(e => e.Accept(this)).ToArray()).ToArray() };

        /// <summary>
        /// The body of a bound form: its variables shadow parameters of the same name, and a variable that an argument's free
        /// names contain gets a fresh name (<c>i_1</c>, …) for the body.
        /// </summary>
        private (string[] Variables, Expr Body) Bind(string[] variables, Expr body)
        {
            var savedMap = new List<(string, Expr)>();
            var savedRename = new List<(string, string?)>();
            var names = new string[variables.Length];
            for (var k = 0; k < variables.Length; k++)
            {
                var v = variables[k];
                if (map.Remove(v, out var shadowed)) savedMap.Add((v, shadowed));
                savedRename.Add((v, _renamed.TryGetValue(v, out var r) ? r : null));
                if (avoid.Contains(v))
                {
                    string fresh;
                    do fresh = $"{v}_{++_fresh}"; while (taken.Contains(fresh) || map.ContainsKey(fresh));
                    taken.Add(fresh);
                    _renamed[v] = fresh;
                    names[k] = fresh;
                }
                else
                {
                    _renamed.Remove(v);
                    names[k] = v;
                }
            }
            var result = body.Accept(this);
            foreach (var (v, e) in savedMap) map[v] = e;
            foreach (var (v, r) in savedRename)
                if (r is null) _renamed.Remove(v); else _renamed[v] = r;
            return (names, result);
        }
    }
}
