namespace IdentityQueue.Screening.Counterexamples;

/// <summary>
/// How much a counterexample search may spend on one refuted candidate (issue #15, point 1). Immutable; validated by
/// <see cref="CounterexampleSearch.Find"/>.
/// </summary>
public sealed record CounterexampleBudget
{
    public static readonly CounterexampleBudget Default = new();

    /// <summary>
    /// Points evaluated in the exhaustive stage, in the search order (shells of growing max-norm). The first nonzero found
    /// there is the least counterexample; the cumulative box (2m + 1)^n of a small identity fits it whole.
    /// </summary>
    public int MaxBoxPoints { get; init; } = 20_000;

    /// <summary>Random lines through small points tried after the exhaustive stage (attempts, found or not).</summary>
    public int MaxLines { get; init; } = 64;

    /// <summary>Points evaluated on each line (t = 1, −1, 2, −2, …).</summary>
    public int PointsPerLine { get; init; } = 24;

    /// <summary>Points evaluated while shrinking the best point found on a line coordinate by coordinate.</summary>
    public int MaxShrinkPoints { get; init; } = 2_000;

    /// <summary>
    /// Total work: the estimated bits held by the registers of every exact evaluation
    /// (<c>BoundAnalysis.ExactEvaluationBits</c> over Q; instructions × bits of p over GF(p)), summed over the points.
    /// </summary>
    public double MaxEvaluationBits { get; init; } = 1L << 31;

    /// <summary>A point whose exact evaluation is estimated above this many bits is not evaluated.</summary>
    public double MaxPointBits { get; init; } = 1 << 24;

    internal void Validate()
    {
        if (MaxBoxPoints < 1) throw new ArgumentOutOfRangeException(nameof(MaxBoxPoints), MaxBoxPoints, "must be at least 1");
        if (MaxLines < 0) throw new ArgumentOutOfRangeException(nameof(MaxLines), MaxLines, "must not be negative");
        if (PointsPerLine < 1) throw new ArgumentOutOfRangeException(nameof(PointsPerLine), PointsPerLine, "must be at least 1");
        if (MaxShrinkPoints < 0) throw new ArgumentOutOfRangeException(nameof(MaxShrinkPoints), MaxShrinkPoints, "must not be negative");
        if (!(MaxEvaluationBits > 0)) throw new ArgumentOutOfRangeException(nameof(MaxEvaluationBits), MaxEvaluationBits, "must be positive");
        if (!(MaxPointBits > 0)) throw new ArgumentOutOfRangeException(nameof(MaxPointBits), MaxPointBits, "must be positive");
    }
}
