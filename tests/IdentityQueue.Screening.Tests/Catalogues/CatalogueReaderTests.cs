using System.Text;
using IdentityQueue.Algebra;
using IdentityQueue.Screening.Catalogues;

namespace IdentityQueue.Screening.Tests.Catalogues;

/// <summary>
/// The catalogue readers as pure functions from bytes to entries with positions (SPEC §3: the three formats), with no
/// store: each line's number, its entry with its family expanded, or its rejection.
/// </summary>
public sealed class CatalogueReaderTests
{
    private static List<CatalogueLine> Read(string fileName, string text, out CatalogueReader reader)
    {
        reader = new CatalogueReader(fileName, Limits.Default);
        using var stream = new MemoryStream(Encoding.UTF8.GetBytes(text));
        return [.. reader.Read(stream)];
    }

    [Fact]
    public void Idq_GivesEntriesAndRejectionsWithTheirLines()
    {
        var lines = Read("c.idq", "# a comment\nsq: (a+b)^2 = a^2 + 2*a*b + b^2\n\npow: x^n = x*x^(n-1) for n in 1..3\n(x = x\nsq: x = x\n", out _);
        Assert.Equal(6, lines.Count);
        Assert.Equal([1, 2, 3, 4, 5, 6], lines.Select(l => l.Number));
        Assert.True(lines[0].Read.Success);
        Assert.Null(lines[0].Read.Value);
        var sq = lines[1].Read.Value!;
        Assert.Equal(("sq", null, "Q"), (sq.Label, sq.Family, sq.Field));
        Assert.Equal(["sq"], sq.Instances.Select(i => i.Label));
        // Sides as written, with the columns where they start in the line (counted by hand: "sq: " is 4 characters).
        Assert.Equal(new CatalogueSides("(a+b)^2", "a^2 + 2*a*b + b^2", 5, 15), sq.Sides);
        var pow = lines[3].Read.Value!;
        Assert.Equal("pow", pow.Family);
        Assert.Equal(["pow[n=1]", "pow[n=2]", "pow[n=3]"], pow.Instances.Select(i => i.Label));
        Assert.Equal([1, 2, 3], pow.Instances.Select(i => (int)i.Parameters.Single().Value));
        Assert.False(lines[4].Read.Success);
        Assert.StartsWith("line 5, column", lines[4].Read.Error!.ToString());
        Assert.Equal("(x = x", lines[4].Raw);
        Assert.Equal("line 6: the label 'sq' is already used on line 2; labels must be unique in a catalogue", lines[5].Read.Error!.ToString());
    }

    [Fact]
    public void UnlabelledEntries_AreNamedByFileAndLine()
    {
        var lines = Read("dir/my.idq", "x = x\n", out _);
        Assert.Equal("my.idq:1", lines[0].Read.Value!.Instances.Single().Label);
        Assert.Null(lines[0].Read.Value!.Label);
    }

    [Fact]
    public void Jsonl_And_Csv_CheckNamesWithTheLexersRules()
    {
        var json = Read("c.jsonl", """
            {"label": "ok", "lhs": "x^n", "rhs": "x^n", "for": {"n": [1, 2]}}
            {"label": "bad label!", "lhs": "x", "rhs": "x"}
            {"lhs": "x", "rhs": "x", "for": {"2n": [1, 2]}}
            {"lhs": "x", "rhs": "x", "for": {"α": [1, 1]}}
            """, out _);
        Assert.Equal(2, json[0].Read.Value!.Instances.Count);
        Assert.Equal(new CatalogueSides("x^n", "x^n", null, null), json[0].Read.Value!.Sides); // no columns outside an .idq line
        Assert.Equal("line 2: the label \"bad label!\" may contain only letters, digits, '_', '-' and '.'", json[1].Read.Error!.Message);
        Assert.Equal("line 3: \"2n\" in \"for\" is not a parameter name", json[2].Read.Error!.Message);
        Assert.True(json[3].Read.Success); // Greek letters are names (the lexer's rule)

        var csv = Read("c.csv", "label,lhs,rhs,note\nt,x+1,1+x,from a paper\n", out var reader);
        Assert.Null(csv[0].Read.Value);
        Assert.Equal("t", csv[1].Read.Value!.Label);
        Assert.Single(reader.Warnings);
    }

    [Fact]
    public void Identifiers_FollowTheLexer()
    {
        // The catalogue syntax (SPEC §3): names are ASCII or Greek letters, digits and '_', not starting with a digit.
        Assert.True(Algebra.Syntax.Identifiers.IsIdentifier("x_1"));
        Assert.True(Algebra.Syntax.Identifiers.IsIdentifier("λ"));
        Assert.False(Algebra.Syntax.Identifiers.IsIdentifier("1x"));
        Assert.False(Algebra.Syntax.Identifiers.IsIdentifier(""));
        Assert.False(Algebra.Syntax.Identifiers.IsIdentifier("a-b"));
        Assert.True(Algebra.Syntax.Identifiers.IsLabel("vdm-2.1"));
        Assert.False(Algebra.Syntax.Identifiers.IsLabel("a b"));
    }
}
