using System.Globalization;
using System.Net;
using System.Text.RegularExpressions;
using Microsoft.Data.Sqlite;
using static IdentityQueue.Cli.Tests.StoreFolder;

namespace IdentityQueue.Cli.Tests.Report;

/// <summary>
/// The report of the demo store, opened in headless Chromium as a person would open it. The oracles are the store's own
/// SQL counts (queried here, beside the report) and the DOM that the browser built from the page; the screenshot is
/// checked for being a picture at all (many colours, no single colour filling it).
/// </summary>
public sealed class ReportBrowserTests : IDisposable
{
    private readonly StoreFolder _folder = new();

    private const string HostileRaw = "<img src=x onerror=alert(1)> & </td></table>";
    private const string HostileReason = "<b>bold</b> \"quoted\"";

    public void Dispose()
    {
        SqliteConnection.ClearAllPools();
        _folder.Dispose();
    }

    private List<object?[]> Sql(string sql) => StoreEndToEndTests.Query(_folder.Db, sql);

    private static long L(object? v) => Convert.ToInt64(v, CultureInfo.InvariantCulture);

    /// <summary>Each mark of one chart, as (label, value), from the DOM's serialisation.</summary>
    private static List<(string Label, long Value)> Marks(string dom, string chart) =>
        [.. Regex.Matches(dom, $"<rect class=\"mark\" data-chart=\"{chart}\" data-label=\"([^\"]*)\" data-value=\"(\\d+)\"")
            .Select(m => (WebUtility.HtmlDecode(m.Groups[1].Value), long.Parse(m.Groups[2].Value, CultureInfo.InvariantCulture)))];

    private static string Table(string dom, string name)
    {
        var m = Regex.Match(dom, $"<table[^>]*data-table=\"{name}\"[^>]*>(.*?)</table>", RegexOptions.Singleline);
        Assert.True(m.Success, $"no table {name} in the DOM");
        return m.Groups[1].Value;
    }

