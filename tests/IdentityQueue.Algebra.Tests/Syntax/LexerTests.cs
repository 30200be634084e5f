using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Tests.Syntax;

/// <summary>Tokens of the catalogue language.</summary>
public class LexerTests
{
    private static List<Token> Tokens(string text)
    {
        var lexer = new Lexer(text, 0);
        var tokens = new List<Token>();
        while (true)
        {
            var token = lexer.Next();
            tokens.Add(token);
            if (token.Kind is TokenKind.End or TokenKind.Invalid) return tokens;
        }
    }

    private static string Kinds(string text) => string.Join(" ", Tokens(text).Select(t => t.Kind));

    [Fact]
    public void RangeBetweenIntegerAndNameIsThreeTokens()
    {
        Assert.Equal("Integer DotDot Name End", Kinds("0..n"));
        Assert.Equal("Integer DotDot Integer End", Kinds("1..12"));
    }

    [Fact]
    public void EveryPunctuationMarkIsOneToken()
    {
        Assert.Equal("Plus Minus Star Slash Caret LeftParen RightParen LeftBracket RightBracket Comma Colon Equals End",
            Kinds("+-*/^()[],:="));
    }

    [Fact]
    public void TokensRecordTheirSpan()
    {
        var tokens = Tokens("  abc12 + 345");
        Assert.Equal((TokenKind.Name, 2, 5), (tokens[0].Kind, tokens[0].Start, tokens[0].Length));
        Assert.Equal((TokenKind.Plus, 8, 1), (tokens[1].Kind, tokens[1].Start, tokens[1].Length));
        Assert.Equal((TokenKind.Integer, 10, 3), (tokens[2].Kind, tokens[2].Start, tokens[2].Length));
    }

    [Fact]
    public void EndLiesJustAfterTheLastTokenBeforeSpacesAndComment()
    {
        var end = Tokens("x = y    # note")[^1];
        Assert.Equal((TokenKind.End, 5, 0), (end.Kind, end.Start, end.Length));
    }

    [Fact]
    public void HashStartsACommentAnywhere()
    {
        Assert.Equal("Name End", Kinds("x#= y"));
    }

    [Fact]
    public void DigitsThenLettersAreTwoTokens()
    {
        Assert.Equal("Integer Name End", Kinds("2x"));
        Assert.Equal("Name End", Kinds("x2"));
    }

    [Theory]
    [InlineData("1.5", "write 3/2", 3)]
    [InlineData("2.50", "write 5/2", 4)]
    [InlineData("3.0", "write 3", 3)]
    [InlineData(".25", "write 1/4", 3)]
    [InlineData("0.1234567890123456789012345678901234567890123", "write the value as a fraction p/q", 45)]
    public void DecimalIsOneInvalidTokenSuggestingTheFraction(string text, string suggestion, int length)
    {
        var token = Tokens(text)[^1];
        Assert.Equal(TokenKind.Invalid, token.Kind);
        Assert.Equal(length, token.Length);
        Assert.StartsWith("decimal numbers are not supported; ", token.Message);
        Assert.EndsWith(suggestion, token.Message);
    }

    [Fact]
    public void ScientificNotationIsOneInvalidToken()
    {
        var token = Tokens("1e5 ")[0];
        Assert.Equal((TokenKind.Invalid, 0, 3), (token.Kind, token.Start, token.Length));
        Assert.Equal("scientific notation is not supported; write 1*10^5", token.Message);
    }

    [Fact]
    public void DigitsThenANameThatMerelyStartsWithEAreTwoTokens()
    {
        Assert.Equal("Integer Name End", Kinds("2e5x"));
        Assert.Equal("Integer Name End", Kinds("2e"));
    }

    [Theory]
    [InlineData("==", SyntaxMessages.DoubleEquals)]
    [InlineData("**", SyntaxMessages.DoubleStar)]
    [InlineData("...", SyntaxMessages.TripleDot)]
    [InlineData(". ", SyntaxMessages.LoneDot)]
    public void DoubledOperatorsAreInvalid(string text, string message)
    {
        var token = Tokens(text)[^1];
        Assert.Equal((TokenKind.Invalid, message), (token.Kind, token.Message));
    }

    [Theory]
    [InlineData("$", "unexpected character '$'")]
    [InlineData("\u00D7", "unexpected character '\u00D7' (U+00D7); write '*'")]
    [InlineData("\u0001", "unexpected character U+0001")]
    [InlineData("\U0001D465", "unexpected character '\U0001D465' (U+1D465)")]
    public void UnknownCharacterIsNamed(string text, string message)
    {
        var token = Tokens(text)[^1];
        Assert.Equal(TokenKind.Invalid, token.Kind);
        Assert.Equal(message, token.Message);
        Assert.Equal(text.Length, token.Length);
    }

    [Fact]
    public void GreekLettersMakeNames()
    {
        Assert.Equal("Name Star Name End", Kinds("αβ*Ω"));
    }

    [Fact]
    public void NonBreakingSpaceAndByteOrderMarkAreWhitespace()
    {
        Assert.Equal("Name Name End", Kinds("\uFEFFx\u00A0y"));
    }
}
