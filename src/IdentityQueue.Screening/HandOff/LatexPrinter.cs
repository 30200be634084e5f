using System.Globalization;
using System.Runtime.CompilerServices;
using System.Text;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Screening.HandOff;

/// <summary>
/// Writes an <see cref="Expr"/> as LaTeX math (amsmath): <c>\frac</c>, <c>\cdot</c>, <c>x_{i}</c>, <c>\sum_{k=1}^{n}</c>,
/// <c>\binom</c>, <c>[n]_{q}</c>, <c>\det</c>, pmatrix/vmatrix, with parentheses only where the tree needs them.
/// Not thread-safe (one output per instance); the static methods are.
/// </summary>
public sealed class LatexPrinter : IExprVisitor<StringBuilder>
{
    private readonly StringBuilder _output;

    private LatexPrinter(StringBuilder output) => _output = output;

    public static string Print(Expr expr)
    {
        var output = new StringBuilder();
        new LatexPrinter(output).Write(expr);
        return output.ToString();
    }

    /// <summary><c>lhs = rhs</c>, with <c>\quad\text{over }\mathbb{F}_{p}</c> for a finite field.</summary>
    public static string Print(Expr left, Expr right, FieldSpec field)
    {
        var text = $"{Print(left)} = {Print(right)}";
        if (field.IsRationals) return text;
        var size = field.Degree == 1 ? $"{field.Characteristic}" : $"{field.Characteristic}^{{{field.Degree}}}";
        return $"{text} \\quad \\text{{over }} \\mathbb{{F}}_{{{size}}}";
    }

    public StringBuilder VisitInteger(IntegerLiteral node) => _output.Append(node.Value.ToString(CultureInfo.InvariantCulture));

    public StringBuilder VisitName(NameRef node) => _output.Append(Name(node.Name));

    public StringBuilder VisitIndexed(IndexedName node)
    {
        _output.Append(Name(node.Name)).Append("_{");
        for (var i = 0; i < node.Indices.Count; i++)
        {
            if (i > 0) _output.Append(',');
            Write(node.Indices[i]);
        }
        return _output.Append('}');
    }

    public StringBuilder VisitUnary(UnaryExpr node)
    {
        _output.Append('-');
        Operand(node.Operand, Precedence.Unary);
        return _output;
    }

    public StringBuilder VisitSum(SumExpr node)
    {
        var terms = node.Terms;
        Operand(terms[0].Value, Precedence.Additive);
        for (var i = 1; i < terms.Count; i++)
        {
            _output.Append(terms[i].Subtract ? " - " : " + ");
            Right(terms[i].Value, Precedence.Multiplicative);
        }
        return _output;
    }

    /// <summary>
    /// Left to right: a factor multiplied is <c>E \cdot f</c>, a divisor makes <c>\frac{E}{f}</c>. All the <c>\frac{</c> are
    /// opened first (one per divisor), so a long chain is written in one loop: <c>a*b/c*d</c> is <c>\frac{a \cdot b}{c} \cdot d</c>.
    /// </summary>
    public StringBuilder VisitProduct(ProductExpr node)
    {
        var factors = node.Factors;
        for (var i = 1; i < factors.Count; i++)
            if (factors[i].Divide) _output.Append("\\frac{");
        if (factors[1].Divide) Write(factors[0].Value);
        else Operand(factors[0].Value, Precedence.Multiplicative);
        for (var i = 1; i < factors.Count; i++)
        {
            if (factors[i].Divide)
            {
                _output.Append("}{");
                Write(factors[i].Value);
                _output.Append('}');
            }
            else
            {
                _output.Append(" \\cdot ");
                Right(factors[i].Value, Precedence.Unary);
            }
        }
        return _output;
    }

