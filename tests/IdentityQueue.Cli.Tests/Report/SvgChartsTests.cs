using System.Globalization;
using System.Text.RegularExpressions;
using IdentityQueue.Cli.Report;

namespace IdentityQueue.Cli.Tests.Report;

/// <summary>The chart functions on small inputs whose geometry is worked out by hand from the layout constants.</summary>
public class SvgChartsTests
{
    private static List<(string Label, long Value, double Width)> Marks(string svg) =>
        [.. Regex.Matches(svg, "<rect class=\"mark\" data-chart=\"[^\"]*\" data-label=\"([^\"]*)\" data-value=\"(\\d+)\" x=\"[^\"]*\" y=\"[^\"]*\" width=\"([^\"]*)\"")
            .Select(m => (m.Groups[1].Value, long.Parse(m.Groups[2].Value, CultureInfo.InvariantCulture), double.Parse(m.Groups[3].Value, CultureInfo.InvariantCulture)))];

    [Fact]
    public void HorizontalBars_HaveOneMarkPerBar_WithLengthsProportionalToTheValues()
    {
        var svg = SvgCharts.HorizontalBars("t", "title", [new Bar("a", 10, "#111"), new Bar("b", 5, "#222"), new Bar("c", 0, "#333")]);
        var marks = Marks(svg);
        Assert.Equal(["a", "b", "c"], marks.Select(m => m.Label));
        Assert.Equal([10L, 5L, 0L], marks.Select(m => m.Value));
        Assert.Equal(marks[0].Width / 2, marks[1].Width, 1);
        Assert.Equal(0, marks[2].Width);
        Assert.StartsWith("<svg class=\"chart\" data-chart=\"t\"", svg);
        Assert.EndsWith("</svg>", svg);
    }

    [Fact]
    public void Charts_OfNothingOrOfZeros_AreStillWellFormed()
    {
        Assert.Empty(Marks(SvgCharts.HorizontalBars("t", "title", [])));
        var zeros = SvgCharts.Columns("t", "title", [new Bar("x", 0, "#111")], "caption");
        Assert.Single(Regex.Matches(zeros, "class=\"mark\""));
        Assert.DoesNotContain("NaN", zeros);
        Assert.DoesNotContain("Infinity", zeros);
    }

    [Fact]
    public void Labels_AndTitles_AreHtmlEncoded()
    {
        var svg = SvgCharts.HorizontalBars("t", "<title & \"x\">", [new Bar("<script>alert(1)</script>", 1, "#111")]);
        Assert.DoesNotContain("<script>", svg);
        Assert.Contains("&lt;script&gt;alert(1)&lt;/script&gt;", svg);
        Assert.Contains("&lt;title &amp; &quot;x&quot;&gt;", svg);
        var strip = SvgCharts.Strip("s", "s", [new StripCell("n=<1>", "refuted\"")]);
        Assert.Contains("n=&lt;1&gt;", strip);
        Assert.DoesNotContain("refuted\"\"", strip);
    }

    [Fact]
    public void Columns_HaveHeightsProportionalToTheValues_OnAnAxisWithRoundSteps()
    {
        var svg = SvgCharts.Columns("h", "title", [new Bar("1", 40, "#111"), new Bar("2", 100, "#111"), new Bar("3", 0, "#111")], "caption");
        var heights = Regex.Matches(svg, "class=\"mark\"[^>]* height=\"([^\"]*)\"").Select(m => double.Parse(m.Groups[1].Value, CultureInfo.InvariantCulture)).ToList();
        Assert.Equal(3, heights.Count);
        Assert.Equal(heights[1] * 0.4, heights[0], 1);
        Assert.Equal(0, heights[2]);
        Assert.Contains(">100</text>", svg); // the axis top for a maximum of 100 is 100, in steps of 20
        Assert.Contains(">caption</text>", svg);
    }

    [Fact]
    public void Columns_WithLabelsWiderThanAColumn_SlantThem()
    {
        var wide = Enumerable.Range(0, 20).Select(i => new Bar($"a rather long label {i}", i, "#111")).ToList();
        Assert.Contains("rotate(-35", SvgCharts.Columns("h", "t", wide, "c"));
        Assert.DoesNotContain("rotate(", SvgCharts.Columns("h", "t", [new Bar("a", 1, "#111")], "c"));
    }

    [Theory]
    [InlineData(0, 1, 1)]
    [InlineData(1, 1, 1)]
    [InlineData(7, 2, 8)]
    [InlineData(10, 2, 10)]
    [InlineData(98, 20, 100)]
    [InlineData(529, 200, 600)]
    public void NiceAxis_StepsAreOneTwoOrFiveTimesAPowerOfTen(long max, long step, long top)
    {
        Assert.Equal((step, top), SvgCharts.NiceAxis(max));
    }

    [Fact]
    public void Strip_HasOneSquarePerCell_ColouredByState_AndWraps()
    {
        var cells = Enumerable.Range(1, 25).Select(n => new StripCell($"n={n}", n % 5 == 0 ? "refuted" : "survived")).ToList();
        var svg = SvgCharts.Strip("f", "family", cells, perRow: 10);
        Assert.Equal(25, Regex.Count(svg, "class=\"mark\""));
        Assert.Equal(5, Regex.Count(svg, $"data-state=\"refuted\" [^>]*fill=\"{SvgCharts.ColorOf("refuted")}\""));
        Assert.Contains("width=\"120\" height=\"36\"", svg); // 10 columns and 3 rows of 10 + 2 pixels
    }

    [Fact]
    public void Grid_HasOneSquarePerInstance_AtItsRowAndColumn_MarkedBeyondColour()
    {
        // rows m = 0..2, columns r = 0..1, the instance (m=2, r=1) missing: five squares and one empty outline
        var cells = new List<GridCell>();
        foreach (var m in new[] { "0", "1", "2" })
            foreach (var r in new[] { "0", "1" })
                if (!(m == "2" && r == "1")) cells.Add(new GridCell(m, r, $"m={m}, r={r}", m == r ? "refuted" : "survived"));
        var svg = SvgCharts.Grid("family", "<fam>", "m", ["0", "1", "2"], "r", ["0", "1"], cells);
        Assert.Equal(5, Regex.Count(svg, "class=\"mark\""));
        Assert.Equal(1, Regex.Count(svg, "fill=\"none\""));
        // squares of 18 + 2 pixels from the left margin max(40, ("m".Length + " = ".Length + "0".Length) * 7 + 8) = 43 and the top band of 34
        Assert.Contains("data-state=\"refuted\" data-row=\"1\" data-column=\"1\" x=\"63\" y=\"54\" width=\"18\" height=\"18\"", svg);
        Assert.Contains("data-state=\"survived\" data-row=\"2\" data-column=\"0\" x=\"43\" y=\"74\"", svg);
        Assert.Equal(2, Regex.Count(svg, ">×</text>"));
        Assert.Equal(3, Regex.Count(svg, ">✓</text>"));
        Assert.Contains(">m = 2</text>", svg);
        Assert.Contains("aria-label=\"&lt;fam&gt;\"", svg);
        Assert.DoesNotContain("<fam>", svg);
    }
}
