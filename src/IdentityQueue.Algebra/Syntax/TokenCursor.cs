using System.Globalization;
using System.Numerics;

namespace IdentityQueue.Algebra.Syntax;

/// <summary>
/// The parsers' shared place in one line: the current and previous token, the first problem found, and the helpers that
/// word and place a problem. A failing parse method reports here and returns null; every caller passes the null up.
/// </summary>
internal sealed class TokenCursor
{
    private readonly Lexer _lexer;
    private readonly Dictionary<string, string>.AlternateLookup<ReadOnlySpan<char>> _names =
        new Dictionary<string, string>(StringComparer.Ordinal).GetAlternateLookup<ReadOnlySpan<char>>();
    private Token _token;
    private Token _previous;

    public TokenCursor(string text, int start, int line)
    {
        Text = text;
        Line = line;
        _lexer = new Lexer(text, start);
        _token = _lexer.Next();
    }

    public string Text { get; }

    public int Line { get; }

    public ref readonly Token Current => ref _token;

    public ref readonly Token Previous => ref _previous;

    public bool HasPrevious { get; private set; }

    /// <summary>The first problem found, once a parse method has returned null.</summary>
    public Diagnostic? Error { get; private set; }

    public bool AtEnd => _token.Kind == TokenKind.End;

    public void Advance()
    {
        _previous = _token;
        HasPrevious = true;
        _token = _lexer.Next();
    }

    public static bool StartsExpression(in Token token) => token.Kind is TokenKind.Integer or TokenKind.Name
        or TokenKind.LeftParen or TokenKind.LeftBracket or TokenKind.Minus or TokenKind.Plus;

    /// <summary>
    /// The message for a token that cannot follow a complete operand: two operands side by side are a missing operator,
    /// a stray closing bracket is unmatched, anything else gets <paramref name="otherwise"/>.
    /// </summary>
    public string FollowMessage(string otherwise)
    {
        if (HasPrevious && _token.StartsOperand(Text)) return SyntaxMessages.MissingOperator(Describe(_previous), Describe(_token));
        return _token.Kind switch
        {
            TokenKind.Less or TokenKind.LessEqual or TokenKind.Greater or TokenKind.GreaterEqual or TokenKind.NotEqual =>
                SyntaxMessages.ComparisonOutsideCondition(Describe(_token)),
            TokenKind.RightParen => SyntaxMessages.UnmatchedParenthesis,
            TokenKind.RightBracket => SyntaxMessages.UnmatchedBracket,
            _ => otherwise,
        };
    }

    /// <summary>Records the first problem; a problem at an invalid token is always the lexer's own message.</summary>
    public bool Report(in Token at, string message)
    {
        Error ??= new Diagnostic(At(at), at.Kind == TokenKind.Invalid && at.Message is not null ? at.Message : message);
        return false;
    }

    /// <summary>Records the first problem at a position that is not a token's.</summary>
    public bool Report(SourcePosition at, string message)
    {
        Error ??= new Diagnostic(at, message);
        return false;
    }

    public T? Fail<T>(in Token at, string message) where T : class
    {
        Report(at, message);
        return null;
    }

    public SourcePosition At(in Token token) => new(Line, token.Column);

    /// <summary>
    /// The token's text, one string per distinct text in the line: an expanded polynomial names the same few variables
    /// hundreds of thousands of times, and a string per occurrence would be a fifth of its tree.
    /// </summary>
    public string TextOf(in Token token)
    {
        var span = Text.AsSpan(token.Start, token.Length);
        if (_names.TryGetValue(span, out var name)) return name;
        name = span.ToString();
        _names[name] = name;
        return name;
    }

    public string Describe(in Token token) =>
        token.Kind == TokenKind.End ? SyntaxMessages.EndOfLine : SyntaxMessages.Quote(Text.AsSpan(token.Start, token.Length));

    public string ShortText(int start, int end) =>
        end - start <= 60 ? Text[start..end] : string.Concat(Text.AsSpan(start, 50), "…", Text.AsSpan(end - 1, 1));

    public BigInteger ParseInteger(in Token token)
    {
        var digits = Text.AsSpan(token.Start, token.Length);
        if (digits.Length <= 18)
        {
            ulong value = 0;
            foreach (var c in digits) value = value * 10 + (ulong)(c - '0');
            return value;
        }
        return BigInteger.Parse(digits, NumberStyles.None, CultureInfo.InvariantCulture);
    }
}
