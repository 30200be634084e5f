using System.Numerics;

namespace IdentityQueue.Algebra.Syntax;

/// <summary>A 1-based line and column in catalogue text. Immutable.</summary>
public readonly record struct SourcePosition(int Line, int Column)
{
    /// <summary>No place in a text (line 0): a problem with an option value or a whole file.</summary>
    public static readonly SourcePosition None;

    public bool IsNone => Line == 0;

    public override string ToString() => IsNone ? "" : $"line {Line}, column {Column}";
}

/// <summary>A node of the closed expression tree. Immutable; walk it with an <see cref="IExprVisitor{TResult}"/>.</summary>
public abstract record Expr
{
    private protected Expr(SourcePosition position) => Position = position;

    /// <summary>Where the node starts in the source text.</summary>
    public SourcePosition Position { get; }

    public abstract TResult Accept<TResult>(IExprVisitor<TResult> visitor);
}

/// <summary>An integer literal of any size.</summary>
public sealed record IntegerLiteral(BigInteger Value, SourcePosition At) : Expr(At)
{
    public override TResult Accept<TResult>(IExprVisitor<TResult> visitor) => visitor.VisitInteger(this);
}

/// <summary>A plain name: a variable, or an integer parameter when bound by a family or a bound form.</summary>
public sealed record NameRef(string Name, SourcePosition At) : Expr(At)
{
    public override TResult Accept<TResult>(IExprVisitor<TResult> visitor) => visitor.VisitName(this);
}

/// <summary>An indexed variable <c>x[i]</c> or <c>a[i,j]</c>; indices are integer parameter expressions.</summary>
public sealed record IndexedName(string Name, IReadOnlyList<Expr> Indices, SourcePosition At) : Expr(At)
{
    public override TResult Accept<TResult>(IExprVisitor<TResult> visitor) => visitor.VisitIndexed(this);
}

public enum UnaryOperator { Negate }

/// <summary>Unary minus.</summary>
public sealed record UnaryExpr(UnaryOperator Operator, Expr Operand, SourcePosition At) : Expr(At)
{
    public override TResult Accept<TResult>(IExprVisitor<TResult> visitor) => visitor.VisitUnary(this);
}

/// <summary>One term of a <see cref="SumExpr"/>: added, or subtracted when <see cref="Subtract"/>; <see cref="OperatorPosition"/> is that of its '+' or '-' (the term's own for the first).</summary>
public readonly record struct SumTerm(Expr Value, bool Subtract, SourcePosition OperatorPosition);

/// <summary>
/// A flat chain <c>a + b - c + …</c> of two or more terms, evaluated left to right; the first term is never subtracted
/// (a leading minus is a <see cref="UnaryExpr"/>). A chain of any length is one level of nesting, and every walk of it
/// loops over <see cref="Terms"/> instead of recursing per term.
/// </summary>
public sealed record SumExpr(IReadOnlyList<SumTerm> Terms, SourcePosition At) : Expr(At)
{
    public override TResult Accept<TResult>(IExprVisitor<TResult> visitor) => visitor.VisitSum(this);
}

/// <summary>One factor of a <see cref="ProductExpr"/>: multiplied, or divided by when <see cref="Divide"/>; <see cref="OperatorPosition"/> is that of its '*' or '/' (the factor's own for the first).</summary>
public readonly record struct ProductFactor(Expr Value, bool Divide, SourcePosition OperatorPosition);

/// <summary>
/// A flat chain <c>a * b / c * …</c> of two or more factors, evaluated left to right (<c>a/b*c</c> is <c>(a/b)*c</c>); the
/// first factor is never a divisor. Like <see cref="SumExpr"/>, one level of nesting whatever its length.
/// </summary>
public sealed record ProductExpr(IReadOnlyList<ProductFactor> Factors, SourcePosition At) : Expr(At)
{
    public override TResult Accept<TResult>(IExprVisitor<TResult> visitor) => visitor.VisitProduct(this);
}

/// <summary>
/// The binary operators that are not chains (sums and products are <see cref="SumExpr"/> and <see cref="ProductExpr"/>): '^',
/// and the comparisons (<see cref="Less"/> … <see cref="NotEqual"/>) with the connectives <see cref="And"/> and <see cref="Or"/>,
/// read only as the condition of <c>iverson(...)</c> or <c>when(...)</c>, whose value is 1 or 0.
/// </summary>
public enum BinaryOperator { Power, Less, LessOrEqual, Greater, GreaterOrEqual, Equal, NotEqual, And, Or }

