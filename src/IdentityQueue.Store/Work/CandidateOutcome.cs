using IdentityQueue.Screening;
using IdentityQueue.Store.Schema;

namespace IdentityQueue.Store.Work;

/// <summary>What a worker found for one candidate: a screen result, or why it could not be screened. Immutable.</summary>
public sealed record CandidateOutcome
{
    private CandidateOutcome(long candidateId, ScreenResult? screen, string state, string? message)
    {
        CandidateId = candidateId;
        Screen = screen;
        State = state;
        Message = message;
    }

    public long CandidateId { get; }

    /// <summary>The screen result; null for an invalid or failed candidate.</summary>
    public ScreenResult? Screen { get; }

    /// <summary>The <c>result.state</c> this outcome writes.</summary>
    public string State { get; }

    public string? Message { get; }

    public static CandidateOutcome Screened(long candidateId, ScreenResult result) =>
        new(candidateId, result, StateOf(result.Verdict), result.Message);

    /// <summary>The stored text does not parse or compile (or a limit refused it): <c>invalid</c>, with the reason.</summary>
    public static CandidateOutcome Invalid(long candidateId, string message) => new(candidateId, null, ResultStates.Invalid, message);

    /// <summary>Screening threw: <c>failed</c>, with what went wrong.</summary>
    public static CandidateOutcome Failed(long candidateId, string message) => new(candidateId, null, ResultStates.Failed, message);

    public static string StateOf(Verdict verdict) => verdict switch
    {
        Verdict.Survived => ResultStates.Survived,
        Verdict.Refuted => ResultStates.Refuted,
        Verdict.Undecided => ResultStates.Undecided,
        Verdict.Pending => ResultStates.Pending,
        _ => ResultStates.Invalid,
    };
}
