using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Tests.Syntax;

/// <summary>How a label is told apart from the start of an identity (SPEC §3: <c>[label:] LHS = RHS …</c>).</summary>
public class CatalogueParserLabelTests
{
    private static IdentityEntry Entry(string line)
    {
        var result = CatalogueParser.ParseLine(line, 1);
        Assert.True(result.Success, result.Error?.ToString());
        return result.Value!;
    }

    [Theory]
    [InlineData("two-squares: x = x", "two-squares")]
    [InlineData("vdm.7: x = x", "vdm.7")]
    [InlineData("a: b = c", "a")]
    [InlineData("a : b = c", "a")]
    [InlineData("   lbl:x = x", "lbl")]
    [InlineData("my_label-2.b: x = x", "my_label-2.b")]
    [InlineData("42: x = x", "42")]
    [InlineData("sum: x = x", "sum")]
    public void RunOfLabelCharactersBeforeAColonIsTheLabel(string line, string label)
    {
        Assert.Equal(label, Entry(line).Label);
    }

    [Fact]
    public void LabelIsNotPartOfTheLeftSide()
    {
        var entry = Entry("a: b = c");
        Assert.Equal("b", TreeText.Of(entry.Left));
        Assert.Equal(new SourcePosition(1, 4), entry.Left.Position);
    }

    [Theory]
    [InlineData("sum(k in 0..n: k) = n*(n+1)/2")]
    [InlineData("prod(k in 1..n: k) = fact(n)")]
    [InlineData("matrix(i in 1..2, j in 1..2: 0) = [[0, 0], [0, 0]]")]
    [InlineData("x = sum(k in 0..3: k)")]
    [InlineData("x-1 = sum(k in 0..3: k)")]
    public void ColonOfABoundFormIsNotALabel(string line)
    {
        Assert.Null(Entry(line).Label);
    }

    [Fact]
    public void LabelledLineMayUseABoundFormWithTheSameName()
    {
        var entry = Entry("k: sum(k in 0..n: k) = n*(n+1)/2");
        Assert.Equal("k", entry.Label);
        Assert.Equal("(sum k 0 n k)", TreeText.Of(entry.Left));
    }

    [Fact]
    public void LabelWithASpaceInsideIsNotALabel()
    {
        var result = CatalogueParser.ParseLine("my label: x = x", 1);
        Assert.False(result.Success);
        Assert.StartsWith("expected an operator between 'my' and 'label'", result.Error!.Message);
    }
}
