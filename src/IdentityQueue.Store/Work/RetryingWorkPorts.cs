using IdentityQueue.Screening;
using IdentityQueue.Screening.Ports;
using Microsoft.Extensions.Logging;
using Microsoft.Extensions.Logging.Abstractions;

namespace IdentityQueue.Store.Work;

/// <summary>
/// How a call to a store is retried while its server is away: which errors mean "away" (not "our SQL is wrong"), how
/// long to keep trying, and what to do between attempts. <see cref="None"/> runs a call once. Immutable; thread-safe.
/// </summary>
public sealed class StoreRetry
{
    /// <summary>How long a call keeps retrying while the PostgreSQL server is away before it gives up (and the job is retried by the queue).</summary>
    public static readonly TimeSpan RetryFor = TimeSpan.FromMinutes(3);

    /// <summary>Runs each call once.</summary>
    public static readonly StoreRetry None = new(_ => false, TimeSpan.Zero, "", null, null, null);

    private readonly Func<Exception, bool> _isTransient;
    private readonly TimeSpan _retryFor;
    private readonly string _display;
    private readonly Action? _beforeRetry;
    private readonly ILogger _log;
    private readonly TimeProvider _clock;

    /// <param name="isTransient">Whether an error says the server is away.</param>
    /// <param name="retryFor">How long to keep trying.</param>
    /// <param name="display">The store, as the log names it.</param>
    /// <param name="beforeRetry">Runs before each new attempt (dropping pooled connections that died with the server).</param>
    /// <param name="log">Where the outage and the reconnection are logged; none when null.</param>
    /// <param name="clock">The clock of the retry deadline; the system clock when null.</param>
    public StoreRetry(Func<Exception, bool> isTransient, TimeSpan retryFor, string display, Action? beforeRetry, ILogger? log, TimeProvider? clock)
    {
        _isTransient = isTransient;
        _retryFor = retryFor;
        _display = display;
        _beforeRetry = beforeRetry;
        _log = log ?? NullLogger.Instance;
        _clock = clock ?? TimeProvider.System;
    }

    /// <summary>The retry of a PostgreSQL store: its transient errors (<see cref="IsTransient"/>) for <see cref="RetryFor"/>, clearing the pool between attempts.</summary>
    public static StoreRetry ForPostgreSql(StoreLocation location, ILogger? log = null, TimeProvider? clock = null) =>
        new(IsTransient, RetryFor, location.Display, () => StoreConnection.DataSource(location.Target).Clear(), log, clock);

    /// <summary>
    /// Errors that say the server is away or the connection broke, not that our SQL is wrong: connection failures,
    /// Npgsql's transient errors, and PostgreSQL's shutdown, crash-recovery and connection SQLSTATE classes 08 and 57P.
    /// </summary>
    public static bool IsTransient(Exception e) => e switch
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

    /// <summary>Runs <paramref name="call"/>, again with backoff (0.25 s doubling to 10 s) while it fails transiently and time is left.</summary>
    public T Run<T>(Func<T> call)
    {
        if (_retryFor <= TimeSpan.Zero) return call();
        var delay = TimeSpan.FromMilliseconds(250);
        var started = _clock.GetTimestamp();
        for (var attempt = 1; ; attempt++)
        {
            try
            {
                var result = call();
                if (attempt > 1) _log.LogInformation("the PostgreSQL store {Store} is back after {Attempts} attempts", _display, attempt);
                return result;
            }
            catch (Exception e) when (_isTransient(e) && _clock.GetElapsedTime(started) + delay < _retryFor)
            {
                _log.LogWarning("the PostgreSQL store {Store} is away ({Problem}); retry {Attempt} in {Delay:F1} s",
                    _display, Innermost(e).Message, attempt, delay.TotalSeconds);
                _beforeRetry?.Invoke();
                Thread.Sleep(delay);
                delay = TimeSpan.FromTicks(Math.Min(delay.Ticks * 2, TimeSpan.FromSeconds(10).Ticks));
            }
        }
    }

    public void Run(Action call) => Run(() => { call(); return 0; });
}

/// <summary>
/// A decorator of the worker's ports that retries each call while the store's server is away (<see cref="StoreRetry"/>);
/// every call is idempotent, so a retry after an unknown commit outcome is harmless. Taking pending work is not retried:
/// if the server went away after committing, a retry would take a second set and leave the first queued with no job
/// until the stale-queue sweep; the planner simply tries again at its next round. Thread-safe when the inner ports are.
/// </summary>
public sealed class RetryingWorkPorts(StoreWorkPorts inner, StoreRetry retry) : IWorkSource, IOutcomeSink, IWorkerRegistry, IRecovery
{
    public int Recover() => retry.Run(inner.Recover);

    public int RecoverShared(TimeSpan deadAfter, TimeSpan queuedStaleAfter) => retry.Run(() => inner.RecoverShared(deadAfter, queuedStaleAfter));

    public int ReleaseClaimsOf(string worker) => retry.Run(() => inner.ReleaseClaimsOf(worker));

    public int EnsureResultRows() => retry.Run(inner.EnsureResultRows);

    // A chunk is claimed in the transaction that adds it: a retry after a commit whose answer was lost finds nothing to add.
    public int GrowOpenFamilies() => retry.Run(inner.GrowOpenFamilies);

    public PlannedWork TakePending(IReadOnlyList<WorkStage> stages, int max, Action<WorkStage, IReadOnlyList<long>>? beforeCommit = null) =>
        inner.TakePending(stages, max, beforeCommit);

    public IReadOnlyList<CandidateWork> Claim(IReadOnlyList<long> ids, string worker) => retry.Run(() => inner.Claim(ids, worker));

    public void Save(IReadOnlyList<CandidateOutcome> outcomes, string worker) => retry.Run(() => inner.Save(outcomes, worker));

    public void Release(IReadOnlyList<long> ids) => retry.Run(() => inner.Release(ids));

    public StateCounts Counts() => retry.Run(inner.Counts);

    public void RegisterWorker(string name, int threads) => retry.Run(() => inner.RegisterWorker(name, threads));

    public void Heartbeat(string name, long chunksDone, long candidatesDone, bool stopped = false, InFlightCandidate? longest = null) =>
        retry.Run(() => inner.Heartbeat(name, chunksDone, candidatesDone, stopped, longest));

    public int LiveThreads(TimeSpan deadAfter) => retry.Run(() => inner.LiveThreads(deadAfter));
}