/// <summary><c>a ^ b</c> or a comparison <c>a &lt; b</c>; <see cref="SourcePosition"/> is that of the left operand, <see cref="OperatorPosition"/> that of the operator.</summary>
public sealed record BinaryExpr(BinaryOperator Operator, Expr Left, Expr Right, SourcePosition At, SourcePosition OperatorPosition) : Expr(At)
{
    public override TResult Accept<TResult>(IExprVisitor<TResult> visitor) => visitor.VisitBinary(this);
}

/// <summary>A call of a built-in function (<see cref="Builtins"/>): binom, fact, qint, qfact, qbinom, det, pf, perm, tr, transpose, id,
/// the integer functions (min, max, floor, ceil, mod, gcd, abs, delta, iverson, when) and the number functions (fib, lucas, stirling1,
/// stirling2, harmonic, bernoulli, catalan, multinomial).</summary>
public sealed record CallExpr(string Function, IReadOnlyList<Expr> Arguments, SourcePosition At) : Expr(At)
{
    public override TResult Accept<TResult>(IExprVisitor<TResult> visitor) => visitor.VisitCall(this);
}

public enum BoundKind { Sum, Product }

/// <summary><c>sum(k in A..B: body)</c> or <c>prod(k in A..B: body)</c>; the bound name is an integer parameter inside the body.</summary>
public sealed record BoundExpr(BoundKind Kind, string Variable, Expr From, Expr To, Expr Body, SourcePosition At) : Expr(At)
{
    public override TResult Accept<TResult>(IExprVisitor<TResult> visitor) => visitor.VisitBound(this);
}

/// <summary><c>matrix(i in A..B, j in C..D: body)</c>.</summary>
public sealed record MatrixComprehension(
    string RowVariable, Expr RowFrom, Expr RowTo,
    string ColumnVariable, Expr ColumnFrom, Expr ColumnTo,
    Expr Body, SourcePosition At) : Expr(At)
{
    public override TResult Accept<TResult>(IExprVisitor<TResult> visitor) => visitor.VisitMatrixComprehension(this);
}

/// <summary>A matrix literal <c>[[a, b], [c, d]]</c>.</summary>
public sealed record MatrixLiteral(IReadOnlyList<IReadOnlyList<Expr>> Rows, SourcePosition At) : Expr(At)
{
    public override TResult Accept<TResult>(IExprVisitor<TResult> visitor) => visitor.VisitMatrixLiteral(this);
}

/// <summary>Visits every kind of <see cref="Expr"/>; the tree is closed, so a visitor is total.</summary>
public interface IExprVisitor<out TResult>
{
    TResult VisitInteger(IntegerLiteral node);
    TResult VisitName(NameRef node);
    TResult VisitIndexed(IndexedName node);
    TResult VisitUnary(UnaryExpr node);
    TResult VisitSum(SumExpr node);
    TResult VisitProduct(ProductExpr node);
    TResult VisitBinary(BinaryExpr node);
    TResult VisitCall(CallExpr node);
    TResult VisitBound(BoundExpr node);
    TResult VisitMatrixComprehension(MatrixComprehension node);
    TResult VisitMatrixLiteral(MatrixLiteral node);
}

/// <summary>The names of the built-in functions and bound forms, which cannot be used as variables.</summary>
public static class Builtins
{
    public const string Binom = "binom", Fact = "fact", QInt = "qint", QFact = "qfact", QBinom = "qbinom";
    public const string Det = "det", Pfaffian = "pf", Permanent = "perm", Trace = "tr", Transpose = "transpose", Identity = "id";
    public const string Inverse = "inv", Adjugate = "adj", Zero = "zero", Diagonal = "diag", Submatrix = "submatrix", Minor = "minor";
    /// <summary><c>entry(M, i, j)</c>, also written <c>(M)[i, j]</c> after a parenthesis, a call or a matrix literal.</summary>
    public const string Entry = "entry";
    /// <summary>
    /// Not callable by name: the node of an index list <c>[1, 3..n]</c> (an argument of submatrix and minor), whose
    /// items are integer expressions or ranges (a call of <see cref="Range"/> with the two ends).
    /// </summary>
    public const string IndexList = "[]", Range = "..";
    public const string Sum = "sum", Prod = "prod", Matrix = "matrix";

