namespace IdentityQueue.Algebra.Syntax;

/// <summary>How tightly a form binds, loosest first (SPEC §3): the parser's descent, <see cref="ExprPrinter"/> and the LaTeX printer follow this one order.</summary>
public enum Precedence
{
    Or = -2,
    And = -1,
    Comparison = 0,
    Additive = 1,
    Multiplicative = 2,
    Unary = 3,
    Power = 4,
    Atom = 5,
}

/// <summary>
/// The one precedence table: which level each operator and each printed node has, and what level each operand needs.
/// The left operand of a left-associative operator may have the operator's own level, the right one must bind tighter
/// (<c>a - (b - c)</c>, <c>a/(b*c)</c>); the base of '^' is an atom (<c>(-x)^2</c>, <c>(2^3)^2</c>) and its exponent may
/// start with a sign (<c>2^-1</c>, right-associative <c>2^3^2</c>); the operand of unary minus may be a power (<c>-x^2</c>).
/// </summary>
public static class PrecedenceTable
{
    /// <summary>The level of a binary operator.</summary>
    public static Precedence Of(BinaryOperator op) => op switch
    {
        BinaryOperator.Or => Precedence.Or,
        BinaryOperator.And => Precedence.And,
        >= BinaryOperator.Less => Precedence.Comparison,
        _ => Precedence.Power,
    };

    /// <summary>How tightly the printed form of a node binds; a negative literal prints like a negation.</summary>
    public static Precedence Of(Expr expr) => expr switch
    {
        BinaryExpr binary => Of(binary.Operator),
        SumExpr => Precedence.Additive,
        ProductExpr => Precedence.Multiplicative,
        UnaryExpr => Precedence.Unary,
        IntegerLiteral { Value.Sign: < 0 } => Precedence.Unary,
        _ => Precedence.Atom,
    };

    /// <summary>The levels the left and right operands of a binary operator need (a condition: 'or' over 'and' over comparisons of sums).</summary>
    public static (Precedence Left, Precedence Right) Operands(BinaryOperator op) => op switch
    {
        BinaryOperator.Power => (Precedence.Atom, Precedence.Unary),
        BinaryOperator.Or => (Precedence.Or, Precedence.And),
        BinaryOperator.And => (Precedence.And, Precedence.Comparison),
        _ => (Precedence.Additive, Precedence.Additive),
    };

    /// <summary>The level a term of a sum needs: the first its own level, the others one tighter.</summary>
    public static Precedence TermOperand(bool first) => first ? Precedence.Additive : Precedence.Multiplicative;

    /// <summary>The level a factor of a product needs: the first its own level, the others one tighter.</summary>
    public static Precedence FactorOperand(bool first) => first ? Precedence.Multiplicative : Precedence.Unary;

    /// <summary>The level of the infix operator a token spells (<c>+ -</c>, <c>* /</c>, <c>^</c>, comparisons), or null.</summary>
    internal static Precedence? OfToken(TokenKind kind) => kind switch
    {
        TokenKind.Plus or TokenKind.Minus => Precedence.Additive,
        TokenKind.Star or TokenKind.Slash => Precedence.Multiplicative,
        TokenKind.Caret => Precedence.Power,
        TokenKind.Less or TokenKind.LessEqual or TokenKind.Greater or TokenKind.GreaterEqual or TokenKind.Equals or TokenKind.NotEqual => Precedence.Comparison,
        _ => null,
    };

    /// <summary>The comparison a token spells, or null.</summary>
    internal static BinaryOperator? ComparisonOf(TokenKind kind) => kind switch
    {
        TokenKind.Less => BinaryOperator.Less,
        TokenKind.LessEqual => BinaryOperator.LessOrEqual,
        TokenKind.Greater => BinaryOperator.Greater,
        TokenKind.GreaterEqual => BinaryOperator.GreaterOrEqual,
        TokenKind.Equals => BinaryOperator.Equal,
        TokenKind.NotEqual => BinaryOperator.NotEqual,
        _ => null,
    };
}
