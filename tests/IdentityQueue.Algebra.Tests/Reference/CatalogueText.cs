using System.Numerics;
using System.Text;
using IdentityQueue.Algebra.Exact;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Tests.Reference;

/// <summary>
/// A small, independent emitter of catalogue syntax (SPEC §3) for test expressions: every unary and binary
/// operation is wrapped in parentheses, so precedence and associativity never matter when the text is parsed
/// again; <c>Format(parse(Format(e))) == Format(e)</c> is a structural equality test that ignores positions.
/// Also builds expression trees from names and polynomials.
/// </summary>
public static class CatalogueText
{
    /// <summary>The position given to every node built here.</summary>
    public static readonly SourcePosition At = new(1, 1);

    public static string Format(Expr expression)
    {
        var text = new StringBuilder();
        Write(expression, text);
        return text.ToString();
    }

    /// <summary><c>LHS = RHS</c>.</summary>
    public static string FormatIdentity(Expr lhs, Expr rhs) => $"{Format(lhs)} = {Format(rhs)}";

    private static void Write(Expr e, StringBuilder text)
    {
        switch (e)
        {
            case IntegerLiteral l:
                text.Append(l.Value.Sign < 0 ? $"({l.Value})" : l.Value.ToString());
                break;
            case NameRef n:
                text.Append(n.Name);
                break;
            case IndexedName x:
                text.Append(x.Name).Append('[');
                for (var i = 0; i < x.Indices.Count; i++)
                {
                    if (i > 0) text.Append(',');
                    Write(x.Indices[i], text);
                }
                text.Append(']');
                break;
            case UnaryExpr u:
                text.Append("(-");
                Write(u.Operand, text);
                text.Append(')');
                break;
            case SumExpr sum:
                text.Append('(');
                for (var i = 0; i < sum.Terms.Count; i++)
                {
                    if (i > 0) text.Append(sum.Terms[i].Subtract ? " - " : " + ");
                    Write(sum.Terms[i].Value, text);
                }
                text.Append(')');
                break;
            case ProductExpr product:
                text.Append('(');
                for (var i = 0; i < product.Factors.Count; i++)
                {
                    if (i > 0) text.Append(product.Factors[i].Divide ? '/' : '*');
                    Write(product.Factors[i].Value, text);
                }
                text.Append(')');
                break;
            case BinaryExpr b:
                text.Append('(');
                Write(b.Left, text);
                text.Append('^');
                Write(b.Right, text);
                text.Append(')');
                break;
            case CallExpr c:
                text.Append(c.Function).Append('(');
                for (var i = 0; i < c.Arguments.Count; i++)
                {
                    if (i > 0) text.Append(", ");
                    Write(c.Arguments[i], text);
                }
                text.Append(')');
                break;
            case BoundExpr s:
                text.Append(s.Kind == BoundKind.Sum ? Builtins.Sum : Builtins.Prod).Append('(').Append(s.Variable).Append(" in ");
                Write(s.From, text);
                text.Append("..");
                Write(s.To, text);
                text.Append(": ");
                Write(s.Body, text);
                text.Append(')');
                break;
            case MatrixComprehension m:
                text.Append(Builtins.Matrix).Append('(').Append(m.RowVariable).Append(" in ");
                Write(m.RowFrom, text);
                text.Append("..");
                Write(m.RowTo, text);
                text.Append(", ").Append(m.ColumnVariable).Append(" in ");
                Write(m.ColumnFrom, text);
                text.Append("..");
                Write(m.ColumnTo, text);
                text.Append(": ");
                Write(m.Body, text);
                text.Append(')');
                break;
            case MatrixLiteral m:
                text.Append('[');
                for (var i = 0; i < m.Rows.Count; i++)
                {
                    if (i > 0) text.Append(", ");
                    text.Append('[');
                    for (var j = 0; j < m.Rows[i].Count; j++)
                    {
                        if (j > 0) text.Append(", ");
                        Write(m.Rows[i][j], text);
                    }
                    text.Append(']');
                }
                text.Append(']');
                break;
            default:
                throw new ReferenceException($"unknown node {e.GetType().Name}");
        }
    }

    // ---- builders ----

    [System.Diagnostics.CodeAnalysis.SuppressMessage("Naming", "CA1720", Justification = "Int builds the catalogue's integer literal; the builders are named after the syntax they build.")]
    public static Expr Int(BigInteger value) => value.Sign < 0 ? Neg(new IntegerLiteral(-value, At)) : new IntegerLiteral(value, At);
    public static Expr Name(string name) => new NameRef(name, At);
    public static Expr Indexed(string name, params Expr[] indices) => new IndexedName(name, indices, At);
    public static Expr Indexed(string name, params int[] indices) => new IndexedName(name, indices.Select(i => Int(i)).ToArray(), At);
    public static Expr Neg(Expr a) => new UnaryExpr(UnaryOperator.Negate, a, At);
    public static Expr Add(Expr a, Expr b) => new SumExpr([new SumTerm(a, false, At), new SumTerm(b, false, At)], At);
    public static Expr Sub(Expr a, Expr b) => new SumExpr([new SumTerm(a, false, At), new SumTerm(b, true, At)], At);
    public static Expr Mul(Expr a, Expr b) => new ProductExpr([new ProductFactor(a, false, At), new ProductFactor(b, false, At)], At);
    public static Expr Div(Expr a, Expr b) => new ProductExpr([new ProductFactor(a, false, At), new ProductFactor(b, true, At)], At);
    public static Expr Pow(Expr a, Expr b) => new BinaryExpr(BinaryOperator.Power, a, b, At, At);
    public static Expr Pow(Expr a, int e) => Pow(a, Int(e));
    public static Expr Call(string function, params Expr[] arguments) => new CallExpr(function, arguments, At);
    public static Expr Sum(string k, Expr from, Expr to, Expr body) => new BoundExpr(BoundKind.Sum, k, from, to, body, At);
    public static Expr Prod(string k, Expr from, Expr to, Expr body) => new BoundExpr(BoundKind.Product, k, from, to, body, At);

