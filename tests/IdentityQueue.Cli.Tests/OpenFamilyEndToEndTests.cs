using Microsoft.Data.Sqlite;
using static IdentityQueue.Cli.Tests.StoreEndToEndTests;

namespace IdentityQueue.Cli.Tests;

/// <summary>
/// Open-ended families (<c>for n &gt;= A</c>) as users meet them on a SQLite store: <c>idq run</c> keeps going while a
/// family can grow, stops it at its first refuted instance or at the open family budget, and the families view and
/// <c>idq status</c> say how far it holds and why it stopped.
/// </summary>
public sealed class OpenFamilyEndToEndTests : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("idq-open-").FullName;
    private string Db => Path.Combine(_dir, "s.db");

    public void Dispose()
    {
        SqliteConnection.ClearAllPools();
        try { Directory.Delete(_dir, recursive: true); } catch (IOException) { }
    }

    internal const string Catalogue = """
        # Moser's circle problem: 1, 2, 4, 8, 16 regions, then 31 at n = 6 (R. K. Guy, "The strong law of small numbers",
        # Amer. Math. Monthly 95 (1988))
        regions: sum(k in 0..4: binom(n-1, k)) = 2^(n-1) for n >= 1
        # the binomial theorem at x = y = 1, true for every n (common practice)
        pascal: sum(k in 0..n: binom(n, k)) = 2^n for n >= 0
        # the binomial theorem with variables, true for every n (common practice)
        binomial: (x+y)^n = sum(k in 0..n: binom(n, k)*x^k*y^(n-k)) for n >= 1
        """;

    [Fact]
    public void Run_ScreensMoserUntilSixAndTrueFamiliesUntilTheBudget()
    {
        var file = Path.Combine(_dir, "open.idq");
        File.WriteAllText(file, Catalogue);
        Assert.Equal(0, Idq("init", "--db", Db).Code);
        var import = Idq("import", file, "--db", Db, "--seed", "5", "--open-budget", "20");
        Assert.True(import.Code == 0, import.Out + import.Err);
        Assert.Contains("3 entries, 24 instances", import.Out); // the first chunk of each: 8 instances

        var run = Idq("run", "--db", Db, "--workers", "2");
        Assert.True(run.Code == 0, run.Out + run.Err);

        var families = Query(Db, "SELECT family, instances, refuted, holds_for, fails_for, open_ended, open_budget, open_stop FROM families ORDER BY family")
            .ToDictionary(r => (string)r[0]!, r => r[1..]);
        // Guy (1988): holds for n = 1..5, fails at 6; the rest of the chunk (7, 8) is screened too and fails (57, 99 regions).
        Assert.Equal([8L, 3L, "1..5", "6..8", 1L, 20L, "first refuted at n = 6"], families["regions"]);
        Assert.Equal([20L, 0L, "0..19", null, 1L, 20L, "budget of 20 instances reached"], families["pascal"]);
        Assert.Equal([20L, 0L, "1..20", null, 1L, 20L, "budget of 20 instances reached"], families["binomial"]);
        Assert.Equal(0L, Query(Db, "SELECT COUNT(*) FROM result WHERE state NOT IN ('survived', 'refuted')").Single()[0]);
        // One candidate per value: n increases by one from the family's start, with no value twice.
        Assert.Equal(48L, Query(Db, "SELECT COUNT(DISTINCT family || params) FROM candidate").Single()[0]);
        // The counterexample of the first failing instance: 31 regions against 2^5 = 32 (Guy 1988).
        Assert.Equal(["31", "32"], Query(Db, "SELECT lhs_value, rhs_value FROM counterexamples WHERE label = 'regions[n=6]'").Single());

        var status = Idq("status", "--db", Db);
        Assert.Contains("open-ended family regions (open): 8 instances, holds for 1..5, fails for 6..8: first refuted at n = 6", status.Out);
        Assert.Contains("open-ended family pascal (open): 20 instances, holds for 0..19: budget of 20 instances reached", status.Out);
        using var json = System.Text.Json.JsonDocument.Parse(Idq("status", "--db", Db, "--json").Out);
        var regions = json.RootElement.GetProperty("openFamilies").EnumerateArray().Single(f => f.GetProperty("family").GetString() == "regions");
        Assert.Equal(("1..5", "6..8", "first refuted at n = 6", 20),
            (regions.GetProperty("holdsFor").GetString(), regions.GetProperty("failsFor").GetString(), regions.GetProperty("stopped").GetString(), regions.GetProperty("budget").GetInt32()));
    }

    [Fact]
    public void Import_RefusesABadBudget()
    {
        var file = Path.Combine(_dir, "open.idq");
        File.WriteAllText(file, Catalogue);
        Assert.Equal(0, Idq("init", "--db", Db).Code);
        var import = Idq("import", file, "--db", Db, "--open-budget", "0");
        Assert.Equal(2, import.Code);
        Assert.Contains("--open-budget: the open family budget must be between 1 and 10000 instances", import.Err);
    }

    [Fact]
    public void Check_ScreensAnOpenFamilyUpToTheChunkOfItsFirstRefutation()
    {
        var check = Idq("check", "sum(k in 0..4: binom(n-1, k)) = 2^(n-1) for n >= 1");
        Assert.Equal(1, check.Code);
        Assert.Contains("family of 8 instances: 5 survived, 3 refuted", check.Out);
        Assert.Contains("[n = 6]\nrefuted: false over Q, decided exactly (no variables): 31 ≠ 32", check.Out); // Guy (1988)
        Assert.DoesNotContain("[n = 9]", check.Out);
    }
}
