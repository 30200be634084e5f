using System.Numerics;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Tests.Syntax;

/// <summary>
/// SPEC §6: an input beyond a named limit gives a clear message naming the limit and never a crash — in particular no
/// stack overflow from deep nesting, however deep the text goes. That the refusal comes at once is shown by where it
/// comes (the position of the first character beyond the limit), not by a clock: these machines are shared and noisy,
/// and the parser's speed is measured in the benchmarks.
/// </summary>
public class CatalogueParserLimitsTests
{
    private const int Deep = 100_000;

    private static Diagnostic FailsPromptly(string line, Limits? limits = null)
    {
        var result = CatalogueParser.ParseLine(line, 1, limits);
        Assert.False(result.Success);
        return result.Error!;
    }

    public static TheoryData<string, string> DeepLines => new()
    {
        { "parentheses", new string('(', Deep) + "x" + new string(')', Deep) + " = x" },
        { "unclosed parentheses", new string('(', Deep) },
        { "unary minus", new string('-', Deep) + "x = x" },
        { "unary plus", new string('+', Deep) + "x = x" },
        { "right-associative powers", "x" + string.Concat(Enumerable.Repeat("^x", Deep)) + " = x" },
        { "brackets", new string('[', Deep) + "x" + new string(']', Deep) + " = x" },
        { "indices", string.Concat(Enumerable.Repeat("x[", Deep)) + "1" + new string(']', Deep) + " = x" },
        { "calls", string.Concat(Enumerable.Repeat("fact(", Deep)) + "1" + new string(')', Deep) + " = x" },
        { "sums", string.Concat(Enumerable.Repeat("sum(k in 1..2: ", Deep)) + "k" + new string(')', Deep) + " = x" },
        { "chain inside parentheses", new string('(', Deep) + "x+x*x" + new string(')', Deep) + " = x" },
        { "right side", "x = " + new string('(', Deep) + "x" + new string(')', Deep) },
        { "range end", "x = x for n in 1.." + new string('-', Deep) + "1" },
    };

    [Theory]
    [MemberData(nameof(DeepLines))]
    public void NestingOfAHundredThousandLevelsGivesTheDepthMessage(string kind, string line)
    {
        // Some of these lines are longer than MaxLineLength; lift it so that the depth is what gets checked.
        var error = FailsPromptly(line, Limits.Default with { MaxLineLength = 1 << 24 });
        Assert.True(error.Message.StartsWith(SyntaxMessages.NestingTooDeep(Limits.Default.MaxNestingDepth), StringComparison.Ordinal),
            $"{kind}: {error.Message}");
    }

    [Fact]
    public void ExactlyMaxNestingDepthParenthesesParse()
    {
        var depth = Limits.Default.MaxNestingDepth;
        var result = CatalogueParser.ParseLine(new string('(', depth) + "x" + new string(')', depth) + " = x", 1);
        Assert.True(result.Success, result.Error?.ToString());
    }

    [Fact]
    public void OneParenthesisBeyondTheLimitIsReportedWhereItOpens()
    {
        var depth = Limits.Default.MaxNestingDepth;
        var error = FailsPromptly(new string('(', depth + 1) + "x" + new string(')', depth + 1) + " = x");
        Assert.Equal(new SourcePosition(1, depth + 1), error.Position);
        Assert.Equal("expression nested deeper than MaxNestingDepth (500)", error.Message);
    }

    [Fact]
    public void FlatChainOfAHundredThousandOperatorsIsOneNodeOfOneLevel()
    {
        // Issue #18: a flat sum is not deep nesting. Mixed '+'/'-' terms that are mixed '*'/'/' products.
        var text = "x" + string.Concat(Enumerable.Range(0, Deep).Select(i => i % 2 == 0 ? "+x*y/2" : "-y"));
        var result = CatalogueParser.ParseExpression(text, Limits.Default with { MaxLineLength = 1 << 24, MaxNestingDepth = 2 });
        Assert.True(result.Success, result.Error?.ToString());
        var sum = Assert.IsType<SumExpr>(result.Value);
        Assert.Equal(Deep + 1, sum.Terms.Count);
        Assert.True(sum.Terms[2].Subtract);
        Assert.False(sum.Terms[1].Subtract);
        var product = Assert.IsType<ProductExpr>(sum.Terms[1].Value);
        Assert.Equal([false, false, true], product.Factors.Select(f => f.Divide));
        Assert.Equal(new SourcePosition(1, 2), sum.Terms[1].OperatorPosition);
    }

    [Fact]
    public void ChainCountsOneLevelAndANestedChainOneMore()
    {
        var limits = Limits.Default with { MaxNestingDepth = 2 };
        Assert.True(CatalogueParser.ParseExpression("a + b*c - d/e", limits).Success);
        var error = CatalogueParser.ParseExpression("a + b*(c - d*e)", limits).Error!;
        Assert.Equal("expression nested deeper than MaxNestingDepth (2)", error.Message);
    }