    public StringBuilder VisitBinary(BinaryExpr node)
    {
        if (Builtins.IsComparison(node.Operator))
        {
            Write(node.Left);
            _output.Append(node.Operator switch
            {
                BinaryOperator.Less => " < ",
                BinaryOperator.LessOrEqual => " \\le ",
                BinaryOperator.Greater => " > ",
                BinaryOperator.GreaterOrEqual => " \\ge ",
                BinaryOperator.Equal => " = ",
                BinaryOperator.And => " \\wedge ",
                BinaryOperator.Or => " \\vee ",
                _ => " \\ne ",
            });
            return Write(node.Right);
        }
        // '^'
        Operand(node.Left, Precedence.Atom);
        _output.Append("^{");
        Write(node.Right);
        return _output.Append('}');
    }

    /// <summary>The right operand of '+', '-' or '\cdot': "a - (-b)", not "a - -b" (a fraction needs no parentheses).</summary>
    private void Right(Expr e, Precedence needed) => Operand(e, Level(e) == Precedence.Unary && !IsFraction(e) ? Precedence.Atom : needed);

    private static bool IsFraction(Expr e) => e is ProductExpr { Factors: var f } && f[^1].Divide;

    public StringBuilder VisitCall(CallExpr node)
    {
        var a = node.Arguments;
        switch (node.Function)
        {
            case Builtins.Binom:
                return Braced("\\binom{", a[0], "}{", a[1], "}");
            case Builtins.Fact:
                Operand(a[0], Precedence.Atom);
                return _output.Append('!');
            case Builtins.QInt:
                return Braced("[", a[0], "]_{", a[1], "}");
            case Builtins.QFact:
                return Braced("[", a[0], "]_{", a[1], "}!");
            case Builtins.QBinom:
                Braced("\\binom{", a[0], "}{", a[1], "}_{");
                Write(a[2]);
                return _output.Append('}');
            case Builtins.Det when a[0] is MatrixLiteral literal:
                return Literal(literal, "vmatrix");
            case Builtins.Transpose:
                Operand(a[0], Precedence.Atom);
                return _output.Append("^{\\mathsf{T}}");
            case Builtins.Identity:
                _output.Append("I_{");
                Write(a[0]);
                return _output.Append('}');
            // The number functions in their usual notation: F_n, L_n, Stirling's brackets and braces (Knuth's notation), H_n, B_n, C_n.
            case Builtins.Fibonacci: return Subscripted("F", a[0]);
            case Builtins.Lucas: return Subscripted("L", a[0]);
            case Builtins.Harmonic: return Subscripted("H", a[0]);
            case Builtins.Bernoulli: return Subscripted("B", a[0]);
            case Builtins.Catalan: return Subscripted("C", a[0]);
            case Builtins.Stirling1: return Braced("\\left[{", a[0], " \\atop ", a[1], "}\\right]");
            case Builtins.Stirling2: return Braced("\\left\\{{", a[0], " \\atop ", a[1], "}\\right\\}");
            case Builtins.Multinomial:
                _output.Append("\\binom{");
                List(a, " + ");
                _output.Append("}{");
                List(a, ", ");
                return _output.Append('}');
            case Builtins.Min or Builtins.Max or Builtins.Gcd:
                _output.Append('\\').Append(node.Function).Append("\\left(");
                List(a, ", ");
                return _output.Append("\\right)");
            case Builtins.Floor:
                _output.Append("\\left\\lfloor ");
                Write(a[0]);
                return _output.Append(" \\right\\rfloor");
            case Builtins.Ceil:
                _output.Append("\\left\\lceil ");
                Write(a[0]);
                return _output.Append(" \\right\\rceil");
            case Builtins.Abs:
                _output.Append("\\left|");
                Write(a[0]);
                return _output.Append("\\right|");
            case Builtins.Mod:
                return Braced("\\left(", a[0], " \\bmod ", a[1], "\\right)");
            case Builtins.Delta:
                return Braced("\\delta_{", a[0], ",", a[1], "}");
            case Builtins.Iverson:
                _output.Append("\\left[");
                Write(a[0]);
                return _output.Append("\\right]");
            case Builtins.When:
                _output.Append("\\begin{cases} ");
                Write(a[1]);
                _output.Append(" & \\text{if } ");
                Write(a[0]);
                _output.Append(" \\\\ ");
                Write(a[2]);
                return _output.Append(" & \\text{otherwise} \\end{cases}");
            case Builtins.Zero:
                _output.Append("0_{");
                Write(a[0]);
                if (a.Count == 2) { _output.Append("\\times "); Write(a[1]); }
                return _output.Append('}');
            case Builtins.Inverse:
                Operand(a[0], Precedence.Atom);
                return _output.Append("^{-1}");
            case Builtins.Diagonal:
                _output.Append("\\operatorname{diag}\\left(");
                List(a, ", ");
                return _output.Append("\\right)");
            case Builtins.Entry or Builtins.Submatrix or Builtins.Minor:
                // M_{i,j} for an entry, M_{R,C} for the submatrix on rows R and columns C; a minor is its determinant.
                if (node.Function == Builtins.Minor) _output.Append("\\det ");
                Operand(a[0], Precedence.Atom);
                _output.Append("_{");
                Write(a[1]);
                _output.Append(',');
                Write(a[2]);
                return _output.Append('}');
            case Builtins.IndexList:
                _output.Append("\\{");
                List(a, ", ");
                return _output.Append("\\}");
            case Builtins.Range:
                Write(a[0]);
                _output.Append(", \\ldots, ");
                return Write(a[1]);
            default:
                _output.Append(node.Function switch
                {
                    Builtins.Det => "\\det",
                    Builtins.Trace => "\\operatorname{tr}",
                    Builtins.Permanent => "\\operatorname{perm}",
                    Builtins.Pfaffian => "\\operatorname{pf}",
                    Builtins.Adjugate => "\\operatorname{adj}",
                    _ => $"\\operatorname{{{Escape(node.Function)}}}",
                });
                if (a[0] is MatrixLiteral or MatrixComprehension)
                {
                    _output.Append(' ');
                    return Write(a[0]);
                }
                _output.Append("\\left(");
                Write(a[0]);
                return _output.Append("\\right)");
        }
    }