    // Integer functions of parameters and bound variables (exact, evaluated once the parameters are fixed).
    public const string Min = "min", Max = "max", Floor = "floor", Ceil = "ceil", Mod = "mod", Gcd = "gcd", Abs = "abs";
    public const string Delta = "delta", Iverson = "iverson", When = "when";

    // Combinatorial number functions of integer arguments (exact rationals).
    public const string Fibonacci = "fib", Lucas = "lucas", Stirling1 = "stirling1", Stirling2 = "stirling2", Harmonic = "harmonic";
    public const string Bernoulli = "bernoulli", Catalan = "catalan", Multinomial = "multinomial";

    /// <summary>The word that starts a definition line: <c>let NAME(PARAMS) = BODY</c>.</summary>
    public const string Let = "let";

    /// <summary>Function name → the fewest and the most arguments it takes.</summary>
    public static readonly IReadOnlyDictionary<string, (int Min, int Max)> Arity = new Dictionary<string, (int, int)>
    {
        [Binom] = (2, 2), [Fact] = (1, 1), [QInt] = (2, 2), [QFact] = (2, 2), [QBinom] = (3, 3),
        [Det] = (1, 1), [Pfaffian] = (1, 1), [Permanent] = (1, 1), [Trace] = (1, 1), [Transpose] = (1, 1), [Identity] = (1, 1),
        [Inverse] = (1, 1), [Adjugate] = (1, 1), [Zero] = (1, 2), [Diagonal] = (1, int.MaxValue), [Submatrix] = (3, 3), [Minor] = (3, 3), [Entry] = (3, 3),
        [Min] = (2, int.MaxValue), [Max] = (2, int.MaxValue), [Floor] = (1, 1), [Ceil] = (1, 1), [Mod] = (2, 2),
        [Gcd] = (2, int.MaxValue), [Abs] = (1, 1), [Delta] = (2, 2), [Iverson] = (1, 1), [When] = (3, 3),
        [Fibonacci] = (1, 1), [Lucas] = (1, 1), [Stirling1] = (2, 2), [Stirling2] = (2, 2), [Harmonic] = (1, 1),
        [Bernoulli] = (1, 1), [Catalan] = (1, 1), [Multinomial] = (1, int.MaxValue),
    };

    /// <summary>
    /// The functions whose every argument is an integer parameter expression and whose value is an exact rational constant
    /// once the parameters are fixed (all but <see cref="When"/>, whose branches may be any expressions).
    /// </summary>
    public static readonly IReadOnlySet<string> ParameterFunctions = new HashSet<string>(StringComparer.Ordinal)
    {
        Min, Max, Floor, Ceil, Mod, Gcd, Abs, Delta, Iverson,
        Fibonacci, Lucas, Stirling1, Stirling2, Harmonic, Bernoulli, Catalan, Multinomial,
    };

    /// <summary>The functions whose first argument is a condition (a comparison).</summary>
    public static bool TakesCondition(string function) => function is Iverson or When;

    /// <summary>True for the operators of a condition: a comparison, <c>and</c>, <c>or</c> (value 1 or 0).</summary>
    public static bool IsComparison(BinaryOperator op) => op >= BinaryOperator.Less;

    /// <summary>The symbol of a comparison or connective: <c>&lt; &lt;= &gt; &gt;= = != and or</c>.</summary>
    public static string Symbol(BinaryOperator op) => op switch
    {
        BinaryOperator.Less => "<",
        BinaryOperator.LessOrEqual => "<=",
        BinaryOperator.Greater => ">",
        BinaryOperator.GreaterOrEqual => ">=",
        BinaryOperator.Equal => "=",
        BinaryOperator.NotEqual => "!=",
        BinaryOperator.And => "and",
        BinaryOperator.Or => "or",
        _ => throw new ArgumentOutOfRangeException(nameof(op), op, "not a comparison"),
    };

    /// <summary>The connectives of conditions: <c>A &lt; B and C &lt; D or E = F</c> (<c>and</c> binds tighter).</summary>
    public const string And = "and", Or = "or";

    /// <summary>Whether argument <paramref name="index"/> of <paramref name="function"/> is an index list (<c>[1, 3..n]</c>).</summary>
    public static bool TakesIndexList(string function, int index) => function is Submatrix or Minor && index >= 1;

    /// <summary>Words that may not name a variable or parameter.</summary>
    public static readonly IReadOnlySet<string> Reserved = new HashSet<string>(Arity.Keys) { Sum, Prod, Matrix, Let, And, Or, "over", "for", "in" };
}
