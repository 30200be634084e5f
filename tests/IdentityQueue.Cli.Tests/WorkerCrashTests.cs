using System.Diagnostics;
using Microsoft.Data.Sqlite;
using Xunit.Abstractions;
using static IdentityQueue.Cli.Tests.StoreEndToEndTests;

namespace IdentityQueue.Cli.Tests;

/// <summary>
/// Crash safety with real processes: an `idq worker` child process is killed with SIGKILL at random moments and restarted;
/// at the end every candidate has exactly one final state, no (candidate_id, seq) is stored twice, the evidence equals that
/// of an uninterrupted run with the same seed, and SQLite's integrity check passes.
/// </summary>
public sealed class WorkerCrashTests(ITestOutputHelper log) : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("idq-crash-").FullName;

    public void Dispose()
    {
        SqliteConnection.ClearAllPools();
        try { Directory.Delete(_dir, recursive: true); } catch (IOException) { }
    }

    /// <summary>A few thousand candidates, half of them false, heavy enough that a run takes seconds.</summary>
    internal static string Catalogue() => string.Join('\n',
        "vdm: det(matrix(i in 1..9, j in 1..9: x[i]^(j-1) + n)) = det(matrix(i in 1..9, j in 1..9: x[i]^(j-1) + n)) for n in 1..700",
        "sq: (x + n*y)^6 = sum(k in 0..6: binom(6, k) * x^k * (n*y)^(6-k)) for n in 1..700",
        "sq-false: (x + n*y)^6 = sum(k in 0..6: binom(6, k) * x^k * (n*y)^(6-k)) + (n - 350)^2*x for n in 1..700",
        "pf-false: prod(i in 1..12: x[i] + n) = prod(i in 1..12: x[i]) + n^12 for n in 1..700",
        "");

    private static string IdqDll => Path.Combine(AppContext.BaseDirectory, "idq.dll");

    private static Process StartWorker(string db)
    {
        var start = new ProcessStartInfo("dotnet") { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false };
        foreach (var a in new[] { IdqDll, "worker", "--db", db, "--workers", "2", "--chunk-size", "50" }) start.ArgumentList.Add(a);
        var p = Process.Start(start)!;
        p.OutputDataReceived += (_, _) => { };
        p.ErrorDataReceived += (_, _) => { };
        p.BeginOutputReadLine();
        p.BeginErrorReadLine();
        return p;
    }

    private static long Settled(string db) => (long)Query(db,
        "SELECT count(*) FROM result WHERE state IN ('refuted','survived','undecided','invalid','failed')").Single()[0]!;

    private static long Trials(string db) => (long)Query(db, "SELECT count(*) FROM trial").Single()[0]!;

    /// <summary>
    /// Waits until the worker has stored trials beyond <paramref name="after"/> (it is mid-run) or has exited. A condition,
    /// not a time: the limit is only there to fail clearly if the worker is stuck, and is generous for a loaded machine.
    /// </summary>
    private static void WaitForProgress(string db, long after, Process worker)
    {
        var clock = Stopwatch.StartNew();
        while (Trials(db) <= after && !worker.HasExited)
        {
            Assert.True(clock.Elapsed < TimeSpan.FromMinutes(10), "the worker stored no trial in ten minutes");
            Thread.Sleep(20);
        }
    }

    [Fact]
    public void KilledWorkers_LoseNothingAndChangeNoEvidence()
    {
        var file = Path.Combine(_dir, "crash.idq");
        File.WriteAllText(file, Catalogue());
        var reference = Path.Combine(_dir, "reference.db");
        var crashed = Path.Combine(_dir, "crashed.db");
        foreach (var db in new[] { reference, crashed })
        {
            Assert.Equal(0, Idq("init", "--db", db).Code);
            Assert.Equal(0, Idq("import", file, "--db", db, "--seed", "99", "--catalogue", "crash").Code);
        }
        var total = (long)Query(crashed, "SELECT count(*) FROM candidate").Single()[0]!;
        Assert.True(total >= 2000);

        var random = new Random(5);
        var kills = 0;
        for (var round = 0; round < 12 && kills < 6; round++)
        {
            var before = Trials(crashed);
            using var worker = StartWorker(crashed);
            WaitForProgress(crashed, before, worker);
            // A kill soon after the worker's first saved progress of this round: each round does only a little of the
            // work however fast or loaded the machine is, so the kills land mid-run (the random part varies the moment).
            Thread.Sleep(random.Next(0, 60));
            var settled = Settled(crashed);
            if (worker.HasExited) break;
            worker.Kill(entireProcessTree: true); // SIGKILL
            worker.WaitForExit();
            kills++;
            log.WriteLine($"kill {kills}: {settled} of {total} settled, {Trials(crashed)} trials stored");
            if (settled == total) break;
        }
        Assert.True(kills >= 5, $"only {kills} kills happened before the batch finished; make the catalogue heavier");

        // finish both: the crashed store with a last worker run, the reference in one uninterrupted run
        Assert.Equal(0, Idq("run", "--db", crashed, "--workers", "2").Code);
        Assert.Equal(0, Idq("run", "--db", reference, "--workers", "2").Code);

        Assert.Equal(total, Settled(crashed));
        Assert.Equal(0L, Query(crashed, "SELECT count(*) FROM (SELECT candidate_id, seq FROM trial GROUP BY 1, 2 HAVING count(*) > 1)").Single()[0]);
        Assert.Equal("ok", Query(crashed, "PRAGMA integrity_check").Single()[0]);
        const string evidence = """
            SELECT c.label, t.seq, t.modulus, t.point, t.outcome, t.difference, t.bound_log2
            FROM trial t JOIN candidate c ON c.id = t.candidate_id ORDER BY c.label, t.seq
            """;
        Assert.Equal(Query(reference, evidence).Select(r => string.Join("|", r)), Query(crashed, evidence).Select(r => string.Join("|", r)));
        const string verdicts = "SELECT label, state, degree_bound, error_bound_log2 FROM verdicts ORDER BY label";
        Assert.Equal(Query(reference, verdicts).Select(r => string.Join("|", r)), Query(crashed, verdicts).Select(r => string.Join("|", r)));
    }

    [Fact]
    public void Worker_StopsGracefullyOnSigterm()
    {
        var file = Path.Combine(_dir, "term.idq");
        File.WriteAllText(file, Catalogue());
        var db = Path.Combine(_dir, "term.db");
        Idq("init", "--db", db);
        Idq("import", file, "--db", db, "--seed", "1");
        using var worker = StartWorker(db);
        WaitForProgress(db, 0, worker);
        Assert.False(worker.HasExited, "the worker exited before it was told to stop");
        using (var kill = Process.Start("kill", ["-TERM", worker.Id.ToString(System.Globalization.CultureInfo.InvariantCulture)])) kill.WaitForExit();
        Assert.True(worker.WaitForExit(600_000), "the worker did not stop after SIGTERM");
        // nothing is left claimed: what was screened is saved, the rest is pending again
        Assert.Equal(0L, Query(db, "SELECT count(*) FROM result WHERE state IN ('queued', 'screening')").Single()[0]);
        Assert.True(Trials(db) > 0);
    }
}
