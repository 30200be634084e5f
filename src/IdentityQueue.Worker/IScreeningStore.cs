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
    /// stage 2: the rest) and marks them queued, atomically. Empty when nothing is pending.
    /// </summary>
    PlannedWork TakePending(int max);

    /// <summary>Marks the given candidates as being screened by <paramref name="worker"/> and loads them; settled ones are skipped.</summary>
    IReadOnlyList<CandidateWork> Claim(IReadOnlyList<long> ids, string worker);

    /// <summary>Stores outcomes (trials and result rows) in one transaction; trials already stored are kept as they are.</summary>
    void Save(IReadOnlyList<CandidateOutcome> outcomes, string worker);

    /// <summary>Returns claimed candidates to pending (a graceful stop).</summary>
    void Release(IReadOnlyList<long> ids);

    /// <summary>Counts of candidates by state.</summary>
    StateCounts Counts();
}

/// <summary>Candidates taken for one stage.</summary>
public sealed record PlannedWork(int Stage, IReadOnlyList<long> Ids);

/// <summary>A claimed candidate, ready to screen: its identity (or why the stored text does not parse), its trials so far.</summary>
public sealed record CandidateWork(
    long Id,
    ulong Seed,
    int TargetBits,
    IdentityEntry? Entry,
    IReadOnlyDictionary<string, BigInteger> Parameters,
    string? Problem,
    IReadOnlyList<TrialRecord> Trials);

/// <summary>What became of one candidate: a screen result (possibly pending, for the next stage), or invalid, or failed.</summary>
public sealed record CandidateOutcome(long Id, ScreenResult? Result, string? Invalid, string? Failed);

/// <summary>Candidates per state.</summary>
public sealed record StateCounts(long Pending, long Queued, long Screening, long Refuted, long Survived, long Undecided, long Invalid, long Failed)
{
    public long Total => Pending + Queued + Screening + Settled;
    public long Settled => Refuted + Survived + Undecided + Invalid + Failed;
    public long InFlight => Queued + Screening;
}
