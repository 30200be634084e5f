using System.Numerics;

namespace IdentityQueue.Screening;

/// <summary>What one evaluation found.</summary>
public enum TrialOutcome
{
    /// <summary>lhs − rhs vanished at the point: evidence for the identity.</summary>
    Zero,
    /// <summary>lhs − rhs did not vanish: the identity is false, and this trial is the witness.</summary>
    Nonzero,
    /// <summary>A denominator vanished at the point: no evidence either way; the screen resamples.</summary>
    Undefined,
}

/// <summary>
/// The states a screened candidate can end in (names as in the store's <c>result.state</c>), and <see cref="Pending"/>
/// for one that stopped at a stage boundary with more trials to come.
/// </summary>
public enum Verdict { Survived, Refuted, Undecided, Invalid, Pending }

/// <summary>
/// A field a trial ran in: GF(p) when <see cref="DefiningPolynomial"/> is null, else GF(p)[t]/(f). Immutable; equal
/// when the values are (the polynomial compared coefficient by coefficient).
/// </summary>
public sealed record TrialField(BigInteger Modulus, int ExtensionDegree, BigInteger[]? DefiningPolynomial, double SizeLog2)
{
    /// <summary>Bits of the field size, rounded up (the store's <c>field_bits</c>).</summary>
    public int Bits => (int)Math.Ceiling(SizeLog2 - 1e-9);

    public bool Equals(TrialField? other) =>
        other is not null && Modulus == other.Modulus && ExtensionDegree == other.ExtensionDegree && SizeLog2.Equals(other.SizeLog2)
        && ValueEquality.Same(DefiningPolynomial, other.DefiningPolynomial);

    public override int GetHashCode() => HashCode.Combine(Modulus, ExtensionDegree, SizeLog2, ValueEquality.Hash(DefiningPolynomial));
}

/// <summary>A variable's value in a trial: its name (indices evaluated, <c>x[3]</c>) and its coordinates over GF(p). Equal by value.</summary>
public sealed record PointValue(string Name, BigInteger[] Coordinates)
{
    public bool Equals(PointValue? other) => other is not null && Name == other.Name && ValueEquality.Same(Coordinates, other.Coordinates);

    public override int GetHashCode() => HashCode.Combine(Name, ValueEquality.Hash(Coordinates));
}

/// <summary>Element-wise equality for the arrays and lists that records of results carry.</summary>
internal static class ValueEquality
{
    public static bool Same<T>(IReadOnlyList<T>? a, IReadOnlyList<T>? b)
    {
        if (ReferenceEquals(a, b)) return true;
        if (a is null || b is null || a.Count != b.Count) return false;
        var comparer = EqualityComparer<T>.Default;
        for (var i = 0; i < a.Count; i++)
            if (!comparer.Equals(a[i], b[i])) return false;
        return true;
    }

    public static int Hash<T>(IReadOnlyList<T>? a)
    {
        if (a is null) return 0;
        var hash = new HashCode();
        hash.Add(a.Count);
        foreach (var x in a) hash.Add(x);
        return hash.ToHashCode();
    }
}

/// <summary>
/// One evaluation of lhs − rhs at a random point. The witness of a refutation is re-checkable from
/// <see cref="Field"/> and <see cref="Point"/> alone. Immutable; equal by value (the point and the difference element by
/// element).
/// </summary>
public sealed record TrialRecord(
    int Seq,
    TrialField Field,
    ulong PointSeed,
    TrialOutcome Outcome,
    IReadOnlyList<PointValue> Point,
    BigInteger[]? Difference,
    string? Entry,
    double? BoundLog2,
    long ElapsedMicroseconds)
{
    public bool Equals(TrialRecord? other) =>
        other is not null && Seq == other.Seq && Field.Equals(other.Field) && PointSeed == other.PointSeed && Outcome == other.Outcome
        && ValueEquality.Same(Point, other.Point) && ValueEquality.Same(Difference, other.Difference) && Entry == other.Entry
        && BoundLog2.Equals(other.BoundLog2) && ElapsedMicroseconds == other.ElapsedMicroseconds;

    public override int GetHashCode() => HashCode.Combine(Seq, Field, PointSeed, Outcome, ValueEquality.Hash(Point), ValueEquality.Hash(Difference), Entry, BoundLog2);
}

/// <summary>The outcome of screening one candidate (or of continuing its screening). Immutable.</summary>
public sealed record ScreenResult(
    Verdict Verdict,
    BigInteger DegreeBound,
    double HeightBoundLog2,
    double? ErrorBoundLog2,
    IReadOnlyList<TrialRecord> Trials,
    TrialRecord? Witness,
    bool Certified,
    string? Message)
{
    /// <summary>All trials that ran, with those given as prior evidence first.</summary>
    public int TrialCount => Trials.Count;
}

/// <summary>Settings of one screening run. Immutable.</summary>
public sealed record ScreeningOptions
{
    /// <summary>The evidence wanted: a false identity survives with probability at most 2^-<see cref="EvidenceTarget.Bits"/>.</summary>
    public EvidenceTarget Target { get; init; } = EvidenceTarget.Default;

    /// <summary>Trial and certification limits, and the worker's stages.</summary>
    public ScreeningPolicy Policy { get; init; } = ScreeningPolicy.Default;

    /// <summary>The run's seed: every prime and point derives from it, the candidate key and the trial number.</summary>
    public ulong Seed { get; init; }

    public Algebra.Limits Limits { get; init; } = Algebra.Limits.Default;

    /// <summary>The time one candidate's screening may take (<c>TimePerCandidate</c>).</summary>
    public TimeBudget Budget { get; init; } = TimeBudget.Default;

    /// <summary>The clock the budget is measured with (tests inject their own).</summary>
    public TimeProvider Clock { get; init; } = TimeProvider.System;

    /// <summary>How long a trial takes on each rung, estimated before it runs.</summary>
    public CostModel Costs { get; init; } = CostModel.Calibrated;

    /// <summary>
    /// Stop with <see cref="Verdict.Pending"/> after this many new stages (a stage: the trials on one rung, run together,
    /// that gave at least one zero trial); null: go on to a final state. A two-pass batch uses 1 in its first pass, so every
    /// candidate gets its cheap stage before any survivor moves to larger fields; continuing later gives the same trials as
    /// one go.
    /// </summary>
    public int? MaxNewStages { get; init; }

    /// <summary>Confirm refutations over Q by exact rational evaluation when it fits <see cref="ScreeningPolicy.MaxCertifyBits"/>.</summary>
    public bool Certify { get; init; } = true;
}
