using IdentityQueue.Store;
using Microsoft.Data.Sqlite;
using static IdentityQueue.Cli.Tests.Postgres.PostgresStoreTests;
using static IdentityQueue.Cli.Tests.StoreEndToEndTests;

namespace IdentityQueue.Cli.Tests.Postgres;

/// <summary>
/// Equivalence groups on PostgreSQL (#15 point 4): the same groups in the <c>equivalents</c> view and the same shared
/// results as on SQLite, for the catalogue of <see cref="EquivalenceEndToEndTests"/> with the same seed (the oracle is the
/// SQLite store: fingerprints and screening are deterministic in the seed).
/// </summary>
public sealed class PostgresEquivalenceTests : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("idq-pg-eq-").FullName;
    private string? _database;

    public void Dispose()
    {
        if (_database is not null) PostgresServer.DropDatabase(_database);
        SqliteConnection.ClearAllPools();
        try { Directory.Delete(_dir, recursive: true); } catch (IOException) { }
    }

    [PostgresFact]
    public void EquivalentsView_AndSharedResults_AreTheSameAsOnSqlite()
    {
        var pg = _database = PostgresServer.CreateDatabase();
        var sqlite = Path.Combine(_dir, "eq.db");
        var file = Path.Combine(_dir, "eq.idq");
        File.WriteAllText(file, EquivalenceEndToEndTests.Catalogue);
        foreach (var store in new[] { new[] { "--db", sqlite }, new[] { "--postgres", pg } })
        {
            Assert.Equal(0, Idq(["init", .. store]).Code);
            Assert.Equal(0, Idq(["import", file, "--seed", "11", .. store]).Code);
            Assert.Equal(0, Idq(["run", "--workers", "2", .. store]).Code);
        }
        const string view = "SELECT candidate_id, label, group_label, group_candidate_id, swapped, false_match_bits FROM equivalents ORDER BY candidate_id";
        var groups = Rows(StoreLocation.PostgreSql(pg), view);
        Assert.Equal(5, groups.Count);
        Assert.Contains("5|wrong-swapped|wrong|4|1|", groups[2]);
        Assert.Equal(Rows(StoreLocation.Sqlite(sqlite), view), groups);
        const string shared = "SELECT candidate_id, state, shared_from, degree_bound, message FROM result ORDER BY candidate_id";
        var results = Rows(StoreLocation.PostgreSql(pg), shared);
        Assert.Equal(5, results.Count(r => r.Contains("|same identity as ", StringComparison.Ordinal)));
        Assert.Equal(Rows(StoreLocation.Sqlite(sqlite), shared), results);
        Assert.Contains("same identity  as wrong (candidate 4, sides swapped;", Idq("show", "wrong-swapped", "--postgres", pg).Out);
        var report = Path.Combine(_dir, "report");
        Assert.Equal(0, Idq("report", "--postgres", pg, "--out", report).Code);
        var html = File.ReadAllText(Path.Combine(report, "index.html"));
        Assert.Equal(4, System.Text.RegularExpressions.Regex.Count(html, "<tr data-key=\"\\d+\" data-members="));
        Assert.Contains("4 groups, 5 entries share a result", html);
    }
}
