using System.Globalization;
using System.Net;
using System.Text.Json;
using System.Text.RegularExpressions;
using IdentityQueue.Cli.Tests.Report;
using IdentityQueue.Store.Read;
using Microsoft.Data.Sqlite;
using static IdentityQueue.Cli.Tests.StoreFolder;

namespace IdentityQueue.Cli.Tests;

/// <summary>
/// Where and how refuted entries fail, as the exports, <c>idq show FAMILY</c> and the report show it, on real SQLite
/// stores screened by <c>idq run</c>. The identities are published ones and perturbations of them (sources beside each).
/// </summary>
public sealed class RefutationEvidenceTests : IDisposable
{
    private readonly StoreFolder _folder = new();

    public void Dispose()
    {
        SqliteConnection.ClearAllPools();
        _folder.Dispose();
    }

    // The binomial theorem (x+y)^2 = x^2 + 2xy + y^2 with its cross term dropped: lhs - rhs = 2xy (sympy: expand((x+y)**2 -
    // x**2 - y**2) == 2*x*y), whose least counterexample by max-norm, then sum of absolute values, then the variables' order
    // (0, 1, -1, ...) is x = 1, y = 1: lhs = 4, rhs = 2 (worked by hand: every point with x = 0 or y = 0 gives 0).
    //
    // Moser's circle problem: n points on a circle joined by all chords cut it into C(n,4) + C(n,2) + 1 regions, which
    // equals 2^(n-1) for n = 1..5 and not from n = 6 on (31, 57, 99, 163, 256 against 32, 64, 128, 256, 512)
    // (R. K. Guy, "The strong law of small numbers", Amer. Math. Monthly 95 (1988)).
    //
    // Chu–Vandermonde: sum(k in 0..r: C(m,k) C(n,r-k)) = C(m+n, r) (R. L. Graham, D. E. Knuth, O. Patashnik, Concrete
    // Mathematics, 2nd ed., (5.27) [memory]), here with n the variable x. The planted variant stops the sum at r - 1 and so
    // misses the term k = r, C(m,r) C(x,0) = C(m,r): it fails exactly where C(m,r) != 0, that is r <= m (from the identity).
    private const string Catalogue = """
        binomial-dropped: (x+y)^2 = x^2 + y^2
        binomial: (x+y)^2 = x^2 + 2*x*y + y^2
        moser: binom(n,4) + binom(n,2) + 1 = 2^(n-1) for n in 1..10
        chu-vandermonde: sum(k in 0..r: binom(m,k)*binom(x,r-k)) = binom(m+x,r) for m in 0..3, r in 0..3
        chu-vandermonde-short: sum(k in 0..r-1: binom(m,k)*binom(x,r-k)) = binom(m+x,r) for m in 0..3, r in 0..3

        """;

    // the planted variant's failing instances row by row: r <= m
    private const string ShortWords = "holds for 6 of 16 instances, fails for 10 (m = 0 with r = 0; m = 1 with r = 0..1; m = 2 with r = 0..2; m = 3 with r = 0..3)";

    private const string Counterexample = "fails at x = 1, y = 1: lhs = 4, rhs = 2";
    private const string Difference = "lhs - rhs = 2*x*y (1 term, total degree 2)";

    private string Screened()
    {
        var file = _folder.Write("evidence.idq", Catalogue);
        Assert.Equal(0, Run("init", "--db", _folder.Db).Code);
        var import = Run("import", file, "--db", _folder.Db);
        Assert.True(import.Code == 0, import.Out + import.Err);
        var run = Run("run", "--db", _folder.Db);
        Assert.True(run.Code == 0, run.Out + run.Err);
        return _folder.Db;
    }

    private List<object?[]> Sql(string sql) => StoreEndToEndTests.Query(_folder.Db, sql);

