using IdentityQueue.Algebra;
using IdentityQueue.Screening;
using IdentityQueue.Screening.Ports;

namespace IdentityQueue.Store.Work;

/// <summary>
/// The worker's ports (<see cref="IWorkSource"/>, <see cref="IOutcomeSink"/>, <see cref="IWorkerRegistry"/>,
/// <see cref="IRecovery"/>) on a store, SQLite or PostgreSQL. Each call opens its own connection (cheap: a SQLite file
/// handle, or a pooled PostgreSQL connection), since connections are not thread-safe and the worker runs jobs on several
/// threads. No retries here: <see cref="RetryingWorkPorts"/> wraps these for a server that may be away. Thread-safe.
/// </summary>
public sealed class StoreWorkPorts(StoreLocation location, Limits limits) : IWorkSource, IOutcomeSink, IWorkerRegistry, IRecovery
{
    public StoreLocation Location => location;

    private T With<T>(Func<StoreConnection, T> action)
    {
        using var c = StoreConnection.Open(location);
        return action(c);
    }

    private void With(Action<StoreConnection> action)
    {
        using var c = StoreConnection.Open(location);
        action(c);
    }

    /// <summary>
    /// The ports for <paramref name="location"/>: on PostgreSQL wrapped in <see cref="RetryingWorkPorts"/> (the server may
    /// restart under a running worker), on SQLite as they are (the file does not go away).
    /// </summary>
    public static RetryingWorkPorts ForWorker(StoreLocation location, Limits limits, Microsoft.Extensions.Logging.ILogger? log = null,
        TimeProvider? clock = null) =>
        new(new StoreWorkPorts(location, limits), location.IsPostgreSql ? StoreRetry.ForPostgreSql(location, log, clock) : StoreRetry.None);

    public int Recover() => With(c => new WorkQueue(c).Recover());

    public int RecoverShared(TimeSpan deadAfter, TimeSpan queuedStaleAfter) => With(c => new WorkQueue(c).RecoverShared(deadAfter, queuedStaleAfter));

    public int ReleaseClaimsOf(string worker) => With(c => new WorkQueue(c).ReleaseClaimsOf(worker));

    public int EnsureResultRows() => With(c => new CandidateStore(c).EnsureResultRows());

    public int GrowOpenFamilies() => With(c => new OpenFamilies(c).Grow());

    public PlannedWork TakePending(IReadOnlyList<WorkStage> stages, int max, Action<WorkStage, IReadOnlyList<long>>? beforeCommit = null) => With(c =>
    {
        var (stage, ids) = new WorkQueue(c).TakePending(stages, max, beforeCommit);
        return new PlannedWork(stage, [.. ids]);
    });

    public IReadOnlyList<CandidateWork> Claim(IReadOnlyList<long> ids, string worker) => With(c =>
    {
        var sides = new StoredSides(); // one parse per family in this chunk
        return (IReadOnlyList<CandidateWork>)new WorkQueue(c).Claim(ids, worker).Select(claimed =>
        {
            var s = claimed.Candidate;
            var bound = s.Bind(limits, sides);
            return new CandidateWork(s.Id, s.Seed.Value, s.TrialKey(bound), s.Target, bound.Entry, bound.Parameters, bound.Error, claimed.Trials, s.Label);
        }).ToList();
    });

    public void Save(IReadOnlyList<CandidateOutcome> outcomes, string worker)
    {
        if (outcomes.Count == 0) return;
        With(c => new CandidateStore(c).Save(outcomes, worker));
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
        return new StateCounts(Of(Schema.ResultStates.Pending), Of(Schema.ResultStates.Queued), Of(Schema.ResultStates.Screening),
            Of(Schema.ResultStates.Refuted), Of(Schema.ResultStates.Survived), Of(Schema.ResultStates.Undecided),
            Of(Schema.ResultStates.Invalid), Of(Schema.ResultStates.Failed));
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
