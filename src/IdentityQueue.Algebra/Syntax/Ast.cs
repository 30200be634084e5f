using System.Numerics;

namespace IdentityQueue.Algebra.Syntax;

/// <summary>A 1-based line and column in catalogue text. Immutable.</summary>
public readonly record struct SourcePosition(int Line, int Column)
{
    public override string ToString() => $"line {Line}, column {Column}";
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

public enum BinaryOperator { Add, Subtract, Multiply, Divide, Power }

/// <summary><c>+ - * / ^</c>; <see cref="SourcePosition"/> is that of the operator's left operand, <see cref="OperatorPosition"/> that of the operator.</summary>
public sealed record BinaryExpr(BinaryOperator Operator, Expr Left, Expr Right, SourcePosition At, SourcePosition OperatorPosition) : Expr(At)
{
    public override TResult Accept<TResult>(IExprVisitor<TResult> visitor) => visitor.VisitBinary(this);
}

/// <summary>A call of a built-in function (<see cref="Builtins"/>): binom, fact, qint, qfact, qbinom, det, pf, perm, tr, transpose, id.</summary>
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
    public const string Sum = "sum", Prod = "prod", Matrix = "matrix";

    /// <summary>Function name → number of arguments.</summary>
    public static readonly IReadOnlyDictionary<string, int> Arity = new Dictionary<string, int>
    {
        [Binom] = 2, [Fact] = 1, [QInt] = 2, [QFact] = 2, [QBinom] = 3,
        [Det] = 1, [Pfaffian] = 1, [Permanent] = 1, [Trace] = 1, [Transpose] = 1, [Identity] = 1,
    };

    /// <summary>Words that may not name a variable or parameter.</summary>
    public static readonly IReadOnlySet<string> Reserved = new HashSet<string>(Arity.Keys) { Sum, Prod, Matrix, "over", "for", "in" };
}
