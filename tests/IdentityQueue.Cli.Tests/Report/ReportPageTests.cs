using System.Text.RegularExpressions;
using IdentityQueue.Cli.Report;

namespace IdentityQueue.Cli.Tests.Report;

/// <summary>
/// The page and its helpers on hand-made data: escaping of store text, the wording about evidence, no network
/// references, and the small formatting rules (bins, parameter lists) worked out by hand.
/// </summary>
public class ReportPageTests
{
    private const string Hostile = "<script>alert('x')</script><img src=http://example.org/x.png> & \"q\"";

    private static ReportData Some(bool empty = false) => new()
    {
        Filter = [],
        Catalogues = empty ? [] : [new CatalogueInfo("cat" + Hostile, Hostile, "2026-12-01 10:00:00", "7")],
        StateCounts = empty ? [] : [new StateCount("cat" + Hostile, "survived", 3), new StateCount("cat" + Hostile, "refuted", 2)],
        Stages = empty ? [] : [new StageCount(1, 31, 2)],
        EvidenceBins = [.. Enumerable.Range(0, Bins.EvidenceBits.Count).Select(i => empty ? 0L : i == 4 ? 3L : 0L)],
        ExactSurvivors = 0,
        TimeBins = [.. Enumerable.Range(0, Bins.Microseconds.Count).Select(i => empty ? 0L : i == 3 ? 5L : 0L)],
        TimedCandidates = empty ? 0 : 5,
        TotalMicroseconds = empty ? 0 : 400,
        Families = empty ? [] :
        [
            new FamilyInfo("cat" + Hostile, "fam" + Hostile, 3, 1, 2, 0, "n=1",
                [new Instance("n=1", "refuted"), new Instance("n=2", "survived"), new Instance(Hostile, "refuted")]),
            new FamilyInfo("cat" + Hostile, "grid" + Hostile, 2, 1, 1, 0, "m=0, r=0",
                [new Instance("m=0, r=0", "refuted") { Values = ["0", "0"] }, new Instance("m=0, r=1", "survived") { Values = ["0", "1"] }])
            {
                Parameters = ["m", "r" + Hostile],
                FirstFailure = "at m=0: " + Hostile,
            },
        ],
        Refutations = empty ? [] : [new RefutationInfo("cat" + Hostile, 9, "ref" + Hostile, Hostile, "fails at " + Hostile, Hostile, "lhs - rhs = " + Hostile)],
        RefutationsTotal = empty ? 0 : 3,
        InstancesTruncated = false,
        Rejections = empty ? [] : [new RejectionInfo("cat", Hostile, 4, Hostile, Hostile)],
        RejectionsTotal = empty ? 0 : 1,
    };

    [Fact]
    public void StoreText_IsEncodedEverywhere()
    {
        var html = ReportPage.Render(Some(), "/tmp/" + Hostile, "0.1.0", new DateTime(2026, 12, 1, 12, 0, 0, DateTimeKind.Utc));
        Assert.DoesNotContain("<script", html);
        Assert.DoesNotContain("<img", html);
        Assert.Contains("&lt;script&gt;alert(&#39;x&#39;)&lt;/script&gt;", html);
        Assert.DoesNotContain("\"q\"", html);
    }

    [Fact]
    public void Page_ReferencesNothingOutside_AndForbidsLoadingAnything()
    {
        var html = ReportPage.Render(Some(), "s.db", "0.1.0", DateTime.UnixEpoch);
        // the hostile text carries a URL as text; markup itself must have no src/href and no URL
        Assert.DoesNotMatch(new Regex("\\s(src|href)\\s*=\\s*\"", RegexOptions.IgnoreCase), html);
        Assert.DoesNotMatch("url\\(", html);
        Assert.Contains("Content-Security-Policy\" content=\"default-src 'none'", html);
        Assert.DoesNotContain("https://", ReportPage.Render(Some(empty: true), "s.db", "0.1.0", DateTime.UnixEpoch));
        Assert.DoesNotContain("http://", ReportPage.Render(Some(empty: true), "s.db", "0.1.0", DateTime.UnixEpoch));
    }

    [Fact]
    public void TwoParameterFamily_IsAGrid_OneParameterFamily_AStrip_AndRefutationsSayWhereTheyFail()
    {
        var html = ReportPage.Render(Some(), "s.db", "0.1.0", DateTime.UnixEpoch);
        Assert.Equal(2, Regex.Count(html, "data-chart=\"family\" data-state=\"\\w+\" data-row="));
        Assert.Equal(3, Regex.Count(html, "data-chart=\"family\" data-state=\"\\w+\" x="));
        Assert.Contains("holds for 1 of 2 instances, fails for 1", html);
        Assert.Contains("data-table=\"refutations\"", html);
        Assert.Contains("The first 1 of 3 refutations", html);
        Assert.Contains("section id=\"refutations\"", html);
        Assert.True(html.IndexOf("id=\"refutations\"", StringComparison.Ordinal) < html.IndexOf("id=\"rejections\"", StringComparison.Ordinal));
    }