    [Fact]
    public void EveryExportFormat_CarriesTheCounterexampleAndTheDifference()
    {
        var db = Screened();

        var jsonl = Run("export", "--state", "refuted", "--db", db);
        Assert.Equal(0, jsonl.Code);
        var line = jsonl.Out.Split('\n', StringSplitOptions.RemoveEmptyEntries).Single(l => l.Contains("\"label\":\"binomial-dropped\"", StringComparison.Ordinal));
        using (var json = JsonDocument.Parse(line))
        {
            var row = json.RootElement;
            Assert.Equal("1", row.GetProperty("counterexample_point").GetProperty("x").GetString());
            Assert.Equal("1", row.GetProperty("counterexample_point").GetProperty("y").GetString());
            Assert.Equal("4", row.GetProperty("counterexample_lhs").GetString());
            Assert.Equal("2", row.GetProperty("counterexample_rhs").GetString());
            Assert.Equal(1, row.GetProperty("counterexample_exhaustive").GetInt64());
            Assert.Equal(Counterexample, row.GetProperty("counterexample_text").GetString());
            Assert.Equal("2*x*y", row.GetProperty("difference").GetString());
            Assert.Equal(1, row.GetProperty("difference_terms").GetInt64());
            Assert.Equal(2, row.GetProperty("difference_total_degree").GetInt64());
            Assert.Equal(Difference, row.GetProperty("difference_text").GetString());
            // the columns that were there before are still there, under the same names
            foreach (var key in new[] { "witness_modulus", "witness_point", "witness_difference", "trials_zero" }) Assert.True(row.TryGetProperty(key, out _), key);
        }
        // a survivor has the new keys, empty
        var survivor = Run("export", "--state", "survived", "--db", db).Out.Split('\n', StringSplitOptions.RemoveEmptyEntries)
            .Single(l => l.Contains("\"label\":\"binomial\"", StringComparison.Ordinal));
        Assert.Contains("\"counterexample_text\":null", survivor);
        Assert.Contains("\"difference\":null", survivor);

        var csv = Run("export", "--state", "refuted", "--format", "csv", "--db", db).Out.Split('\n');
        var header = csv[0].TrimEnd('\r').Split(',');
        Assert.Equal(ExportRows.Columns, header);
        var dropped = csv.Single(l => l.Contains(",binomial-dropped,", StringComparison.Ordinal));
        Assert.Contains($"\"{Counterexample}\"", dropped);
        Assert.Contains($"\"{Difference}\"", dropped);
        Assert.Contains(",2*x*y,1,2,0,", dropped);

        var md = Run("export", "--state", "refuted", "--format", "md", "--db", db).Out;
        Assert.Contains("| Where it fails |", md);
        Assert.Contains($"`{Counterexample}`; `{Difference}`", md);
        // Moser at n = 6: 31 regions, not 32 (Guy 1988), a constant identity that fails with no point
        Assert.Contains("`fails: lhs = 31, rhs = 32`", md);

        var tex = Run("export", "--state", "refuted", "--format", "tex", "--db", db).Out;
        Assert.Contains("& Where it fails \\\\", tex);
        Assert.Contains($"\\texttt{{{Counterexample}}} \\newline \\texttt{{{Difference}}}", tex);
        Assert.Contains("\\multicolumn{8}", tex);

        // a table of survivors has no refutations to explain and keeps its seven columns
        var survivors = Run("export", "--format", "md", "--db", db).Out;
        Assert.DoesNotContain("Where it fails", survivors);
        Assert.DoesNotContain("\\multicolumn{8}", Run("export", "--format", "tex", "--db", db).Out);
    }

