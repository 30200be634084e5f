namespace IdentityQueue.Screening.Ports;

// The worker's ports onto a results store. Screening defines them; the store implements them (IdentityQueue.Store.Work)
// and the worker consumes them (IdentityQueue.Worker); the command line wires one to the other. Every member is
// idempotent where a job may run twice: claims skip settled candidates and saves skip trials already stored.

/// <summary>Where work comes from: pending candidates taken stage by stage, claimed, loaded, and released.</summary>
public interface IWorkSource
{
    /// <summary>Counts of candidates by state.</summary>
    StateCounts Counts();

    /// <summary>Creates a pending result row for every candidate that lacks one (rows inserted by hand with SQL).</summary>
    int EnsureResultRows();

    /// <summary>
    /// Adds the next chunk of instances (pending) to every open-ended family (<c>for n &gt;= A</c>) whose instances are all
    /// final with none refuted, until its open family budget; returns how many were added. Safe when several processes
    /// call it at once: a chunk is added once.
    /// </summary>
    int GrowOpenFamilies();

    /// <summary>
    /// Takes up to <paramref name="max"/> pending candidates of the earliest of <paramref name="stages"/> that has any and
    /// marks them queued, atomically; empty when nothing is pending. <paramref name="beforeCommit"/> runs before the rows
    /// are committed as queued; if it throws (or the process dies first) they stay pending.
    /// </summary>
    PlannedWork TakePending(IReadOnlyList<WorkStage> stages, int max, Action<WorkStage, IReadOnlyList<long>>? beforeCommit = null);

    /// <summary>
    /// Marks the given candidates as being screened by <paramref name="worker"/> and loads them; settled ones are skipped.
    /// A family's stored entry is parsed once per call, not once per instance.
    /// </summary>
    IReadOnlyList<CandidateWork> Claim(IReadOnlyList<long> ids, string worker);

    /// <summary>Returns claimed candidates to pending (a graceful stop).</summary>
    void Release(IReadOnlyList<long> ids);
}

/// <summary>Where outcomes go.</summary>
public interface IOutcomeSink
{
    /// <summary>Stores outcomes (trials and result rows) in one transaction; trials already stored are kept as they are.</summary>
    void Save(IReadOnlyList<CandidateOutcome> outcomes, string worker);
}

/// <summary>The store's table of worker processes: registration, heartbeats with counters, and who is alive.</summary>
public interface IWorkerRegistry
{
    /// <summary>Registers this worker process (host:pid and thread count).</summary>
    void RegisterWorker(string name, int threads);

    /// <summary>
    /// Beats the worker's heartbeat with its counters and the candidate it has been on the longest (null when idle); with
    /// <paramref name="stopped"/>, signs it off.
    /// </summary>
    void Heartbeat(string name, long chunksDone, long candidatesDone, bool stopped = false, InFlightCandidate? longest = null);

    /// <summary>Worker threads of all live worker processes on the store (at least this one's once registered).</summary>
    int LiveThreads(TimeSpan deadAfter);
}

/// <summary>Returning the work of processes that are gone (or stopping) to pending.</summary>
public interface IRecovery
{
    /// <summary>Start-up recovery for a store that this process holds alone: creates missing result rows, and returns
    /// candidates claimed by a dead process (queued or screening) to pending. Returns how many were returned.</summary>
    int Recover();

    /// <summary>
    /// Recovery for a store shared by several worker processes: returns to pending only the work of workers whose
    /// heartbeat is older than <paramref name="deadAfter"/>, and candidates queued longer than
    /// <paramref name="queuedStaleAfter"/> (orphans of a planner that died). Returns how many were returned.
    /// </summary>
    int RecoverShared(TimeSpan deadAfter, TimeSpan queuedStaleAfter);

    /// <summary>Returns what <paramref name="worker"/> still has claimed to pending (it is stopping).</summary>
    int ReleaseClaimsOf(string worker);
}