    public StringBuilder VisitBound(BoundExpr node)
    {
        _output.Append(node.Kind == BoundKind.Sum ? "\\sum_{" : "\\prod_{").Append(Name(node.Variable)).Append('=');
        // an infinite end of a power series identity's range (up to q^N)
        if (node.From is UnaryExpr { Operand: NameRef { Name: "inf" } }) _output.Append("-\\infty"); else Write(node.From);
        _output.Append("}^{");
        if (node.To is NameRef { Name: "inf" }) _output.Append("\\infty"); else Write(node.To);
        _output.Append("} ");
        Operand(node.Body, Precedence.Power);
        return _output;
    }

    public StringBuilder VisitMatrixComprehension(MatrixComprehension node)
    {
        _output.Append("\\left(");
        Write(node.Body);
        _output.Append("\\right)_{");
        Write(node.RowFrom);
        _output.Append(" \\le ").Append(Name(node.RowVariable)).Append(" \\le ");
        Write(node.RowTo);
        _output.Append(",\\; ");
        Write(node.ColumnFrom);
        _output.Append(" \\le ").Append(Name(node.ColumnVariable)).Append(" \\le ");
        Write(node.ColumnTo);
        return _output.Append('}');
    }

    public StringBuilder VisitMatrixLiteral(MatrixLiteral node) => Literal(node, "pmatrix");

    private StringBuilder Literal(MatrixLiteral node, string environment)
    {
        _output.Append("\\begin{").Append(environment).Append('}');
        for (var i = 0; i < node.Rows.Count; i++)
        {
            _output.Append(i == 0 ? " " : " \\\\ ");
            for (var j = 0; j < node.Rows[i].Count; j++)
            {
                if (j > 0) _output.Append(" & ");
                Write(node.Rows[i][j]);
            }
        }
        return _output.Append(" \\end{").Append(environment).Append('}');
    }

    private StringBuilder Subscripted(string letter, Expr index)
    {
        _output.Append(letter).Append("_{");
        Write(index);
        return _output.Append('}');
    }

