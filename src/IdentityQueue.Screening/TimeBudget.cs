using IdentityQueue.Algebra;

namespace IdentityQueue.Screening;

/// <summary>
/// The time one candidate's screening may take (<c>TimePerCandidate</c>; default 60 s; <c>--time-per-candidate SECONDS</c>
/// on <c>check</c>, <c>run</c> and <c>worker</c>). Validated once, where it enters (<see cref="Create"/>); a trial that
/// would not fit is not started, and a trial running when it runs out is cancelled inside its kernels. Immutable.
/// </summary>
public readonly record struct TimeBudget
{
    /// <summary>The default budget: 60 s per candidate.</summary>
    public static readonly TimeBudget Default = new(TimeSpan.FromSeconds(60));

    /// <summary>The smallest budget accepted: less would cancel ordinary candidates in the middle of their first block.</summary>
    public static readonly TimeSpan Min = TimeSpan.FromMilliseconds(100);

    /// <summary>The largest budget accepted (a week): beyond that a candidate is a project of its own.</summary>
    public static readonly TimeSpan Max = TimeSpan.FromDays(7);

    private readonly TimeSpan _perCandidate;

    private TimeBudget(TimeSpan perCandidate) => _perCandidate = perCandidate;

    /// <summary>Wall-clock time allowed to one candidate's screening (<c>TimePerCandidate</c>).</summary>
    public TimeSpan PerCandidate => _perCandidate == TimeSpan.Zero ? Default._perCandidate : _perCandidate;

    /// <summary>A budget of <paramref name="seconds"/> per candidate, or the problem with it (for the option's error message).</summary>
    public static Result<TimeBudget> Create(double seconds) =>
        double.IsNaN(seconds) || seconds < Min.TotalSeconds || seconds > Max.TotalSeconds
            ? Result<TimeBudget>.Fail($"--time-per-candidate must be between {Min.TotalSeconds} and {Max.TotalSeconds:F0} seconds, got {seconds}")
            : Result<TimeBudget>.Ok(new TimeBudget(TimeSpan.FromSeconds(seconds)));

    /// <summary>The budget as the messages name it: "60 s".</summary>
    public override string ToString() => $"{PerCandidate.TotalSeconds:0.###} s";
}
