using System.Diagnostics.CodeAnalysis;

namespace IdentityQueue.Store.Schema;

/// <summary>The state of a candidate's <c>result</c> row (SPEC §4), in display order: the ones in flight, then the final ones.</summary>
public enum ResultState
{
    Pending,
    Queued,
    Screening,
    Refuted,
    Survived,
    Undecided,
    Invalid,
    Failed,
}

/// <summary>
/// The one mapping between <see cref="ResultState"/> and the text stored in <c>result.state</c> (public SQL names of
/// SPEC §4, never renamed). The constants are the stored texts, for SQL written beside EF; code that holds a state uses
/// the enum.
/// </summary>
public static class ResultStates
{
    public const string Pending = "pending";
    public const string Queued = "queued";
    public const string Screening = "screening";
    public const string Refuted = "refuted";
    public const string Survived = "survived";
    public const string Undecided = "undecided";
    public const string Invalid = "invalid";
    public const string Failed = "failed";

    /// <summary>Every state, in display order.</summary>
    public static readonly IReadOnlyList<ResultState> Values = Enum.GetValues<ResultState>();

    /// <summary>Every stored text, in display order.</summary>
    public static readonly IReadOnlyList<string> All = [.. Values.Select(Text)];

    /// <summary>The final states, in which no screening is waiting or running.</summary>
    public static readonly IReadOnlyList<ResultState> Final = [.. Values.Where(IsFinal)];

    /// <summary>The text stored in <c>result.state</c>.</summary>
    public static string Text(this ResultState state) => state switch
    {
        ResultState.Pending => Pending,
        ResultState.Queued => Queued,
        ResultState.Screening => Screening,
        ResultState.Refuted => Refuted,
        ResultState.Survived => Survived,
        ResultState.Undecided => Undecided,
        ResultState.Invalid => Invalid,
        ResultState.Failed => Failed,
        _ => throw new ArgumentOutOfRangeException(nameof(state), state, "not a result state"),
    };

    /// <summary>The state a stored text names; false for any other text (exact, lower case, as stored).</summary>
    public static bool TryParse([NotNullWhen(true)] string? text, out ResultState state)
    {
        foreach (var s in Values)
            if (Text(s) == text)
            {
                state = s;
                return true;
            }
        state = default;
        return false;
    }

    /// <summary>The state of a stored text; the store's check constraint admits no other.</summary>
    public static ResultState Parse(string text) =>
        TryParse(text, out var state) ? state : throw new FormatException($"'{text}' is not a result state ({string.Join(", ", All)})");

    /// <summary>States in which no screening is waiting or running.</summary>
    public static bool IsFinal(this ResultState state) => state is ResultState.Refuted or ResultState.Survived or ResultState.Undecided
        or ResultState.Invalid or ResultState.Failed;

    /// <summary>States in which no screening is waiting or running (a stored text).</summary>
    public static bool IsFinal(string state) => TryParse(state, out var s) && s.IsFinal();
}

/// <summary>The values of <c>trial.outcome</c>.</summary>
public static class TrialOutcomes
{
    public const string Zero = "zero";
    public const string Nonzero = "nonzero";
    public const string Undefined = "undefined";
}