    public static Expr MatrixOf(string i, Expr rowFrom, Expr rowTo, string j, Expr columnFrom, Expr columnTo, Expr body) =>
        new MatrixComprehension(i, rowFrom, rowTo, j, columnFrom, columnTo, body, At);

    public static Expr MatrixOf(Expr[][] rows) => new MatrixLiteral(rows.Select(r => (IReadOnlyList<Expr>)r).ToArray(), At);

    /// <summary>The expression for an evaluated variable name: <c>x</c> → a name, <c>x[3]</c>, <c>a[1,-2]</c> → an indexed name.</summary>
    public static Expr Variable(string evaluatedName)
    {
        var open = evaluatedName.IndexOf('[');
        if (open < 0) return Name(evaluatedName);
        var indices = evaluatedName[(open + 1)..^1].Split(',').Select(s => Int(BigInteger.Parse(s))).ToArray();
        return Indexed(evaluatedName[..open], indices);
    }

    /// <summary>
    /// A polynomial as an expression: terms in graded order in one sum joined by + and −, each term one product
    /// <c>c*m</c> with the coefficient an integer or <c>(p/q)</c> and the monomial a product of powers.
    /// </summary>
    public static Expr FromPolynomial(ReferencePolynomial polynomial)
    {
        var terms = new List<SumTerm>();
        foreach (var (m, c) in polynomial.Terms.OrderBy(t => t.Key, Comparer<Monomial>.Create(Monomial.CompareGraded)))
        {
            var magnitude = c.Sign < 0 ? -c : c;
            var term = Term(magnitude, m);
            terms.Add(terms.Count == 0 ? new SumTerm(c.Sign < 0 ? Neg(term) : term, false, At) : new SumTerm(term, c.Sign < 0, At));
        }
        return terms.Count switch
        {
            0 => Int(0),
            1 => terms[0].Value,
            _ => new SumExpr(terms.ToArray(), At),
        };
    }

    private static Expr Term(Rational magnitude, Monomial m)
    {
        var factors = new List<ProductFactor>();
        if (magnitude != Rational.One || m.Powers.Count == 0)
        {
            Expr coefficient = magnitude.IsInteger ? Int(magnitude.Numerator) : Div(Int(magnitude.Numerator), Int(magnitude.Denominator));
            factors.Add(new ProductFactor(coefficient, false, At));
        }
        foreach (var (v, e) in m.Powers) factors.Add(new ProductFactor(e == 1 ? Variable(v) : Pow(Variable(v), e), false, At));
        return factors.Count == 1 ? factors[0].Value : new ProductExpr(factors.ToArray(), At);
    }

    /// <summary>
    /// Replaces the integer parameter <paramref name="name"/> by <paramref name="replacement"/> wherever it is free
    /// (a bound form that rebinds the name shadows it in its body, not in its range ends).
    /// </summary>
    public static Expr Substitute(Expr e, string name, Expr replacement)
    {
        Expr S(Expr x) => Substitute(x, name, replacement);
        return e switch
        {
            NameRef n => n.Name == name ? replacement : n,
            IntegerLiteral => e,
            IndexedName x => new IndexedName(x.Name, x.Indices.Select(S).ToArray(), x.At),
            UnaryExpr u => u with { Operand = S(u.Operand) },
            SumExpr sum => sum with { Terms = sum.Terms.Select(t => t with { Value = S(t.Value) }).ToArray() },
            ProductExpr product => product with { Factors = product.Factors.Select(f => f with { Value = S(f.Value) }).ToArray() },
            BinaryExpr b => b with { Left = S(b.Left), Right = S(b.Right) },
            CallExpr c => new CallExpr(c.Function, c.Arguments.Select(S).ToArray(), c.At),
            BoundExpr s => s with { From = S(s.From), To = S(s.To), Body = s.Variable == name ? s.Body : S(s.Body) },
            MatrixComprehension m => m with
            {
                RowFrom = S(m.RowFrom),
                RowTo = S(m.RowTo),
                ColumnFrom = m.RowVariable == name ? m.ColumnFrom : S(m.ColumnFrom),
                ColumnTo = m.RowVariable == name ? m.ColumnTo : S(m.ColumnTo),
                Body = m.RowVariable == name || m.ColumnVariable == name ? m.Body : S(m.Body),
            },
            MatrixLiteral m => new MatrixLiteral(m.Rows.Select(r => (IReadOnlyList<Expr>)r.Select(S).ToArray()).ToArray(), m.At),
            _ => throw new ReferenceException($"unknown node {e.GetType().Name}"),
        };
    }
}
