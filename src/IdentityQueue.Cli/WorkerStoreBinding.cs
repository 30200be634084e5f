using IdentityQueue.Algebra;
using IdentityQueue.Screening;
using IdentityQueue.Store;
using IdentityQueue.Store.Work;
using IdentityQueue.Worker;
using Microsoft.Extensions.Logging;
using Microsoft.Extensions.Logging.Abstractions;
using StoreOutcome = IdentityQueue.Store.Work.CandidateOutcome;
using WorkerOutcome = IdentityQueue.Worker.CandidateOutcome;

namespace IdentityQueue.Cli;

/// <summary>
/// The workers' port onto a store (SQLite or PostgreSQL): each call opens its own connection (cheap: a SQLite file
/// handle, or a pooled PostgreSQL connection), since connections are not thread-safe and Hangfire runs jobs on several
/// threads. On PostgreSQL a call that fails because the server is away (restarting, unreachable) is retried with
/// backoff for up to <see cref="RetryFor"/>, logging while it waits; every call is idempotent, so a retry after an
/// unknown commit outcome is harmless. Thread-safe.
/// </summary>
internal sealed class StoreWorkerBinding(StoreLocation location, Limits limits, ILogger? log = null) : IScreeningStore
{
    /// <summary>How long a call keeps retrying while the PostgreSQL server is away before it gives up (and the job is retried by Hangfire).</summary>
    public static readonly TimeSpan RetryFor = TimeSpan.FromMinutes(3);

    private readonly ILogger _log = log ?? NullLogger.Instance;

    private T With<T>(Func<StoreConnection, T> action, bool retry = true)
    {
        if (!location.IsPostgreSql || !retry)
        {
            using var c = StoreConnection.Open(location);
            return action(c);
        }
        var delay = TimeSpan.FromMilliseconds(250);
        var started = DateTime.UtcNow;
        for (var attempt = 1; ; attempt++)
        {
            try
            {
                using var c = StoreConnection.Open(location);
                var result = action(c);
                if (attempt > 1) _log.LogInformation("the PostgreSQL store {Store} is back after {Attempts} attempts", location.Display, attempt);
                return result;
            }
            catch (Exception e) when (IsTransient(e) && DateTime.UtcNow - started + delay < RetryFor)
            {
                _log.LogWarning("the PostgreSQL store {Store} is away ({Problem}); retry {Attempt} in {Delay:F1} s",
                    location.Display, Innermost(e).Message, attempt, delay.TotalSeconds);
                // Connections idle in the pool died with the server: drop them rather than meet each one failing.
                StoreConnection.DataSource(location.Target).Clear();
                Thread.Sleep(delay);
                delay = TimeSpan.FromTicks(Math.Min(delay.Ticks * 2, TimeSpan.FromSeconds(10).Ticks));
            }
        }
    }

    private void With(Action<StoreConnection> action) => With(c => { action(c); return 0; });

    /// <summary>
    /// Errors that say the server is away or the connection broke, not that our SQL is wrong: connection failures,
    /// Npgsql's transient errors, and PostgreSQL's shutdown, crash-recovery and connection SQLSTATE classes 08 and 57P.
    /// </summary>
    internal static bool IsTransient(Exception e) => e switch
    {
        StoreUnavailableException { InnerException: { } inner } => IsTransient(inner),
        Npgsql.PostgresException p => p.SqlState.StartsWith("08", StringComparison.Ordinal) || p.SqlState.StartsWith("57P", StringComparison.Ordinal)
            || p.SqlState is "53300" or "40001" or "40P01",
        Npgsql.NpgsqlException n => n.IsTransient || n.InnerException is System.IO.IOException or System.Net.Sockets.SocketException,
        System.IO.IOException or System.Net.Sockets.SocketException or TimeoutException => true,
        InvalidOperationException { InnerException: { } inner } => IsTransient(inner),
        _ => false,
    };

    private static Exception Innermost(Exception e) => e.InnerException is { } inner && e is StoreUnavailableException ? inner : e;

    public int Recover() => With(c => new WorkQueue(c).Recover());

    public int RecoverShared(TimeSpan deadAfter, TimeSpan queuedStaleAfter) => With(c => new WorkQueue(c).RecoverShared(deadAfter, queuedStaleAfter));

    public int ReleaseClaimsOf(string worker) => With(c => new WorkQueue(c).ReleaseClaimsOf(worker));

    public int EnsureResultRows() => With(c => new CandidateStore(c).EnsureResultRows());

    // Not retried: if the server went away after committing, a retry would take a second set and leave the first queued
    // with no job until the stale-queue sweep. The planner simply tries again at its next round.
    public PlannedWork TakePending(int max, Action<int, IReadOnlyList<long>>? beforeCommit = null) => With(c =>
    {
        var (stage, ids) = new WorkQueue(c).TakePending(max, beforeCommit);
        return new PlannedWork(stage, ids);
    }, retry: false);

    public IReadOnlyList<CandidateWork> Claim(IReadOnlyList<long> ids, string worker) => With(c =>
        (IReadOnlyList<CandidateWork>)new WorkQueue(c).Claim(ids, worker).Select(claimed =>
        {
            var s = claimed.Candidate;
            var bound = s.Bind(limits);
            return new CandidateWork(s.Id, s.Seed.Value, s.TrialKey(bound), s.CatalogueTargetBits, bound.Entry, bound.Parameters, bound.Error, claimed.Trials, s.Label);
        }).ToList());

    public void Save(IReadOnlyList<WorkerOutcome> outcomes, string worker)
    {
        if (outcomes.Count == 0) return;
        var rows = outcomes.Select(o =>
            o.Result is not null ? StoreOutcome.Screened(o.Id, o.Result)
            : o.Invalid is not null ? StoreOutcome.Invalid(o.Id, o.Invalid)
            : StoreOutcome.Failed(o.Id, o.Failed ?? "failed")).ToList();
        With(c => new CandidateStore(c).Save(rows, worker));
    }

    public void Release(IReadOnlyList<long> ids)
    {
        if (ids.Count == 0) return;
        With(c => new WorkQueue(c).Release(ids));
    }

    public StateCounts Counts() => With(c =>
    {
        var n = new WorkQueue(c).CountByState();
        long Of(string s) => n.TryGetValue(s, out var v) ? v : 0;
        return new StateCounts(Of("pending"), Of("queued"), Of("screening"), Of("refuted"), Of("survived"), Of("undecided"), Of("invalid"), Of("failed"));
    });

    public void RegisterWorker(string name, int threads) =>
        With(c => new WorkerRegistry(c).Register(name, Environment.MachineName, Environment.ProcessId, threads));

    public void Heartbeat(string name, long chunksDone, long candidatesDone, bool stopped = false, InFlightCandidate? longest = null) => With(c =>
    {
        var registry = new WorkerRegistry(c);
        if (stopped) registry.SignOff(name, chunksDone, candidatesDone);
        else registry.Heartbeat(name, chunksDone, candidatesDone, longest?.Id, longest?.Since);
    });

    public int LiveThreads(TimeSpan deadAfter) => With(c => new WorkerRegistry(c).LiveThreads(deadAfter));
}
