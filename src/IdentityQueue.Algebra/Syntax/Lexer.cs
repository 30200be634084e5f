using System.Globalization;
using System.Numerics;

namespace IdentityQueue.Algebra.Syntax;

/// <summary>
/// Splits one catalogue line into tokens, on demand, by walking the string with an index (no regular expressions,
/// no allocation except the message of an invalid token). A <c>#</c> ends the line.
/// </summary>
internal sealed class Lexer
{
    private readonly string _text;
    private int _index;
    private int _lastTokenEnd;

    public Lexer(string text, int start)
    {
        _text = text;
        _index = start;
        _lastTokenEnd = start;
    }

    public string Text => _text;

    public Token Next()
    {
        var text = _text;
        var i = _index;
        while (i < text.Length && CharClass.IsSpace(text[i])) i++;
        if (i >= text.Length || text[i] == '#')
        {
            _index = i;
            return new Token(TokenKind.End, _lastTokenEnd, 0);
        }

        var token = Scan(text, i);
        _index = token.End;
        _lastTokenEnd = token.End;
        return token;
    }

    private static Token Scan(string text, int i)
    {
        var c = text[i];
        if (char.IsAsciiDigit(c)) return ScanNumber(text, i);
        if (CharClass.IsIdentifierStart(c))
        {
            var j = i + 1;
            while (j < text.Length && CharClass.IsIdentifierPart(text[j])) j++;
            return new Token(TokenKind.Name, i, j - i);
        }

        var next = i + 1 < text.Length ? text[i + 1] : '\0';
        switch (c)
        {
            case '+': return new Token(TokenKind.Plus, i, 1);
            case '-': return new Token(TokenKind.Minus, i, 1);
            case '/': return new Token(TokenKind.Slash, i, 1);
            case '^': return new Token(TokenKind.Caret, i, 1);
            case '(': return new Token(TokenKind.LeftParen, i, 1);
            case ')': return new Token(TokenKind.RightParen, i, 1);
            case '[': return new Token(TokenKind.LeftBracket, i, 1);
            case ']': return new Token(TokenKind.RightBracket, i, 1);
            case ',': return new Token(TokenKind.Comma, i, 1);
            case ':': return new Token(TokenKind.Colon, i, 1);
            case '<': return next == '=' ? new Token(TokenKind.LessEqual, i, 2) : new Token(TokenKind.Less, i, 1);
            case '>': return next == '=' ? new Token(TokenKind.GreaterEqual, i, 2) : new Token(TokenKind.Greater, i, 1);
            case '!':
                return next == '='
                    ? new Token(TokenKind.NotEqual, i, 2)
                    : new Token(TokenKind.Invalid, i, 1, SyntaxMessages.Factorial);
            case '*':
                return next == '*'
                    ? new Token(TokenKind.Invalid, i, 2, SyntaxMessages.DoubleStar)
                    : new Token(TokenKind.Star, i, 1);
            case '=':
                return next == '='
                    ? new Token(TokenKind.Invalid, i, 2, SyntaxMessages.DoubleEquals)
                    : new Token(TokenKind.Equals, i, 1);
            case '.':
                if (next == '.')
                {
                    return i + 2 < text.Length && text[i + 2] == '.'
                        ? new Token(TokenKind.Invalid, i, 3, SyntaxMessages.TripleDot)
                        : new Token(TokenKind.DotDot, i, 2);
                }
                if (char.IsAsciiDigit(next)) return ScanDecimal(text, i, i);
                return new Token(TokenKind.Invalid, i, 1, SyntaxMessages.LoneDot);
        }

        var length = char.IsHighSurrogate(c) && char.IsLowSurrogate(next) ? 2 : 1;
        return new Token(TokenKind.Invalid, i, length, SyntaxMessages.UnexpectedCharacter(text.Substring(i, length)));
    }

