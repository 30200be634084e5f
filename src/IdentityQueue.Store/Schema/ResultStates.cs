namespace IdentityQueue.Store.Schema;

/// <summary>The values of <c>result.state</c> (SPEC §4).</summary>
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

    public static readonly IReadOnlyList<string> All = [Pending, Queued, Screening, Refuted, Survived, Undecided, Invalid, Failed];

    /// <summary>States in which no screening is waiting or running.</summary>
    public static bool IsFinal(string state) => state is Refuted or Survived or Undecided or Invalid or Failed;
}

/// <summary>The values of <c>trial.outcome</c>.</summary>
public static class TrialOutcomes
{
    public const string Zero = "zero";
    public const string Nonzero = "nonzero";
    public const string Undefined = "undefined";
}
