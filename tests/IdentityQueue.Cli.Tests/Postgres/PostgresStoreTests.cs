using IdentityQueue.Store;
using Microsoft.Data.Sqlite;
using Npgsql;
using static IdentityQueue.Cli.Tests.StoreEndToEndTests;

namespace IdentityQueue.Cli.Tests.Postgres;

/// <summary>
/// The PostgreSQL store through the real command line against a real server: the same schema, the same SQL face and the
/// same verdicts as the SQLite store. The oracle is the SQLite store itself, run on the same catalogues with the same seed:
/// screening is deterministic in (seed, candidate, trial), so both stores must hold the same evidence row for row.
/// </summary>
public sealed class PostgresStoreTests : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("idq-pg-").FullName;
    private readonly List<string> _databases = [];

    public void Dispose()
    {
        foreach (var db in _databases) PostgresServer.DropDatabase(db);
        SqliteConnection.ClearAllPools();
        try { Directory.Delete(_dir, recursive: true); } catch (IOException) { }
    }

    private string NewDatabase()
    {
        var db = PostgresServer.CreateDatabase();
        _databases.Add(db);
        return db;
    }

    internal static List<string> Rows(StoreLocation store, string sql) =>
        ReadOnlyQuery.Run(store, sql).Rows.Select(r => string.Join("|", r.Select(QueryCommands.Text))).ToList();

    [PostgresFact]
    public void Init_CreatesTheSchemaAndTheQueueTables_AndIsIdempotent()
    {
        var pg = NewDatabase();
        var first = Idq("init", "--postgres", pg);
        Assert.True(first.Code == 0, first.Err);
        Assert.Contains("initialised store postgres://", first.Out);
        Assert.DoesNotContain("Password", first.Out, StringComparison.OrdinalIgnoreCase);
        var second = Idq("init", "--postgres", pg);
        Assert.Equal(0, second.Code);
        Assert.Contains("up to date", second.Out);

        var location = StoreLocation.PostgreSql(pg);
        var tables = Rows(location, "SELECT table_schema || '.' || table_name FROM information_schema.tables WHERE table_schema IN ('public', 'hangfire') ORDER BY 1");
        foreach (var name in new[] { "public.catalogue", "public.candidate", "public.result", "public.trial", "public.rejection", "public.worker",
                     "public.verdicts", "public.survivors", "public.families", "hangfire.job", "hangfire.jobqueue", "hangfire.server" })
            Assert.Contains(name, tables);
    }

    [PostgresFact]
    public void Sql_IsReadOnly_AndBadSqlIsBadInput()
    {
        var pg = NewDatabase();
        Assert.Equal(0, Idq("init", "--postgres", pg).Code);
        var delete = Idq("sql", "--postgres", pg, "DELETE FROM candidate");
        Assert.Equal(2, delete.Code);
        Assert.Contains("read-only", delete.Err);
        var typo = Idq("sql", "--postgres", pg, "SELEC 1");
        Assert.Equal(2, typo.Code);
        Assert.Equal(2, Idq("status", "--postgres", pg, "--db", Path.Combine(_dir, "x.db")).Code);
    }

    [PostgresFact]
    public void Unreachable_Server_IsAClearBadInput()
    {
        var refused = Idq("status", "--postgres", "Host=127.0.0.1;Port=1;Database=nowhere;Username=nobody;Timeout=3");
        Assert.Equal(2, refused.Code);
        Assert.Contains("cannot connect to the PostgreSQL store postgres://127.0.0.1:1/nowhere", refused.Err);
    }

    [PostgresFact]
    public void DemoCatalogues_GiveTheSameEvidenceOnPostgresAsOnSqlite()
    {
        var pg = NewDatabase();
        var sqlite = Path.Combine(_dir, "reference.db");
        var seeds = Path.Combine(PostgresServer.RepositoryRoot(), "seeds-demo");
        var files = Directory.GetFiles(seeds).Where(f => f.EndsWith(".idq", StringComparison.Ordinal) || f.EndsWith(".jsonl", StringComparison.Ordinal)
            || f.EndsWith(".csv", StringComparison.Ordinal)).OrderBy(f => f, StringComparer.Ordinal).ToArray();
        foreach (var store in new[] { new[] { "--db", sqlite }, new[] { "--postgres", pg } })
        {
            Assert.Equal(0, Idq(["init", .. store]).Code);
            var import = Idq(["import", .. files, "--seed", "7", .. store]);
            Assert.True(import.Code == 0, import.Err);
            var run = Idq(["run", "--workers", "2", .. store]);
            Assert.True(run.Code == 0, run.Out + run.Err);
        }
        var p = StoreLocation.PostgreSql(pg);
        var s = StoreLocation.Sqlite(sqlite);
        foreach (var sql in new[]
                 {
                     "SELECT * FROM verdicts ORDER BY candidate_id",
                     "SELECT * FROM survivors",
                     "SELECT * FROM families ORDER BY catalogue, family",
                     "SELECT candidate_id, seq, modulus, field_bits, point_seed, outcome, point, difference, bound_log2 FROM trial ORDER BY candidate_id, seq",
                     "SELECT catalogue_id, source, line, raw, reason FROM rejection ORDER BY id",
                 })
        {
            var expected = Rows(s, sql);
            Assert.NotEmpty(expected);
            Assert.Equal(expected, Rows(p, sql));
        }

        // The read side works as on SQLite: show, recheck and export.
        Assert.Equal(0, Idq("recheck", "--all", "--postgres", pg).Code);
        var show = Idq("show", "1", "--postgres", pg);
        Assert.Equal(0, show.Code);
        Assert.Equal(Idq("show", "1", "--db", sqlite).Out.Split('\n')[..4], show.Out.Split('\n')[..4]);
        var report = Idq("report", "--postgres", pg, "--out", Path.Combine(_dir, "report"));
        Assert.True(report.Code == 0, report.Err);
        Assert.Contains("<svg", File.ReadAllText(Path.Combine(_dir, "report", "index.html")), StringComparison.Ordinal);
        var status = Idq("status", "--json", "--postgres", pg);
        Assert.Equal(0, status.Code);
        Assert.Contains("\"workers\"", status.Out);
    }

    // The families view's runs, as on SQLite (Moser's circle problem: holds for n = 1..5, fails from 6; R. K. Guy,
    // "The strong law of small numbers", Amer. Math. Monthly 95 (1988)).
    [PostgresFact]
    public void FamiliesView_GivesTheSameRunsAsOnSqlite()
    {
        var pg = NewDatabase();
        var sqlite = Path.Combine(_dir, "families.db");
        var file = Path.Combine(_dir, "m.idq");
        File.WriteAllText(file, "moser: sum(k in 0..4: binom(n-1, k)) = 2^(n-1) for n in 1..10\nparity: (-1)^n = 1 for n in -3..3\ntwo: x^(m+n) = x^m*x^n for m in 0..1, n in 0..1\n");
        foreach (var store in new[] { new[] { "--db", sqlite }, new[] { "--postgres", pg } })
        {
            Assert.Equal(0, Idq(["init", .. store]).Code);
            Assert.Equal(0, Idq(["import", file, "--seed", "3", .. store]).Code);
            Assert.Equal(0, Idq(["run", .. store]).Code);
        }
        const string sql = "SELECT family, holds_for, fails_for FROM families ORDER BY family";
        Assert.Equal(["moser|1..5|6..10", "parity|-2, 0, 2|-3, -1, 1, 3", "two||"], Rows(StoreLocation.PostgreSql(pg), sql));
        Assert.Equal(Rows(StoreLocation.Sqlite(sqlite), sql), Rows(StoreLocation.PostgreSql(pg), sql));
    }

    // Where refutations fail, shown from PostgreSQL as from SQLite: a family in words (Moser's circle problem, as above),
    // the binomial theorem with its cross term dropped (lhs - rhs = 2xy, least counterexample x = y = 1: 4 against 2),
    // in show, in every export format and in the report's queries.
    [PostgresFact]
    public void RefutationDetails_AreShownFromPostgresAsFromSqlite()
    {
        var pg = NewDatabase();
        var sqlite = Path.Combine(_dir, "details.db");
        var file = Path.Combine(_dir, "d.idq");
        File.WriteAllText(file, "moser: sum(k in 0..4: binom(n-1, k)) = 2^(n-1) for n in 1..10\ndropped: (x+y)^2 = x^2 + y^2\ntwo: x^(m+n) = x^m*x^n + m*n for m in 0..1, n in 0..2\n");
        var stores = new[] { new[] { "--db", sqlite }, new[] { "--postgres", pg } };
        foreach (var store in stores)
        {
            Assert.Equal(0, Idq(["init", .. store]).Code);
            Assert.Equal(0, Idq(["import", file, "--seed", "3", .. store]).Code);
            Assert.Equal(0, Idq(["run", .. store]).Code);
        }
        var shown = stores.Select(store => Idq(["show", "moser", .. store]).Out).ToList();
        Assert.Contains("holds for n = 1..5, fails for n = 6..10", shown[1]);
        Assert.Contains("first failing  at n=6: fails: lhs = 31, rhs = 32", shown[1]);
        Assert.Equal(shown[0], shown[1]);
        foreach (var format in new[] { "jsonl", "csv", "md", "tex" })
        {
            foreach (var store in stores)
            {
                var exported = Idq(["export", "--state", "refuted", "--format", format, .. store]).Out;
                Assert.Contains("fails at x = 1, y = 1: lhs = 4, rhs = 2", exported);
                Assert.Contains("lhs - rhs = 2*x*y (1 term, total degree 2)", exported);
                Assert.Contains("fails: lhs = 31, rhs = 32", exported);
            }
        }
        var report = Idq("report", "--postgres", pg, "--out", Path.Combine(_dir, "details-report"));
        Assert.True(report.Code == 0, report.Err);
        var html = File.ReadAllText(Path.Combine(_dir, "details-report", "index.html"));
        Assert.Contains("fails at x = 1, y = 1: lhs = 4, rhs = 2", html);
        Assert.Contains("holds for n = 1..5, fails for n = 6..10", html);
        Assert.Contains("data-row=\"1\" data-column=\"2\"", html);
    }

    [PostgresFact]
    public void HandInsertedRows_ArePickedUpByTheNextRun()
    {
        var pg = NewDatabase();
        Assert.Equal(0, Idq("init", "--postgres", pg).Code);
        using (var c = new NpgsqlConnection(pg))
        {
            c.Open();
            using var insert = new NpgsqlCommand("""
                INSERT INTO catalogue (name, seed) VALUES ('by-hand', 3);
                INSERT INTO candidate (catalogue_id, label, lhs, rhs) SELECT id, 'square', '(a+b)^2', 'a^2 + 2*a*b + b^2' FROM catalogue;
                INSERT INTO candidate (catalogue_id, label, lhs, rhs) SELECT id, 'not-square', '(a+b)^2', 'a^2 + b^2' FROM catalogue;
                """, c);
            insert.ExecuteNonQuery();
        }
        Assert.Equal(0, Idq("run", "--postgres", pg, "--workers", "1").Code);
        // (a+b)^2 = a^2 + 2ab + b^2 is the binomial theorem for n = 2; dropping 2ab makes it false (common practice).
        Assert.Equal(["not-square|refuted", "square|survived"], Rows(StoreLocation.PostgreSql(pg), "SELECT label, state FROM verdicts ORDER BY label"));
    }
}