    [ExternalToolFact(Chromium.Executable, "chromium")]
    public void DemoReport_InChromium_HasTheChartsAndTablesOfTheStore()
    {
        Chromium.Require();
        var demo = Run("demo", "--db", _folder.Db, "--workers", "2");
        Assert.True(demo.Code == 0, demo.Out + demo.Err);
        using (var c = new SqliteConnection($"Data Source={_folder.Db};Pooling=False"))
        {
            c.Open();
            using var insert = c.CreateCommand();
            insert.CommandText = "INSERT INTO rejection (catalogue_id, source, line, raw, reason) VALUES (1, 'hostile.idq', 99, $raw, $reason)";
            insert.Parameters.AddWithValue("$raw", HostileRaw);
            insert.Parameters.AddWithValue("$reason", HostileReason);
            insert.ExecuteNonQuery();
        }
        var dir = _folder.File("report");
        var report = Run("report", "--db", _folder.Db, "--out", dir);
        Assert.True(report.Code == 0, report.Err);
        var index = Path.Combine(dir, "index.html");
        var html = File.ReadAllText(index);
        Assert.DoesNotMatch("https?://", html);

        var dom = Chromium.DumpDom(index);
        Assert.DoesNotMatch("https?://", dom);
        foreach (var name in new[] { "states", "stages", "bounds", "time" }) Assert.Single(Regex.Matches(dom, $"<svg class=\"chart\" data-chart=\"{name}\""));

        // counts by state: the chart and the per-catalogue table against the verdicts view
        var states = Sql("SELECT state, count(*) FROM verdicts GROUP BY state").ToDictionary(r => (string)r[0]!, r => L(r[1]));
        var chart = Marks(dom, "states");
        Assert.Equal(8, chart.Count);
        foreach (var (label, value) in chart) Assert.Equal(states.GetValueOrDefault(label), value);
        var table = Table(dom, "states");
        foreach (var row in Sql("SELECT catalogue, state, count(*) FROM verdicts GROUP BY catalogue, state"))
        {
            var tr = Regex.Match(table, $"<tr data-key=\"{Regex.Escape((string)row[0]!)}\">(.*?)</tr>", RegexOptions.Singleline).Groups[1].Value;
            Assert.Contains($"data-state=\"{row[1]}\" data-count=\"{L(row[2])}\"", tr);
        }
        Assert.Equal(L(Sql("SELECT count(*) FROM catalogue").Single()[0]), Regex.Count(table, "<tr data-key="));

        // refutations by stage, survivors' bounds and time per candidate: every candidate counted once
        Assert.Equal(L(Sql("SELECT count(*) FROM result WHERE state = 'refuted' AND witness_trial_id IS NOT NULL").Single()[0]), Marks(dom, "stages").Sum(m => m.Value));
        // survivors decided exactly have no error bound: counted in a note, not in the chart
        Assert.Equal(L(Sql("SELECT count(*) FROM survivors WHERE error_bound_log2 IS NOT NULL").Single()[0]), Marks(dom, "bounds").Sum(m => m.Value));
        Assert.Contains($"data-exact=\"{L(Sql("SELECT count(*) FROM survivors WHERE error_bound_log2 IS NULL").Single()[0])}\"", dom);
        Assert.Equal(L(Sql("SELECT count(DISTINCT candidate_id) FROM trial").Single()[0]), Marks(dom, "time").Sum(m => m.Value));
        var firstStage = Sql("SELECT t.field_bits, count(*) FROM result r JOIN trial t ON t.id = r.witness_trial_id WHERE r.state = 'refuted' AND t.seq = 1 GROUP BY t.field_bits ORDER BY 2 DESC").First();
        Assert.Contains(($"trial 1 · {L(firstStage[0])}-bit field", L(firstStage[1])), Marks(dom, "stages"));

        // families: one row per row of the view, with its refuted count and one strip square per instance
        var families = Table(dom, "families");
        var view = Sql("SELECT catalogue, family, instances, refuted FROM families");
        Assert.Equal(view.Count, Regex.Count(families, "<tr data-key="));
        foreach (var f in view)
        {
            var key = Regex.Escape(WebUtility.HtmlEncode($"{f[0]}/{f[1]}"));
            var tr = Regex.Match(families, $"<tr data-key=\"{key}\" data-instances=\"{L(f[2])}\" data-refuted=\"{L(f[3])}\"[^>]*>(.*?)</tr>", RegexOptions.Singleline);
            Assert.True(tr.Success, $"family {f[1]}");
            Assert.Equal(L(f[2]), Regex.Count(tr.Groups[1].Value, "<rect class=\"mark\" data-chart=\"family\""));
            Assert.Equal(L(f[3]), Regex.Count(tr.Groups[1].Value, "<rect class=\"mark\" data-chart=\"family\" data-state=\"refuted\""));
        }

        // rejections, including the hand-inserted one, whose markup stayed text
        var rejections = Table(dom, "rejections");
        Assert.Equal(L(Sql("SELECT count(*) FROM rejection").Single()[0]), Regex.Count(rejections, "<tr data-key="));
        Assert.Contains(WebUtility.HtmlEncode(HostileRaw), rejections);
        Assert.DoesNotContain("<img", dom);
        Assert.DoesNotContain("<b>bold", dom);
        Assert.Contains("&lt;b&gt;bold&lt;/b&gt;", rejections);

        // the wording about evidence reaches the reader
        Assert.Contains("very likely true", dom);
        Assert.Contains("only as good as the degree bound behind it", dom);

        var png = Png.Read(Chromium.Screenshot(index, _folder.File("report.png")));
        Assert.Equal((1200, 2000), (png.Width, png.Height));
        var colours = png.Pixels.GroupBy(p => p).Select(g => g.LongCount()).OrderDescending().ToList();
        Assert.True(colours.Count > 50, $"{colours.Count} colours");
        Assert.True(colours[0] < png.Pixels.Length * 0.9, "one colour fills nine tenths of the screenshot");
        // the survivors' green and the refutations' brick are both on the first screen
        Assert.Contains(png.Pixels, p => p >> 8 == 0x2f8f6b);
        Assert.Contains(png.Pixels, p => p >> 8 == 0xc8553d);
    }
}
