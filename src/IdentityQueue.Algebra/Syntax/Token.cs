namespace IdentityQueue.Algebra.Syntax;

/// <summary>The kinds of token of the catalogue language.</summary>
internal enum TokenKind
{
    /// <summary>End of the line, or the start of a <c>#</c> comment.</summary>
    End,
    Integer,
    Name,
    Plus,
    Minus,
    Star,
    Slash,
    Caret,
    LeftParen,
    RightParen,
    LeftBracket,
    RightBracket,
    Comma,
    Colon,
    Equals,
    DotDot,
    /// <summary>The comparisons <c>&lt; &lt;= &gt; &gt;= !=</c> (and <see cref="Equals"/> inside a condition).</summary>
    Less,
    LessEqual,
    Greater,
    GreaterEqual,
    NotEqual,

    /// <summary>Text that is no token; <see cref="Token.Message"/> says why.</summary>
    Invalid,
}

/// <summary>
/// A token: its kind and where it lies in the line (0-based <see cref="Start"/>, <see cref="Length"/> chars).
/// An <see cref="TokenKind.End"/> token has length 0 and starts just after the last token of the line.
/// </summary>
internal readonly record struct Token(TokenKind Kind, int Start, int Length, string? Message = null)
{
    public int End => Start + Length;

    /// <summary>The 1-based column of the token's first char.</summary>
    public int Column => Start + 1;

    /// <summary>True for tokens that can begin an operand: a number, a name (other than a clause word), '(' or '['.</summary>
    public bool StartsOperand(string text) => Kind switch
    {
        TokenKind.Integer or TokenKind.LeftParen or TokenKind.LeftBracket => true,
        TokenKind.Name => !IsWord(text, "over") && !IsWord(text, "for") && !IsWord(text, "in"),
        _ => false,
    };

    /// <summary>True when this is a name token spelling <paramref name="word"/>.</summary>
    public bool IsWord(string text, string word) =>
        Kind == TokenKind.Name && text.AsSpan(Start, Length).SequenceEqual(word);
}