    [Fact]
    public void ShowFamily_SaysWhereMosersCircleCountHoldsAndWhereItFails()
    {
        var db = Screened();
        var show = Run("show", "moser", "--db", db);
        Assert.True(show.Code == 0, show.Err);
        Assert.Contains("family moser  catalogue evidence", show.Out);
        Assert.Contains("  holds for n = 1..5, fails for n = 6..10\n", show.Out.ReplaceLineEndings("\n"));
        Assert.Contains("first failing  at n=6: fails: lhs = 31, rhs = 32", show.Out);
        Assert.Contains("lhs - rhs = -1 (1 term, total degree 0)", show.Out);
        Assert.Equal(10, Regex.Count(show.Out.ReplaceLineEndings("\n"), @"moser\[n=\d+\]\n"));

        // the words agree with the families view's columns
        var view = Sql("SELECT holds_for, fails_for FROM families WHERE family = 'moser'").Single();
        Assert.Equal(["1..5", "6..10"], view);

        using var json = JsonDocument.Parse(Run("show", "moser", "--db", db, "--json").Out);
        var family = json.RootElement.EnumerateArray().Single();
        Assert.Equal("1..5", family.GetProperty("holds_for").GetString());
        Assert.Equal("6..10", family.GetProperty("fails_for").GetString());
        Assert.Equal("holds for n = 1..5, fails for n = 6..10", family.GetProperty("text").GetString());
        var first = family.GetProperty("first_failing");
        Assert.Equal("moser[n=6]", first.GetProperty("label").GetString());
        Assert.Equal("31", first.GetProperty("counterexample").GetProperty("lhs_value").GetString());
        Assert.Equal("32", first.GetProperty("counterexample").GetProperty("rhs_value").GetString());
        Assert.Equal(10, family.GetProperty("members").GetArrayLength());

        // a family in two parameters: counts in words, and the first failing instance's least counterexample
        // (at m = 0, r = 0 the short sum is empty: lhs = 0, rhs = C(x, 0) = 1 at every x, so x = 0 is the least point)
        var grid = Run("show", "chu-vandermonde-short", "--db", db).Out;
        Assert.Contains($"  {ShortWords}\n", grid.ReplaceLineEndings("\n"));
        Assert.Contains("first failing  at m=0, r=0: fails at x = 0: lhs = 0, rhs = 1", grid);

        // a candidate's label still shows the candidate; an unknown label is still refused
        Assert.Matches(@"candidate \d+  moser\[n=6\]  \(family moser", Run("show", "moser[n=6]", "--db", db).Out);
        Assert.Equal(2, Run("show", "no-such-family", "--db", db).Code);
    }

    [Fact]
    public void FamilyWords_AreWorkedOutByHand()
    {
        // one parameter: the view's ranges; several runs: clauses joined by "; " (common practice, for readability)
        Assert.Equal("holds for n = 0..5, fails for n = 6..10", FamilyWords.Describe(["n"], "0..5", "6..10", 11, 6, 5, 0));
        Assert.Equal("holds for n = 0..2, 4; fails for n = 3, 5..6", FamilyWords.Describe(["n"], "0..2, 4", "3, 5..6", 7, 4, 3, 0));
        Assert.Equal("fails for n = 1..4, 1 other (undecided, invalid, failed or not yet screened)", FamilyWords.Describe(["n"], null, "1..4", 5, 0, 4, 1));
        // two parameters: counts
        Assert.Equal("holds for 6 of 16 instances, fails for 10", FamilyWords.Describe(["m", "r"], null, null, 16, 6, 10, 0));
        Assert.Equal("fails for 2 of 2 instances", FamilyWords.Describe(["m", "r"], null, null, 2, 0, 2, 0));
        Assert.Equal("no instance decided yet", FamilyWords.Describe(["n"], null, null, 0, 0, 0, 0));
        // two integer parameters with the instances given: the failing ones row by row, as runs
        (IReadOnlyList<string>, bool) At(int m, int r, bool refuted) => ([m.ToString(CultureInfo.InvariantCulture), r.ToString(CultureInfo.InvariantCulture)], refuted);
        Assert.Equal("holds for 3 of 7 instances; fails for 4 (m = -1 with r = 0..1, 3; m = 2 with r = 5)",
            FamilyWords.Describe(["m", "r"], null, null, 7, 3, 4, 0, [At(-1, 0, true), At(-1, 1, true), At(-1, 2, false), At(-1, 3, true), At(2, 5, true), At(2, 4, false), At(0, 0, false)]));
        Assert.Null(FamilyWords.FailingByRow(["m", "r"], [(["1", "x"], true)]));
        Assert.Equal("0..2, 4, 6..7", FamilyWords.Runs([7, 0, 1, 2, 4, 6, 2]));
        Assert.Equal("at n=6: fails: lhs = 31, rhs = 32",
            FamilyWords.FirstFailure("{\"n\":6}", new StoredCounterexample("{}", "31", "32", null, 0, true)));
        Assert.Equal("at n=6 (no counterexample found)", FamilyWords.FirstFailure("{\"n\":6}", null));
    }