    private void List(IReadOnlyList<Expr> items, string separator)
    {
        for (var i = 0; i < items.Count; i++)
        {
            if (i > 0) _output.Append(separator);
            Write(items[i]);
        }
    }

    private StringBuilder Braced(string open, Expr first, string middle, Expr second, string close)
    {
        _output.Append(open);
        Write(first);
        _output.Append(middle);
        Write(second);
        return _output.Append(close);
    }

    /// <summary>The shared table's level (<see cref="PrecedenceTable"/>), where LaTeX differs: <c>\frac{}{}</c> needs no parentheses except as a base, a condition prints as a whole, big operators bind like products, and <c>n!</c>, <c>M^T</c> like powers.</summary>
    private static Precedence Level(Expr e) => e switch
    {
        ProductExpr { Factors: var f } when f[^1].Divide => Precedence.Unary,
        BinaryExpr => Precedence.Power,
        BoundExpr => Precedence.Multiplicative,
        CallExpr { Function: Builtins.Fact or Builtins.QFact or Builtins.Transpose } => Precedence.Power,
        _ => PrecedenceTable.Of(e),
    };

    private void Operand(Expr e, Precedence needed)
    {
        if (Level(e) >= needed)
        {
            Write(e);
            return;
        }
        _output.Append("\\left(");
        Write(e);
        _output.Append("\\right)");
    }

    private StringBuilder Write(Expr e)
    {
        RuntimeHelpers.EnsureSufficientExecutionStack();
        return e.Accept(this);
    }

    /// <summary>A variable as LaTeX: one letter as is, a Greek letter as its command, a longer name upright-italic, trailing digits as a subscript.</summary>
    internal static string Name(string name)
    {
        if (name.Length == 1) return Greek.TryGetValue(name[0], out var g) ? g : name;
        var digits = name.Length;
        while (digits > 0 && char.IsAsciiDigit(name[digits - 1])) digits--;
        if (digits > 0 && digits < name.Length) return $"{Name(name[..digits])}_{{{name[digits..]}}}";
        var text = new StringBuilder();
        foreach (var c in name) text.Append(Greek.TryGetValue(c, out var letter) ? $"{{{letter}}}" : Escape(c.ToString()));
        return $"\\mathit{{{text}}}";
    }

    private static readonly Dictionary<char, string> Greek = BuildGreek();

    private static Dictionary<char, string> BuildGreek()
    {
        var lower = new[] { "alpha", "beta", "gamma", "delta", "epsilon", "zeta", "eta", "theta", "iota", "kappa", "lambda", "mu", "nu", "xi", "o", "pi", "rho", "varsigma", "sigma", "tau", "upsilon", "phi", "chi", "psi", "omega" };
        var map = new Dictionary<char, string>();
        for (var i = 0; i < lower.Length; i++) map[(char)('α' + i)] = lower[i] == "o" ? "o" : "\\" + lower[i];
        var upper = new Dictionary<char, string> { ['Γ'] = "\\Gamma", ['Δ'] = "\\Delta", ['Θ'] = "\\Theta", ['Λ'] = "\\Lambda", ['Ξ'] = "\\Xi", ['Π'] = "\\Pi", ['Σ'] = "\\Sigma", ['Φ'] = "\\Phi", ['Ψ'] = "\\Psi", ['Ω'] = "\\Omega" };
        foreach (var (c, s) in upper) map[c] = s;
        return map;
    }

    /// <summary>Text with LaTeX's special characters escaped (for text mode and \mathit).</summary>
    public static string Escape(string text)
    {
        var output = new StringBuilder();
        foreach (var c in text)
            output.Append(c switch
            {
                '\\' => "\\textbackslash{}",
                '{' => "\\{",
                '}' => "\\}",
                '$' => "\\$",
                '&' => "\\&",
                '#' => "\\#",
                '%' => "\\%",
                '_' => "\\_",
                '^' => "\\textasciicircum{}",
                '~' => "\\textasciitilde{}",
                '\r' or '\n' => " ",
                _ => c.ToString(),
            });
        return output.ToString();
    }
}