    [Fact]
    public void DepthLimitIsTheOneGivenInLimits()
    {
        var limits = Limits.Default with { MaxNestingDepth = 3 };
        Assert.True(CatalogueParser.ParseLine("((x)) = -(-x)", 1, limits).Success);
        var error = FailsPromptly("x = ----x", limits);
        Assert.Equal("expression nested deeper than MaxNestingDepth (3)", error.Message);
        Assert.Equal(new SourcePosition(1, 8), error.Position);
    }

    [Fact]
    public void HugeDepthLimitStillCannotOverflowTheStack()
    {
        // With the nesting limit effectively off, the parser's stack guard must stop it instead of a crash.
        var limits = Limits.Default with { MaxNestingDepth = int.MaxValue, MaxLineLength = int.MaxValue };
        var result = CatalogueParser.ParseLine(new string('(', 10_000_000) + "x", 1, limits);
        Assert.False(result.Success);
        Assert.StartsWith("expression nested too deeply for the parser's stack", result.Error!.Message);
    }

    private static readonly Limits OneMebibyte = Limits.Default with { MaxLineLength = 1 << 20 };

    [Fact]
    public void DefaultLineLimitIsSixtyFourMebibytes()
    {
        // Issue #18: room for an expanded polynomial of about 10^6 terms.
        Assert.Equal(64 * 1024 * 1024, Limits.Default.MaxLineLength);
    }

    [Fact]
    public void TenMegabyteLineGivesTheLengthMessageBeforeReadingIt()
    {
        var line = new string('x', 10 * 1024 * 1024);
        var result = CatalogueParser.ParseLine(line, 5, OneMebibyte);

        Assert.False(result.Success);
        Assert.Equal("line is 10485760 characters long; the limit MaxLineLength is 1048576", result.Error!.Message);
        Assert.Equal(new SourcePosition(5, 1), result.Error.Position); // refused before any of it was read
    }

    [Fact]
    public void TenMegabyteTextIsRefusedByEveryEntryPoint()
    {
        var text = new string('(', 10 * 1024 * 1024);
        Assert.StartsWith("line is 10485760 characters long", CatalogueParser.ParseExpression(text, OneMebibyte).Error!.Message);
        Assert.StartsWith("line is 10485760 characters long", CatalogueParser.ParseIdentity(text, OneMebibyte).Error!.Message);
        Assert.StartsWith("line is 10485760 characters long", CatalogueParser.ParseField(text, OneMebibyte).Error!.Message);
    }

    [Fact]
    public void LineOfExactlyMaxLineLengthIsRead()
    {
        var limits = Limits.Default with { MaxLineLength = 20 };
        Assert.True(CatalogueParser.ParseLine("x = x" + new string(' ', 15), 1, limits).Success);
        Assert.False(CatalogueParser.ParseLine("x = x" + new string(' ', 16), 1, limits).Success);
    }

    [Fact]
    public void MillionDigitLiteralParsesExactly()
    {
        var digits = "9" + new string('0', 999_999);
        var result = CatalogueParser.ParseLine("x = " + digits, 1);

        Assert.True(result.Success, result.Error?.ToString());
        var literal = Assert.IsType<IntegerLiteral>(result.Value!.Right);
        Assert.Equal(9 * BigInteger.Pow(10, 999_999), literal.Value);
    }

    [Fact]
    public void HugeCharacteristicIsRefusedWithoutAPrimalityTest()
    {
        var error = FailsPromptly("x = x over GF(" + new string('7', 100_000) + ")");
        Assert.Contains("the field has more than MaxFieldBits (4096) bits", error.Message);
        Assert.Equal(15, error.Position.Column);
    }

    [Fact]
    public void LongLineOfManyRangesParses()
    {
        var ranges = string.Join(", ", Enumerable.Range(0, 60_000).Select(i => $"n{i} in 1..2"));
        var result = CatalogueParser.ParseLine("x = x for " + ranges, 1);
        Assert.True(result.Success, result.Error?.ToString());
        Assert.Equal(60_000, result.Value!.Parameters.Count);
    }

    [Fact]
    public void LongLineOfManyMatrixEntriesParses()
    {
        var row = "[" + string.Join(", ", Enumerable.Repeat("x", 1_000)) + "]";
        var line = "[" + string.Join(", ", Enumerable.Repeat(row, 300)) + "] = x";
        var result = CatalogueParser.ParseLine(line, 1);
        Assert.True(result.Success, result.Error?.ToString());
        Assert.Equal(300, Assert.IsType<MatrixLiteral>(result.Value!.Left).Rows.Count);
    }

    [Fact]
    public void MatrixLiteralBeyondMaxMatrixOrderIsRefused()
    {
        var limits = Limits.Default with { MaxMatrixOrder = 2 };
        Assert.True(CatalogueParser.ParseLine("[[a, b], [c, d]] = x", 1, limits).Success);
        Assert.Contains("more than MaxMatrixOrder (2) rows", FailsPromptly("[[a], [b], [c]] = x", limits).Message);
        Assert.Contains("more than MaxMatrixOrder (2) columns", FailsPromptly("[[a, b, c]] = x", limits).Message);
    }
}