    [Fact]
    public void GridAxes_NeedTwoIntegerParameters_WithinTheLimit()
    {
        FamilyInfo Family(IReadOnlyList<string> parameters, params string[][] values) =>
            new("c", "f", values.Length, 0, 0, values.Length, null, [.. values.Select(v => new Instance(string.Join(", ", v), "pending") { Values = v })]) { Parameters = parameters };
        Assert.Equal((["-1", "2", "10"], ["0"]), ReportPage.GridAxes(Family(["m", "r"], ["10", "0"], ["-1", "0"], ["2", "0"])));
        Assert.Null(ReportPage.GridAxes(Family(["n"], ["1"], ["2"])));
        Assert.Null(ReportPage.GridAxes(Family(["m", "r"], ["1", "x"])));
        Assert.Null(ReportPage.GridAxes(Family(["a", "b", "c"], ["1", "2", "3"])));
        var wide = Enumerable.Range(0, ReportPage.MaxGridAxis + 1).Select(i => new[] { "0", i.ToString(System.Globalization.CultureInfo.InvariantCulture) }).ToArray();
        Assert.Null(ReportPage.GridAxes(Family(["m", "r"], wide)));
        Assert.NotNull(ReportPage.GridAxes(Family(["m", "r"], wide[..ReportPage.MaxGridAxis])));
    }

    [Fact]
    public void Page_SaysSurvivorsAreVeryLikelyTrue_AndThatTheBoundRestsOnTheDegreeBound()
    {
        var html = ReportPage.Render(Some(), "s.db", "0.1.0", DateTime.UnixEpoch);
        Assert.Contains("very likely true", html);
        Assert.Contains("not proven", html);
        Assert.Contains("only as good as the degree bound behind it", html);
    }

    [Fact]
    public void EmptyStore_GivesAPageThatSaysSoInEachSection()
    {
        var html = ReportPage.Render(Some(empty: true), "s.db", "0.1.0", DateTime.UnixEpoch);
        foreach (var text in new[] { "No refutations.", "No survivors.", "No trials yet.", "No family lines.", "No rejections." }) Assert.Contains(text, html);
        Assert.Contains("data-chart=\"states\"", html);
    }

    [Fact]
    public void Histograms_ShowTheBinsFromTheFirstToTheLastNonemptyOne()
    {
        var bars = ReportPage.Trimmed([0, 0, 4, 0, 1, 0, 0], Bins.EvidenceBits, "#000");
        Assert.Equal(["32–48", "48–64", "64–80"], bars.Select(b => b.Label));
        Assert.Equal([4L, 0L, 1L], bars.Select(b => b.Value));
        Assert.Empty(ReportPage.Trimmed([0, 0], Bins.EvidenceBits, "#000"));
    }

    [Fact]
    public void Bins_CaseExpressionAndIndexAgreeOnTheEdges()
    {
        var bins = new Bins([10, 20], v => v.ToString(System.Globalization.CultureInfo.InvariantCulture));
        Assert.Equal("CASE WHEN x < 10 THEN 0 WHEN x < 20 THEN 1 ELSE 2 END", bins.CaseExpression("x"));
        Assert.Equal([0, 1, 1, 2, 2], new[] { 9.99, 10, 19.5, 20, 1e9 }.Select(bins.IndexOf));
        Assert.Equal(["< 10", "10–20", "≥ 20"], Enumerable.Range(0, bins.Count).Select(bins.Label));
        Assert.Equal("20–50 µs", Bins.Microseconds.Label(Bins.Microseconds.IndexOf(30)));
        Assert.Equal("500 µs–1 ms", Bins.Microseconds.Label(Bins.Microseconds.IndexOf(700)));
        Assert.Equal("1.5 s", Bins.Duration(1_500_000));
    }

    [Theory]
    [InlineData(new[] { "n=2", "n=3", "n=6", "n=7", "n=10" }, "n = 2, 3, 6, 7, 10")]
    [InlineData(new[] { "n=1", "n=2", "n=3", "n=4", "n=9" }, "n = 1–4, 9")]
    [InlineData(new[] { "n=3, k=1", "n=4, k=2" }, "(n=3, k=1), (n=4, k=2)")]
    [InlineData(new string[0], "")]
    public void FailingParameters_AreWrittenShort(string[] formatted, string expected)
    {
        Assert.Equal(expected, ReportData.Compress(formatted));
    }

    [Fact]
    public void FailingParameters_BeyondTheLimit_AreCounted()
    {
        Assert.Equal("(a=1, b=1), (a=1, b=2), … (1 more)", ReportData.Compress(["a=1, b=1", "a=1, b=2", "a=1, b=3"], max: 2));
    }

    [Theory]
    [InlineData("{\"n\":3}", "n=3")]
    [InlineData("{\"n\":3,\"k\":1}", "n=3, k=1")]
    [InlineData("{\"q\":\"x\"}", "q=x")]
    [InlineData("not json", "not json")]
    [InlineData(null, "")]
    public void Params_AreFormattedFromTheirJson(string? json, string expected)
    {
        Assert.Equal(expected, ReportData.FormatParams(json));
    }
}
