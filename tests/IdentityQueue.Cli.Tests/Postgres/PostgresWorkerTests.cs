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
/// Scale-out with real processes on a real PostgreSQL server: several `idq worker` processes share one queue and one store;
/// one is killed with SIGKILL mid-run, or the server is restarted mid-run, and still every candidate ends in exactly one
/// final state with the same evidence as an uninterrupted SQLite run of the same catalogue and seed (the oracle: screening
/// is deterministic in seed, candidate and trial number).
/// </summary>
public sealed class PostgresWorkerTests(ITestOutputHelper log) : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("idq-pgw-").FullName;
    private readonly List<string> _databases = [];
    private readonly List<Worker> _workers = [];

    public void Dispose()
    {
        foreach (var w in _workers)
        {
            if (!w.Process.HasExited) w.Process.Kill(entireProcessTree: true);
            w.Process.Dispose();
        }
        foreach (var db in _databases) PostgresServer.DropDatabase(db);
        SqliteConnection.ClearAllPools();
        try { Directory.Delete(_dir, recursive: true); } catch (IOException) { }
    }

    private sealed record Worker(Process Process, StringBuilder Log);

    private Worker StartWorker(string pg)
    {
        var start = new ProcessStartInfo("dotnet") { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false, WorkingDirectory = _dir };
        foreach (var a in new[] { Path.Combine(AppContext.BaseDirectory, "idq.dll"), "worker", "--postgres", pg, "--workers", "1", "--chunk-size", "50",
                     "--invisibility-timeout", "10" })
            start.ArgumentList.Add(a);
        var p = Process.Start(start)!;
        var text = new StringBuilder();
        p.OutputDataReceived += (_, e) => { if (e.Data is not null) lock (text) text.AppendLine(e.Data); };
        p.ErrorDataReceived += (_, e) => { if (e.Data is not null) lock (text) text.AppendLine(e.Data); };
        p.BeginOutputReadLine();
        p.BeginErrorReadLine();
        var worker = new Worker(p, text);
        _workers.Add(worker);
        return worker;
    }

    private static long Scalar(string pg, string sql)
    {
        for (var attempt = 0; ; attempt++)
        {
            try { return Convert.ToInt64(ReadOnlyQuery.Run(StoreLocation.PostgreSql(pg), sql).Rows.Single()[0], CultureInfo.InvariantCulture); }
            catch (Exception e) when (attempt < 60 && e is Npgsql.NpgsqlException or StoreUnavailableException or InvalidOperationException)
            {
                Thread.Sleep(500); // the server is restarting
            }
        }
    }

    private const string SettledSql = "SELECT count(*) FROM result WHERE state IN ('refuted','survived','undecided','invalid','failed')";

    /// <summary>
    /// How long a condition may take before the test gives up: generous, because these tests wait on conditions, not on
    /// time, and a loaded machine may be many times slower than a quiet one. Reaching it means something is stuck.
    /// </summary>
    private static readonly TimeSpan Patience = TimeSpan.FromMinutes(10);

    private static void WaitFor(Func<bool> condition, TimeSpan limit, string what)
    {
        var clock = Stopwatch.StartNew();
        while (!condition())
        {
            if (clock.Elapsed > limit) throw new TimeoutException($"{what} did not happen within {limit.TotalSeconds} s");
            Thread.Sleep(100);
        }
    }

    /// <summary>Imports the catalogue into a fresh PostgreSQL store and a SQLite reference, runs the reference to the end.</summary>
    private (string Pg, string Sqlite, long Total) Prepare()
    {
        var file = Path.Combine(_dir, "scale.idq");
        File.WriteAllText(file, WorkerCrashTests.Catalogue()); // the SQLite crash test's: a few thousand candidates, half false
        var pg = PostgresServer.CreateDatabase();
        _databases.Add(pg);
        var sqlite = Path.Combine(_dir, "reference.db");
        foreach (var store in new[] { new[] { "--postgres", pg }, new[] { "--db", sqlite } })
        {
            Assert.Equal(0, Idq(["init", .. store]).Code);
            Assert.Equal(0, Idq(["import", file, "--seed", "99", "--catalogue", "scale", .. store]).Code);
        }
        Assert.Equal(0, Idq("run", "--db", sqlite, "--workers", "2").Code);
        return (pg, sqlite, Scalar(pg, "SELECT count(*) FROM candidate"));
    }

    private void StopAll()
    {
        foreach (var w in _workers.Where(w => !w.Process.HasExited))
            using (var kill = Process.Start("kill", ["-TERM", w.Process.Id.ToString(CultureInfo.InvariantCulture)])) kill.WaitForExit();
        foreach (var w in _workers) Assert.True(w.Process.WaitForExit((int)Patience.TotalMilliseconds), "a worker did not stop after SIGTERM");
    }

    private static void AssertSameEvidence(string pg, string sqlite, long total)
    {
        var p = StoreLocation.PostgreSql(pg);
        var s = StoreLocation.Sqlite(sqlite);
        Assert.Equal(total, Scalar(pg, SettledSql));
        Assert.Equal(0, Scalar(pg, "SELECT count(*) FROM result WHERE state IN ('pending', 'queued', 'screening')"));
        Assert.Equal(total, Scalar(pg, "SELECT count(*) FROM result"));
        Assert.Equal(0, Scalar(pg, "SELECT count(*) FROM (SELECT candidate_id, seq FROM trial GROUP BY 1, 2 HAVING count(*) > 1) d"));
        const string evidence = "SELECT candidate_id, seq, modulus, point, outcome, difference, bound_log2 FROM trial ORDER BY candidate_id, seq";
        Assert.Equal(Rows(s, evidence), Rows(p, evidence));
        const string verdicts = "SELECT candidate_id, label, state, degree_bound, trials, error_bound_log2, witness_modulus, witness_point FROM verdicts ORDER BY candidate_id";
        Assert.Equal(Rows(s, verdicts), Rows(p, verdicts));
    }

    [PostgresFact]
    public void ThreeWorkers_OneKilledMidRun_FinishWithTheSameEvidenceAsSqlite()
    {
        var (pg, sqlite, total) = Prepare();
        Assert.True(total >= 2000);
        var workers = Enumerable.Range(0, 3).Select(_ => StartWorker(pg)).ToList();
        WaitFor(() => Scalar(pg, "SELECT count(DISTINCT claimed_by) FROM result WHERE claimed_by IS NOT NULL") >= 2 || Scalar(pg, SettledSql) > total / 4,
            Patience, "two workers claiming work");
        var victim = workers[0];
        var claimedByVictim = Scalar(pg, $"SELECT count(*) FROM result WHERE state = 'screening' AND claimed_by LIKE '%:{victim.Process.Id}'");
        victim.Process.Kill(entireProcessTree: true); // SIGKILL, mid-chunk
        victim.Process.WaitForExit();
        log.WriteLine($"killed worker {victim.Process.Id} holding {claimedByVictim} claimed candidates; {Scalar(pg, SettledSql)} of {total} settled");

        WaitFor(() => Scalar(pg, SettledSql) == total, Patience, "the two remaining workers finishing the catalogue");
        // idq status shows the live workers (the two this test left running beat a heartbeat every few seconds)
        var status = "";
        WaitFor(() => (status = Idq("status", "--postgres", pg).Out).Contains("alive", StringComparison.Ordinal), Patience, "idq status listing a live worker");
        log.WriteLine(status);
        StopAll();
        AssertSameEvidence(pg, sqlite, total);
        Assert.True(Scalar(pg, "SELECT count(DISTINCT worker) FROM trial") >= 2, "the work was not shared between workers");
    }

    [PostgresFact(restartsServer: true)]
    public void PostgresRestartMidRun_LosesNothing()
    {
        var (pg, sqlite, total) = Prepare();
        var workers = new[] { StartWorker(pg), StartWorker(pg) };
        WaitFor(() => Scalar(pg, SettledSql) > total / 5, Patience, "a fifth of the catalogue settled");
        // The server stays down until every worker has met it: each beats a heartbeat every few seconds and each save or
        // claim touches the store, so every worker logs that the store is away. What is asserted below is what the test
        // caused, not whether a worker happened to call the server during a short restart.
        PostgresServer.Stop();
        try
        {
            WaitFor(() => workers.All(w => LogOf(w).Contains("is away", StringComparison.Ordinal)), Patience, "every worker noticing that the store is away");
        }
        finally
        {
            PostgresServer.Start();
        }
        log.WriteLine($"restarted PostgreSQL; {Scalar(pg, SettledSql)} of {total} settled");
        WaitFor(() => Scalar(pg, SettledSql) == total, Patience, "the workers finishing after the restart");
        StopAll();
        AssertSameEvidence(pg, sqlite, total);
    }

    private static string LogOf(Worker w)
    {
        lock (w.Log) return w.Log.ToString();
    }
}
