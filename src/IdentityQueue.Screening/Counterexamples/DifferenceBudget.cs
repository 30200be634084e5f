namespace IdentityQueue.Screening.Counterexamples;

/// <summary>How much recovering a refuted candidate's difference may spend (issue #15, point 2). Immutable; validated by <see cref="DifferenceRecovery.Recover"/>.</summary>
public sealed record DifferenceBudget
{
    public static readonly DifferenceBudget Default = new();

    /// <summary>
    /// Most terms recovered; beyond, only the total degree along a random line and a lower bound on the number of terms
    /// are given.
    /// </summary>
    public int MaxTerms { get; init; } = 500;

    /// <summary>Highest degree interpolated in one variable (or along the random line).</summary>
    public int MaxDegree { get; init; } = 1_000;

    /// <summary>Consecutive values that must agree with a univariate interpolant before it is taken (early termination).</summary>
    public int EarlyTermination { get; init; } = 3;

    /// <summary>Most 62-bit primes used for an identity over Q (their product bounds the coefficients recovered).</summary>
    public int MaxPrimes { get; init; } = 16;

    /// <summary>Fresh random points, over a fresh prime, at which the recovered difference must match before it is reported.</summary>
    public int VerifyPoints { get; init; } = 4;

    /// <summary>Most evaluations of the program, over all primes (each costs the program's length).</summary>
    public long MaxEvaluations { get; init; } = 400_000;

    internal void Validate()
    {
        if (MaxTerms < 1) throw new ArgumentOutOfRangeException(nameof(MaxTerms), MaxTerms, "must be at least 1");
        if (MaxDegree < 1) throw new ArgumentOutOfRangeException(nameof(MaxDegree), MaxDegree, "must be at least 1");
        if (EarlyTermination < 1) throw new ArgumentOutOfRangeException(nameof(EarlyTermination), EarlyTermination, "must be at least 1");
        if (MaxPrimes < 1) throw new ArgumentOutOfRangeException(nameof(MaxPrimes), MaxPrimes, "must be at least 1");
        if (VerifyPoints < 1) throw new ArgumentOutOfRangeException(nameof(VerifyPoints), VerifyPoints, "must be at least 1");
        if (MaxEvaluations < 1) throw new ArgumentOutOfRangeException(nameof(MaxEvaluations), MaxEvaluations, "must be at least 1");
    }
}
