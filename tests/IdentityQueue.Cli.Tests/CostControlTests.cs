using System.Diagnostics;
using System.Globalization;
using System.Text;
using System.Text.Json;
using IdentityQueue.Cli.Tests.Postgres;
using IdentityQueue.Store;
using Microsoft.Data.Sqlite;
using Xunit.Abstractions;
using static IdentityQueue.Cli.Tests.StoreEndToEndTests;

namespace IdentityQueue.Cli.Tests;

/// <summary>
/// Cost control with real processes (issue 12): one monster entry — the permanent of a generic 30×30 matrix against that
/// of its transpose, inside MaxPermanentOrder — beside ordinary entries. It must cost at most its budget, never hold up the
/// others of its chunk, and a stopped worker busy with it must exit within seconds, leaving nothing in 'screening' and
/// having signed off, on SQLite and on PostgreSQL.
/// </summary>
public sealed class CostControlTests(ITestOutputHelper log) : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("idq-cost-").FullName;
    private readonly List<string> _databases = [];
    private readonly List<Process> _processes = [];
    private readonly Dictionary<Process, StringBuilder> _logs = [];

    public void Dispose()
    {
        foreach (var p in _processes)
        {
            if (!p.HasExited) p.Kill(entireProcessTree: true);
            p.Dispose();
        }
        foreach (var db in _databases) PostgresServer.DropDatabase(db);
        SqliteConnection.ClearAllPools();
        try { Directory.Delete(_dir, recursive: true); } catch (IOException) { }
    }

    /// <summary>perm(A) = perm(Aᵀ) for every square matrix (the permanent sums over permutations, and σ ↦ σ⁻¹ is a bijection) [memory].</summary>
    internal const string Monster =
        "monster: perm(matrix(i in 1..30, j in 1..30: a[i,j])) = perm(transpose(matrix(i in 1..30, j in 1..30: a[i,j])))";

    /// <summary>The monster beside ordinary entries with known verdicts.</summary>
    private static string Catalogue() => string.Join('\n',
        "binomial: (a + b)^2 = a^2 + 2*a*b + b^2",                  // the binomial theorem (common practice)
        "freshman: (a + b)^3 = a^3 + b^3",                          // false over Q: 3a²b + 3ab² ≠ 0 (common practice)
        Monster,
        "det2: det([[a, b], [c, d]]) = a*d - b*c",                  // the 2×2 determinant (common practice)
        "gauss: sum(k in 1..n: k) = n*(n+1)/2 for n in 1..20",      // Gauss's sum (common practice)
        "");

    private const string SettledSql = "SELECT count(*) FROM result WHERE state IN ('refuted','survived','undecided','invalid','failed')";

    private Process StartIdq(params string[] args)
    {
        var start = new ProcessStartInfo("dotnet") { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false, WorkingDirectory = _dir };
        start.ArgumentList.Add(Path.Combine(AppContext.BaseDirectory, "idq.dll"));
        foreach (var a in args) start.ArgumentList.Add(a);
        var p = Process.Start(start)!;
        var text = new StringBuilder();
        p.OutputDataReceived += (_, e) => { if (e.Data is not null) lock (text) text.AppendLine(e.Data); };
        p.ErrorDataReceived += (_, e) => { if (e.Data is not null) lock (text) text.AppendLine(e.Data); };
        p.BeginOutputReadLine();
        p.BeginErrorReadLine();
        _processes.Add(p);
        _logs[p] = text;
        return p;
    }

    private string Log(Process p)
    {
        var text = _logs[p];
        lock (text) return text.ToString();
    }

    private static void WaitFor(Func<bool> condition, TimeSpan limit, string what)
    {
        var clock = Stopwatch.StartNew();
        while (!condition())
        {
            if (clock.Elapsed > limit) throw new TimeoutException($"{what} did not happen within {limit.TotalSeconds} s");
            Thread.Sleep(100);
        }
    }

    private static void Terminate(Process p)
    {
        using var kill = Process.Start("kill", ["-TERM", p.Id.ToString(CultureInfo.InvariantCulture)])!;
        kill.WaitForExit();
    }

    /// <summary>The store's verdicts, label → state, through the read-only query path that works for both stores.</summary>
    private static Dictionary<string, string> States(StoreLocation store) =>
        ReadOnlyQuery.Run(store, "SELECT label, state FROM verdicts").Rows.ToDictionary(r => (string)r[0]!, r => (string)r[1]!);

    private static long Scalar(StoreLocation store, string sql) =>
        Convert.ToInt64(ReadOnlyQuery.Run(store, sql).Rows.Single()[0], CultureInfo.InvariantCulture);

    private static void AssertOrdinaryVerdicts(Dictionary<string, string> states)
    {
        Assert.Equal("survived", states["binomial"]);
        Assert.Equal("refuted", states["freshman"]);
        Assert.Equal("survived", states["det2"]);
        Assert.All(states.Where(s => s.Key.StartsWith("gauss", StringComparison.Ordinal)), s => Assert.Equal("survived", s.Value));
    }

    private string[] Import(string[] store)
    {
        var file = Path.Combine(_dir, "monster.idq");
        File.WriteAllText(file, Catalogue());
        Assert.Equal(0, Idq(["init", .. store]).Code);
        Assert.Equal(0, Idq(["import", file, "--seed", "12", .. store]).Code);
        return store;
    }

    [Fact]
    public void Check_OnTheMonster_SettlesAtOnceWithTheEstimateAndTheBudget()
    {
        var clock = Stopwatch.StartNew();
        var (code, output, _) = Idq("check", Monster, "--json", "--seed", "1");
        log.WriteLine($"{clock.Elapsed.TotalSeconds:F2} s: {output}");
        Assert.Equal(ExitCodes.Undecided, code);
        using var json = JsonDocument.Parse(output);
        Assert.Equal("undecided", json.RootElement.GetProperty("verdict").GetString());
        // settled before any trial ran: nothing was computed
        Assert.Equal(0, json.RootElement.GetProperty("trials").GetInt32());
        var message = json.RootElement.GetProperty("message").GetString()!;
        Assert.Contains("one trial needs about 2^", message);
        Assert.Contains("permanent of order 30", message);
        Assert.Contains("the budget allows about 2^", message);
        Assert.Contains("60 s (TimePerCandidate)", message);
    }

    [Fact]
    public void Check_RejectsABudgetOutOfRange()
    {
        var (code, _, error) = Idq("check", "x = x", "--time-per-candidate", "0");
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains("--time-per-candidate must be between", error);
    }

    [Fact]
    public void Run_MonsterBesideOrdinaryEntries_SettlesUnderItsBudgetWithTheOthersRight()
    {
        var db = Path.Combine(_dir, "run.db");
        Import(["--db", db]);
        var run = StartIdq("run", "--db", db, "--workers", "2", "--time-per-candidate", "20");
        // The budget is 20 s: the run must end well before the monster could be computed (hours); a generous wait.
        Assert.True(run.WaitForExit(180_000), "idq run did not finish");
        Assert.Equal(0, run.ExitCode);
        var states = States(StoreLocation.Sqlite(db));
        AssertOrdinaryVerdicts(states);
        Assert.Equal("undecided", states["monster"]);
        var message = (string)Query(db, "SELECT message FROM verdicts WHERE label = 'monster'").Single()[0]!;
        log.WriteLine(message);
        Assert.Contains("permanent of order 30", message);
        Assert.Contains("20 s (TimePerCandidate)", message);
    }

    [Fact]
    public void Worker_BusyWithTheMonster_SavesTheOthersAndStopsOnSigterm_Sqlite()
    {
        var db = Path.Combine(_dir, "worker.db");
        StopsOnSigterm(Import(["--db", db]), StoreLocation.Sqlite(db));
    }

    [PostgresFact]
    public void Worker_BusyWithTheMonster_SavesTheOthersAndStopsOnSigterm_Postgres()
    {
        var pg = PostgresServer.CreateDatabase();
        _databases.Add(pg);
        StopsOnSigterm(Import(["--postgres", pg]), StoreLocation.PostgreSql(pg));
    }

    /// <summary>
    /// A worker with a budget large enough that it starts the monster: the other candidates of its chunk are saved while
    /// the monster runs, status names the monster as what the worker has been on the longest, and SIGTERM ends the process
    /// within <see cref="StopWithin"/> with the monster back in pending and the worker signed off.
    /// </summary>
    private void StopsOnSigterm(string[] store, StoreLocation location)
    {
        var total = Scalar(location, "SELECT count(*) FROM candidate");
        var worker = StartIdq(["worker", .. store, "--workers", "2", "--time-per-candidate", MaxBudget]);
        // Every other candidate settles while the monster (one chunk with them) is still being screened.
        WaitForTheMonsterAlone(location, total);
        AssertOrdinaryVerdicts(States(location));
        // The heartbeat (every 5 s) tells status what the worker has been on the longest.
        string? longest = null;
        WaitFor(() =>
        {
            using var status = JsonDocument.Parse(Idq(["status", "--json", .. store]).Out);
            var workers = status.RootElement.GetProperty("workers").EnumerateArray().ToList();
            if (workers.Count != 1 || workers[0].GetProperty("longestOn").ValueKind != JsonValueKind.Object) return false;
            longest = workers[0].GetProperty("longestOn").GetProperty("label").GetString();
            return true;
        }, TimeSpan.FromSeconds(30), "status naming the candidate the worker is on");
        Assert.Equal("monster", longest);
        Assert.Contains("monster for", Idq(["status", .. store]).Out);

        var clock = Stopwatch.StartNew();
        Terminate(worker);
        var stopped = worker.WaitForExit((int)StopWithin.TotalMilliseconds);
        log.WriteLine($"the worker stopped {clock.Elapsed.TotalSeconds:F2} s after SIGTERM");
        Assert.True(stopped, $"the worker did not stop within {StopWithin.TotalSeconds} s of SIGTERM");
        Assert.Equal(0, worker.ExitCode);
        Assert.Equal(0, Scalar(location, "SELECT count(*) FROM result WHERE state IN ('queued', 'screening')"));
        Assert.Equal("pending", States(location)["monster"]);
        // signed off: no worker is left that others would count as alive
        Assert.Equal(0, Scalar(location, "SELECT count(*) FROM worker WHERE stopped_at IS NULL"));
        Assert.Contains("no worker is running", Idq(["status", .. store]).Out);
    }

    [Fact]
    public void Run_BusyWithTheMonster_StopsOnSigterm_LeavingItPending()
    {
        var db = Path.Combine(_dir, "run-stop.db");
        Import(["--db", db]);
        var location = StoreLocation.Sqlite(db);
        var total = Scalar(location, "SELECT count(*) FROM candidate");
        var run = StartIdq("run", "--db", db, "--workers", "2", "--time-per-candidate", MaxBudget);
        WaitForTheMonsterAlone(location, total);
        var clock = Stopwatch.StartNew();
        Terminate(run);
        Assert.True(run.WaitForExit((int)StopWithin.TotalMilliseconds), $"idq run did not stop within {StopWithin.TotalSeconds} s of SIGTERM");
        log.WriteLine($"idq run stopped {clock.Elapsed.TotalSeconds:F2} s after SIGTERM");
        Assert.Equal(0, Scalar(location, "SELECT count(*) FROM result WHERE state IN ('queued', 'screening')"));
        Assert.Equal("pending", States(location)["monster"]);
        AssertOrdinaryVerdicts(States(location));
    }

    [Fact]
    public void Check_StopsOnSigint_WithTheVerdictUndecided()
    {
        // an order-26 permanent: about 2^32 operations per trial, minutes here, inside the largest budget
        var check = StartIdq("check", "perm(matrix(i in 1..26, j in 1..26: a[i,j])) = perm(transpose(matrix(i in 1..26, j in 1..26: a[i,j])))",
            "--time-per-candidate", MaxBudget, "--seed", "3");
        WaitFor(() => Log(check).Contains("one trial needs about", StringComparison.Ordinal), TimeSpan.FromSeconds(60), "check announcing the long trial");
        var clock = Stopwatch.StartNew();
        using (var kill = Process.Start("kill", ["-INT", check.Id.ToString(CultureInfo.InvariantCulture)])!) kill.WaitForExit();
        Assert.True(check.WaitForExit((int)StopWithin.TotalMilliseconds), "idq check did not stop after SIGINT");
        check.WaitForExit();
        log.WriteLine($"idq check stopped {clock.Elapsed.TotalSeconds:F2} s after SIGINT:\n{Log(check)}");
        Assert.Equal(ExitCodes.Undecided, check.ExitCode);
        Assert.Contains("undecided: stopped by a signal after 0 trials", Log(check));
    }

    /// <summary>The largest budget allowed (a week): the monster's estimate (hours; more on a loaded machine) fits it, so it starts.</summary>
    private const string MaxBudget = "604800";

    /// <summary>Waits until every other candidate has settled while the monster is still being screened.</summary>
    private static void WaitForTheMonsterAlone(StoreLocation location, long total) =>
        WaitFor(() =>
        {
            var monster = States(location)["monster"];
            Assert.True(monster is "pending" or "queued" or "screening", $"the monster settled as {monster} instead of being screened");
            return Scalar(location, SettledSql) == total - 1 && monster == "screening";
        }, TimeSpan.FromMinutes(3), "the ordinary candidates settling beside the monster");

    /// <summary>
    /// How long a stop may take in these tests: the README states about 3 s (the median measured); the tests allow more
    /// because the machine running them may be loaded.
    /// </summary>
    private static readonly TimeSpan StopWithin = TimeSpan.FromSeconds(20);
}
