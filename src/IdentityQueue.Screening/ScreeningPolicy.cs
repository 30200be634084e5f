using IdentityQueue.Algebra;

namespace IdentityQueue.Screening;

/// <summary>
/// The screening policy in one place: how many trials and how much exact work a candidate may take, and what the
/// worker's stages are. The algebra knows none of it (its <see cref="Limits"/> guard input sizes only); budgets of time
/// are <see cref="TimeBudget"/>, the evidence wanted is <see cref="EvidenceTarget"/>. Immutable.
/// </summary>
public sealed record ScreeningPolicy
{
    public static readonly ScreeningPolicy Default = new();

    /// <summary>Most trials for one candidate (including resampled undefined points).</summary>
    public int MaxTrials { get; init; } = 200;

    /// <summary>A trial must buy at least this many bits of evidence, or a larger field is used (the ladder's rule).</summary>
    public int MinBitsPerTrial { get; init; } = 16;

    /// <summary>Undefined points in a row after which the candidate is undecided.</summary>
    public int MaxConsecutiveUndefined { get; init; } = 24;

    /// <summary>Largest estimated size, in bits, of an exact rational evaluation used to certify a refutation (or decide a constant identity).</summary>
    public long MaxCertifyBits { get; init; } = 1 << 22;

    /// <summary>
    /// After a refutation, look for the smallest integer counterexample and recover the difference
    /// (<see cref="Counterexamples.RefutationDetails"/>); off, a refutation keeps only its witness.
    /// </summary>
    public bool RefutationDetails { get; init; } = true;

    /// <summary>Most time those two searches may take together for one refuted candidate (within its <see cref="TimeBudget"/>).</summary>
    public TimeSpan RefutationDetailTime { get; init; } = TimeSpan.FromSeconds(2);

    /// <summary>The counterexample search's budget (points in the exhaustive box, lines, exact-evaluation size).</summary>
    public Counterexamples.CounterexampleBudget CounterexampleBudget { get; init; } = Counterexamples.CounterexampleBudget.Default;

    /// <summary>The difference recovery's budget (terms written out, degrees, primes).</summary>
    public Counterexamples.DifferenceBudget DifferenceBudget { get; init; } = Counterexamples.DifferenceBudget.Default;

    /// <summary>
    /// The worker's stages, in the order they are planned: every candidate's first stage (no zero trial stored yet: its
    /// trials on the cheapest rung) before any candidate's rest, so that a partial run holds nearly all refutations.
    /// </summary>
    public IReadOnlyList<WorkStage> Stages { get; } = [WorkStage.FirstTrial, WorkStage.Rest];

    /// <summary>The stage of a given number (as a queued job carries it).</summary>
    public WorkStage Stage(int number)
    {
        foreach (var s in Stages)
            if (s.Number == number) return s;
        throw new ArgumentOutOfRangeException(nameof(number), number, "no such stage");
    }

    /// <summary>
    /// How many new stages of trials (<see cref="ScreeningOptions.MaxNewStages"/>) one job runs for a candidate of
    /// <paramref name="stage"/>: in two passes, a first-stage candidate gets one (its cheap stage) and comes back later; else
    /// a candidate goes on to its final state.
    /// </summary>
    public static int? NewStagesFor(WorkStage stage, bool twoPass) => twoPass && stage == WorkStage.FirstTrial ? 1 : null;
}

/// <summary>
/// A stage of the worker's plan: the pending candidates whose stored count of zero trials lies in
/// [<see cref="MinZeroTrials"/>, <see cref="MaxZeroTrials"/>] (no upper end when null). The store keeps the count
/// (<c>result.trials_zero</c>) and selects by this range; it does not define stages itself.
/// </summary>
public readonly record struct WorkStage(int Number, int MinZeroTrials, int? MaxZeroTrials)
{
    /// <summary>Stage 1: no zero trial yet (a fresh candidate, or one whose trials were all undefined).</summary>
    public static readonly WorkStage FirstTrial = new(1, 0, 0);

    /// <summary>Stage 2: the rest, up to the evidence target.</summary>
    public static readonly WorkStage Rest = new(2, 1, null);

    /// <summary>Whether a candidate with <paramref name="zeroTrials"/> zero trials is in this stage.</summary>
    public bool Contains(int zeroTrials) => zeroTrials >= MinZeroTrials && (MaxZeroTrials is not int max || zeroTrials <= max);

    public override string ToString() => Number.ToString(System.Globalization.CultureInfo.InvariantCulture);
}