    private static Token ScanNumber(string text, int i)
    {
        var j = i;
        while (j < text.Length && char.IsAsciiDigit(text[j])) j++;
        if (j + 1 < text.Length && text[j] == '.' && char.IsAsciiDigit(text[j + 1])) return ScanDecimal(text, i, j);
        if (j + 1 < text.Length && text[j] is ('e' or 'E') && char.IsAsciiDigit(text[j + 1]))
        {
            // 1e5 would otherwise read as the number 1 next to the name e5.
            var end = j + 1;
            while (end < text.Length && char.IsAsciiDigit(text[end])) end++;
            if (end == text.Length || !CharClass.IsIdentifierPart(text[end]))
            {
                return new Token(TokenKind.Invalid, i, end - i,
                    SyntaxMessages.ScientificNotation(text[i..j], text[(j + 1)..end]));
            }
        }
        return new Token(TokenKind.Integer, i, j - i);
    }

    /// <summary>A decimal like <c>1.5</c> or <c>.5</c>: an invalid token whose message suggests the fraction.</summary>
    private static Token ScanDecimal(string text, int start, int dot)
    {
        var end = dot + 1;
        while (end < text.Length && char.IsAsciiDigit(text[end])) end++;
        return new Token(TokenKind.Invalid, start, end - start,
            SyntaxMessages.DecimalNotSupported(FractionFor(text.AsSpan(start, dot - start), text.AsSpan(dot + 1, end - dot - 1))));
    }

    /// <summary>The decimal's value as a reduced fraction, e.g. <c>3/2</c> for <c>1.5</c>; null when it is too long to be worth showing.</summary>
    private static string? FractionFor(ReadOnlySpan<char> whole, ReadOnlySpan<char> fraction)
    {
        if (whole.Length + fraction.Length > 40) return null;
        Span<char> digits = stackalloc char[whole.Length + fraction.Length];
        whole.CopyTo(digits);
        fraction.CopyTo(digits[whole.Length..]);
        var numerator = BigInteger.Parse(digits, NumberStyles.None, CultureInfo.InvariantCulture);
        var denominator = BigInteger.Pow(10, fraction.Length);
        var gcd = BigInteger.GreatestCommonDivisor(numerator, denominator);
        if (!gcd.IsZero)
        {
            numerator /= gcd;
            denominator /= gcd;
        }
        return denominator.IsOne
            ? numerator.ToString(CultureInfo.InvariantCulture)
            : $"{numerator.ToString(CultureInfo.InvariantCulture)}/{denominator.ToString(CultureInfo.InvariantCulture)}";
    }
}

/// <summary>Character classes of the catalogue language.</summary>
internal static class CharClass
{
    public static bool IsSpace(char c) =>
        c is ' ' or '\t' or '\r' or '\n' or '\v' or '\f' or '\uFEFF' || (c > '\u007F' && char.IsWhiteSpace(c));

    /// <summary>Greek letters, capital and small (U+0391–U+03A9, U+03B1–U+03C9), may be used in names.</summary>
    public static bool IsGreek(char c) => (c >= '\u0391' && c <= '\u03A9' && c != '\u03A2') || (c >= '\u03B1' && c <= '\u03C9');

    public static bool IsIdentifierStart(char c) => char.IsAsciiLetter(c) || c == '_' || IsGreek(c);

    public static bool IsIdentifierPart(char c) => IsIdentifierStart(c) || char.IsAsciiDigit(c);

    /// <summary>A char of a line label: letters, digits, '_', '-' and '.'.</summary>
    public static bool IsLabelChar(char c) => IsIdentifierPart(c) || c is '-' or '.';
}

/// <summary>
/// The lexer's rules for names, for readers that take a name from elsewhere than a catalogue line (a <c>.jsonl</c> key,
/// a <c>.csv</c> field): an identifier is what <see cref="Lexer"/> reads as one name; a label is what may stand before
/// the colon of a catalogue line. Stateless.
/// </summary>
public static class Identifiers
{
    /// <summary>An ASCII or Greek letter or '_', then letters, digits and '_' (a variable or parameter name).</summary>
    public static bool IsIdentifier(string text) =>
        text.Length > 0 && CharClass.IsIdentifierStart(text[0]) && text.All(CharClass.IsIdentifierPart);

    /// <summary>Letters, digits, '_', '-' and '.', at least one.</summary>
    public static bool IsLabel(string text) => text.Length > 0 && text.All(CharClass.IsLabelChar);
}
