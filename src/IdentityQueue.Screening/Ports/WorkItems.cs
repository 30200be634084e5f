using System.Collections.Immutable;
using System.Diagnostics.CodeAnalysis;
using System.Numerics;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Screening.Ports;

/// <summary>A candidate being screened now: its id, its label, and since when (UTC).</summary>
public sealed record InFlightCandidate(long Id, string? Label, DateTime Since);

/// <summary>Candidates taken for one stage (<see cref="ScreeningPolicy.Stages"/>), lowest id first.</summary>
public sealed record PlannedWork(WorkStage Stage, ImmutableArray<long> Ids)
{
    public static PlannedWork None => new(WorkStage.FirstTrial, []);

    public bool Equals(PlannedWork? other) => other is not null && Stage == other.Stage && Ids.SequenceEqual(other.Ids);

    public override int GetHashCode() => HashCode.Combine(Stage, Ids.Length);
}

/// <summary>
/// A claimed candidate, ready to screen: its identity (or why the stored text does not parse), its trials so far. The
/// <see cref="Entry"/> of instances of one family is one shared object (parsed once per claim).
/// </summary>
public sealed record CandidateWork(
    long Id,
    ulong Seed,
    ulong Key,
    EvidenceTarget Target,
    IdentityEntry? Entry,
    IReadOnlyDictionary<string, BigInteger> Parameters,
    string? Problem,
    IReadOnlyList<TrialRecord> Trials,
    string? Label = null);

/// <summary>What became of a candidate: screened (with a result), invalid, or failed.</summary>
public enum OutcomeKind
{
    /// <summary>Screened: the <see cref="ScreenResult"/> says how (possibly pending, for the next stage).</summary>
    Screened,
    /// <summary>The stored text does not parse or compile (or a limit refused it).</summary>
    Invalid,
    /// <summary>Screening threw: what went wrong.</summary>
    Failed,
}

/// <summary>
/// What a worker found for one candidate: a screen result, or why it could not be screened. The one outcome type of the
/// worker and the store. Immutable.
/// </summary>
public sealed record CandidateOutcome
{
    private CandidateOutcome(long candidateId, OutcomeKind kind, ScreenResult? screen, string? message)
    {
        CandidateId = candidateId;
        Kind = kind;
        Screen = screen;
        Message = message;
    }

    public long CandidateId { get; }

    public OutcomeKind Kind { get; }

    /// <summary>The screen result; null for an invalid or failed candidate.</summary>
    public ScreenResult? Screen { get; }

    /// <summary>The screen's message, or why the candidate is invalid or failed.</summary>
    public string? Message { get; }

    /// <summary>For a refuted candidate: its smallest counterexample and recovered difference, when they were looked for and found.</summary>
    public Counterexamples.RefutationDetails? Details { get; init; }

    [MemberNotNullWhen(true, nameof(Screen))]
    public bool IsScreened => Kind == OutcomeKind.Screened;

    public static CandidateOutcome Screened(long candidateId, ScreenResult result) => new(candidateId, OutcomeKind.Screened, result, result.Message);

    /// <summary>The stored text does not parse or compile (or a limit refused it): <c>invalid</c>, with the reason.</summary>
    public static CandidateOutcome Invalid(long candidateId, string message) => new(candidateId, OutcomeKind.Invalid, null, message);

    /// <summary>Screening threw: <c>failed</c>, with what went wrong.</summary>
    public static CandidateOutcome Failed(long candidateId, string message) => new(candidateId, OutcomeKind.Failed, null, message);
}

/// <summary>Candidates per state.</summary>
public sealed record StateCounts(long Pending, long Queued, long Screening, long Refuted, long Survived, long Undecided, long Invalid, long Failed)
{
    public long Total => Pending + Queued + Screening + Settled;
    public long Settled => Refuted + Survived + Undecided + Invalid + Failed;
    public long InFlight => Queued + Screening;
}