    [ExternalToolFact(Chromium.Executable, "chromium")]
    public void Report_InChromium_ShowsWhereEntriesFail_AndATwoParameterFamilyAsAGrid()
    {
        Chromium.Require();
        var db = Screened();
        var dir = _folder.File("report");
        var report = Run("report", "--db", db, "--out", dir);
        Assert.True(report.Code == 0, report.Err);
        var index = Path.Combine(dir, "index.html");
        var dom = Chromium.DumpDom(index);
        Assert.DoesNotMatch("https?://", dom);
        Assert.DoesNotContain("<script", dom);

        // the refutations table: one row per refuted entry, with the counterexample and the difference in words
        var refutations = Regex.Match(dom, "<table[^>]*data-table=\"refutations\"[^>]*>(.*?)</table>", RegexOptions.Singleline).Groups[1].Value;
        Assert.Equal(Convert.ToInt64(Sql("SELECT count(*) FROM result WHERE state = 'refuted'").Single()[0], CultureInfo.InvariantCulture),
            Regex.Count(refutations, "<tr data-key="));
        var droppedId = Convert.ToInt64(Sql("SELECT id FROM candidate WHERE label = 'binomial-dropped'").Single()[0], CultureInfo.InvariantCulture);
        var row = Regex.Match(refutations, $"<tr data-key=\"{droppedId}\">(.*?)</tr>", RegexOptions.Singleline).Groups[1].Value;
        Assert.Contains(Counterexample, WebUtility.HtmlDecode(row));
        Assert.Contains(Difference, WebUtility.HtmlDecode(row));

        var families = Regex.Match(dom, "<table[^>]*data-table=\"families\"[^>]*>(.*?)</table>", RegexOptions.Singleline).Groups[1].Value;
        string Family(string name) =>
            Regex.Match(families, $"<tr data-key=\"evidence/{Regex.Escape(name)}\"[^>]*>(.*?)</tr>", RegexOptions.Singleline).Groups[1].Value;

        // Moser: a strip of ten in words, with the first failing instance's counterexample
        var moser = WebUtility.HtmlDecode(Family("moser"));
        Assert.Contains("holds for n = 1..5, fails for n = 6..10", moser);
        Assert.Contains("at n=6: fails: lhs = 31, rhs = 32", moser);
        Assert.Equal(10, Regex.Count(moser, "<rect class=\"mark\" data-chart=\"family\""));
        Assert.DoesNotContain("data-row=", moser);

        // Chu–Vandermonde cut short: a 4 × 4 grid, rows m, columns r, refuted exactly where r <= m
        var grid = Family("chu-vandermonde-short");
        var cells = Regex.Matches(grid, "<rect class=\"mark\" data-chart=\"family\" data-state=\"(\\w+)\" data-row=\"(\\d+)\" data-column=\"(\\d+)\"")
            .Select(m => (State: m.Groups[1].Value, M: int.Parse(m.Groups[2].Value, CultureInfo.InvariantCulture), R: int.Parse(m.Groups[3].Value, CultureInfo.InvariantCulture)))
            .ToList();
        Assert.Equal(16, cells.Count);
        foreach (var (state, m, r) in cells) Assert.Equal(r <= m ? "refuted" : "survived", state);
        // the same states as the store holds
        var stored = Sql("SELECT label FROM verdicts WHERE family = 'chu-vandermonde-short' AND state = 'refuted'").Select(x => (string)x[0]!).Order().ToList();
        Assert.Equal([.. cells.Where(c => c.State == "refuted").Select(c => $"chu-vandermonde-short[m={c.M},r={c.R}]").Order()], stored);
        // axis labels, a legend with the marks that do not rely on colour, and text for a screen reader
        Assert.Contains(">m = 3</text>", grid);
        Assert.Contains(">r →</text>", grid);
        Assert.Contains("× refuted", WebUtility.HtmlDecode(grid));
        Assert.Contains("✓ survived", WebUtility.HtmlDecode(grid));
        Assert.Contains($"aria-label=\"chu-vandermonde-short: a grid of m (rows) by r (columns); {ShortWords}; refuted at ", WebUtility.HtmlDecode(grid));
        Assert.Contains("at m=0, r=0: fails at x = 0: lhs = 0, rhs = 1", WebUtility.HtmlDecode(grid));

        // the true Chu–Vandermonde: a grid of sixteen survivors
        var holds = Family("chu-vandermonde");
        Assert.Equal(16, Regex.Count(holds, "data-state=\"survived\" data-row="));

        var png = Png.Read(Chromium.Screenshot(index, _folder.File("report.png")));
        Assert.Equal((1200, 2000), (png.Width, png.Height));
    }
}
