using System.Diagnostics;
using System.Globalization;
using System.Text;
using IdentityQueue.Store;
using Microsoft.Data.Sqlite;
using Xunit.Abstractions;
using static IdentityQueue.Cli.Tests.Postgres.PostgresStoreTests;
using static IdentityQueue.Cli.Tests.StoreEndToEndTests;

namespace IdentityQueue.Cli.Tests.Postgres;

/// <summary>
/// Open-ended families (<c>for n &gt;= A</c>) on a real PostgreSQL server: <c>idq run</c> screens Moser's circle family
/// to its first refutation exactly as on SQLite, and two <c>idq worker</c> processes growing the same families at once
/// make every instance once.
/// </summary>
public sealed class OpenFamilyPostgresTests(ITestOutputHelper log) : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("idq-pgopen-").FullName;
    private readonly List<string> _databases = [];
    private readonly List<Process> _workers = [];

    public void Dispose()
    {
        foreach (var w in _workers)
        {
            if (!w.HasExited) w.Kill(entireProcessTree: true);
            w.Dispose();
        }
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

    private static long Scalar(string pg, string sql) =>
        Convert.ToInt64(ReadOnlyQuery.Run(StoreLocation.PostgreSql(pg), sql).Rows.Single()[0], CultureInfo.InvariantCulture);

    [PostgresFact]
    public void Run_ScreensMoserUntilSix_AsOnSqlite()
    {
        var file = Path.Combine(_dir, "open.idq");
        File.WriteAllText(file, OpenFamilyEndToEndTests.Catalogue);
        var pg = NewDatabase();
        var sqlite = Path.Combine(_dir, "reference.db");
        foreach (var store in new[] { new[] { "--postgres", pg }, new[] { "--db", sqlite } })
        {
            Assert.Equal(0, Idq(["init", .. store]).Code);
            Assert.Equal(0, Idq(["import", file, "--seed", "5", "--open-budget", "20", .. store]).Code);
            var run = Idq(["run", "--workers", "2", .. store]);
            Assert.True(run.Code == 0, run.Out + run.Err);
        }
        const string families = "SELECT family, instances, survived, refuted, holds_for, fails_for, open_ended, open_budget, open_stop FROM families ORDER BY family";
        var onPostgres = Rows(StoreLocation.PostgreSql(pg), families);
        // Guy (1988): Moser's regions hold for n = 1..5 and fail at 6; the true families stop at the budget.
        Assert.Equal([
            "binomial|20|20|0|1..20||1|20|budget of 20 instances reached",
            "pascal|20|20|0|0..19||1|20|budget of 20 instances reached",
            "regions|8|5|3|1..5|6..8|1|20|first refuted at n = 6",
        ], onPostgres);
        Assert.Equal(Rows(StoreLocation.Sqlite(sqlite), families), onPostgres);
        const string verdicts = "SELECT label, state, trials FROM verdicts ORDER BY label";
        Assert.Equal(Rows(StoreLocation.Sqlite(sqlite), verdicts), Rows(StoreLocation.PostgreSql(pg), verdicts));
    }

    private Process StartWorker(string pg, StringBuilder text)
    {
        var start = new ProcessStartInfo("dotnet") { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false, WorkingDirectory = _dir };
        foreach (var a in new[] { Path.Combine(AppContext.BaseDirectory, "idq.dll"), "worker", "--postgres", pg, "--workers", "1", "--chunk-size", "4" })
            start.ArgumentList.Add(a);
        var p = Process.Start(start)!;
        p.OutputDataReceived += (_, e) => { if (e.Data is not null) lock (text) text.AppendLine(e.Data); };
        p.ErrorDataReceived += (_, e) => { if (e.Data is not null) lock (text) text.AppendLine(e.Data); };
        p.BeginOutputReadLine();
        p.BeginErrorReadLine();
        _workers.Add(p);
        return p;
    }

    [PostgresFact]
    public void TwoWorkerProcesses_GrowEachFamilyOnce()
    {
        // Twenty true open families (the binomial theorem at y = i, common practice) and Moser's (Guy 1988), grown by two
        // worker processes at once: each process plans, and so each tries to add the same chunks.
        var text = new StringBuilder();
        for (var i = 1; i <= 20; i++) text.Append(CultureInfo.InvariantCulture, $"b{i}: (x+{i})^n = sum(k in 0..n: binom(n, k)*x^k*{i}^(n-k)) for n >= 0\n");
        text.Append("regions: sum(k in 0..4: binom(n-1, k)) = 2^(n-1) for n >= 1\n");
        var file = Path.Combine(_dir, "many.idq");
        File.WriteAllText(file, text.ToString());
        var pg = NewDatabase();
        Assert.Equal(0, Idq("init", "--postgres", pg).Code);
        Assert.Equal(0, Idq("import", file, "--postgres", pg, "--seed", "7", "--open-budget", "24").Code);

        var logs = new[] { new StringBuilder(), new StringBuilder() };
        var workers = logs.Select(l => StartWorker(pg, l)).ToList();
        const string stopped = "SELECT count(*) FROM families WHERE open_stop IS NOT NULL";
        var clock = Stopwatch.StartNew();
        // Waits on a condition; the ten minutes only turn a stuck run into a clear failure.
        while (Scalar(pg, stopped) < 21)
        {
            Assert.True(clock.Elapsed < TimeSpan.FromMinutes(10), $"the families did not all stop: {Scalar(pg, stopped)} of 21\n{logs[0]}\n{logs[1]}");
            Thread.Sleep(200);
        }
        foreach (var w in workers)
            using (var kill = Process.Start("kill", ["-TERM", w.Id.ToString(CultureInfo.InvariantCulture)])) kill.WaitForExit();
        foreach (var w in workers) Assert.True(w.WaitForExit(600_000), "a worker did not stop after SIGTERM");
        log.WriteLine(logs[0].ToString());

        Assert.Equal(20 * 24 + 8, Scalar(pg, "SELECT count(*) FROM candidate"));
        Assert.Equal(0, Scalar(pg, "SELECT count(*) FROM (SELECT family, params FROM candidate GROUP BY family, params HAVING count(*) > 1) d"));
        Assert.Equal(0, Scalar(pg, "SELECT count(*) FROM (SELECT label FROM candidate GROUP BY label HAVING count(*) > 1) d"));
        Assert.Equal(20, Scalar(pg, "SELECT count(*) FROM families WHERE open_stop = 'budget of 24 instances reached' AND instances = 24 AND survived = 24"));
        Assert.Equal(1, Scalar(pg, "SELECT count(*) FROM families WHERE family = 'regions' AND open_stop = 'first refuted at n = 6' AND fails_for = '6..8'"));
        Assert.Equal(0, Scalar(pg, "SELECT count(*) FROM result WHERE state NOT IN ('survived', 'refuted')"));
        Assert.True(Scalar(pg, "SELECT count(DISTINCT worker) FROM trial") >= 2, "the work was not shared between the two workers");
    }
}
