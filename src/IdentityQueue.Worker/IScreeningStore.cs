using System.Numerics;
using IdentityQueue.Algebra.Syntax;
using IdentityQueue.Screening;

namespace IdentityQueue.Worker;

/// <summary>
/// What the workers need from a results store (the port; the store project provides the implementation, wired by the
/// command line). Every method is idempotent where a job may run twice: claims skip settled candidates and saves skip
/// trials already stored.
/// </summary>
public interface IScreeningStore
{
    /// <summary>Start-up recovery for a store that this process holds alone: creates missing result rows, and returns
    /// candidates claimed by a dead process (queued or screening) to pending. Returns how many were returned.</summary>
    int Recover();

    /// <summary>Creates a pending result row for every candidate that lacks one (rows inserted by hand with SQL).</summary>
    int EnsureResultRows();

    /// <summary>
    /// Takes up to <paramref name="max"/> pending candidates of the earliest stage that has any (stage 1: no zero trial yet;
    /// stage 2: the rest) and marks them queued, atomically. Empty when nothing is pending. <paramref name="beforeCommit"/>
    /// runs before the rows are committed as queued; if it throws (or the process dies first) they stay pending.
    /// </summary>
    PlannedWork TakePending(int max, Action<int, IReadOnlyList<long>>? beforeCommit = null);

    /// <summary>Marks the given candidates as being screened by <paramref name="worker"/> and loads them; settled ones are skipped.</summary>
    IReadOnlyList<CandidateWork> Claim(IReadOnlyList<long> ids, string worker);

    /// <summary>Stores outcomes (trials and result rows) in one transaction; trials already stored are kept as they are.</summary>
    void Save(IReadOnlyList<CandidateOutcome> outcomes, string worker);

    /// <summary>Returns claimed candidates to pending (a graceful stop).</summary>
    void Release(IReadOnlyList<long> ids);

    /// <summary>Counts of candidates by state.</summary>
    StateCounts Counts();

    /// <summary>
    /// Recovery for a store shared by several worker processes: returns to pending only the work of workers whose
    /// heartbeat is older than <paramref name="deadAfter"/>, and candidates queued longer than
    /// <paramref name="queuedStaleAfter"/> (orphans of a planner that died). Returns how many were returned.
    /// </summary>
    int RecoverShared(TimeSpan deadAfter, TimeSpan queuedStaleAfter);

    /// <summary>Returns what <paramref name="worker"/> still has claimed to pending (it is stopping).</summary>
    int ReleaseClaimsOf(string worker);

    /// <summary>Registers this worker process (host:pid and thread count) in the store's worker table.</summary>
    void RegisterWorker(string name, int threads);

    /// <summary>
    /// Beats the worker's heartbeat with its counters and the candidate it has been on the longest (null when idle); with
    /// <paramref name="stopped"/>, signs it off.
    /// </summary>
    void Heartbeat(string name, long chunksDone, long candidatesDone, bool stopped = false, InFlightCandidate? longest = null);

    /// <summary>Worker threads of all live worker processes on the store (at least this one's once registered).</summary>
    int LiveThreads(TimeSpan deadAfter);
}

/// <summary>A candidate being screened now: its id, its label, and since when (UTC).</summary>
public sealed record InFlightCandidate(long Id, string? Label, DateTime Since);

/// <summary>What this process has done, and what it is screening now, for its heartbeat and progress line. Thread-safe.</summary>
public sealed class WorkerStats
{
    private long _chunks, _candidates;
    private readonly System.Collections.Concurrent.ConcurrentDictionary<long, InFlightCandidate> _screening = new();

    /// <summary>A job thread starts screening a candidate.</summary>
    public void Begin(long id, string? label) => _screening[id] = new InFlightCandidate(id, label, DateTime.UtcNow);

    /// <summary>It has finished (or stopped) screening it.</summary>
    public void End(long id) => _screening.TryRemove(id, out _);

    /// <summary>The candidate screened the longest now, or null when none is.</summary>
    public InFlightCandidate? Longest()
    {
        InFlightCandidate? longest = null;
        foreach (var c in _screening.Values)
            if (longest is null || c.Since < longest.Since) longest = c;
        return longest;
    }

    public long ChunksDone => Interlocked.Read(ref _chunks);

    public long CandidatesDone => Interlocked.Read(ref _candidates);

    public void ChunkDone(int candidates)
    {
        Interlocked.Increment(ref _chunks);
        Interlocked.Add(ref _candidates, candidates);
    }
}

/// <summary>Candidates taken for one stage.</summary>
public sealed record PlannedWork(int Stage, IReadOnlyList<long> Ids);

/// <summary>A claimed candidate, ready to screen: its identity (or why the stored text does not parse), its trials so far.</summary>
public sealed record CandidateWork(
    long Id,
    ulong Seed,
    ulong Key,
    int TargetBits,
    IdentityEntry? Entry,
    IReadOnlyDictionary<string, BigInteger> Parameters,
    string? Problem,
    IReadOnlyList<TrialRecord> Trials,
    string? Label = null);

/// <summary>What became of one candidate: a screen result (possibly pending, for the next stage), or invalid, or failed.</summary>
public sealed record CandidateOutcome(long Id, ScreenResult? Result, string? Invalid, string? Failed);

/// <summary>Candidates per state.</summary>
public sealed record StateCounts(long Pending, long Queued, long Screening, long Refuted, long Survived, long Undecided, long Invalid, long Failed)
{
    public long Total => Pending + Queued + Screening + Settled;
    public long Settled => Refuted + Survived + Undecided + Invalid + Failed;
    public long InFlight => Queued + Screening;
}
