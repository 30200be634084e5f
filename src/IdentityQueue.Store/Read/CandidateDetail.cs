using System.Globalization;
using IdentityQueue.Screening;
using IdentityQueue.Store.Schema;
using IdentityQueue.Store.Work;

namespace IdentityQueue.Store.Read;

/// <summary>A candidate's <c>result</c> row as <c>idq show</c> gives it. Immutable.</summary>
/// <param name="State">The result's state.</param>
/// <param name="HeightBoundLog2">log2 of the height bound, when known.</param>
/// <param name="TrialsZero">Trials that evaluated to zero.</param>
/// <param name="ErrorBoundLog2">log2 of the bound on the chance that a false identity survived them.</param>
/// <param name="WitnessTrialId">The refuting trial, if any.</param>
/// <param name="Certified">Whether the refutation was confirmed exactly.</param>
/// <param name="Message">Why screening stopped, when it says.</param>
/// <param name="DegreeBound">Decimal text: a degree bound may exceed 64 bits.</param>
/// <param name="UpdatedAt">UTC, 'YYYY-MM-DD HH:MM:SS', the same from both stores.</param>
public sealed record ResultDetail(
    ResultState State,
    string? DegreeBound,
    double? HeightBoundLog2,
    long TrialsZero,
    double? ErrorBoundLog2,
    long? WitnessTrialId,
    bool Certified,
    string? Message,
    string UpdatedAt);

/// <summary>
/// One candidate with everything <c>idq show</c> prints: the stored candidate, its result (null before it has a row), its
/// trials in order, and how many candidates share the label it was asked for.
/// </summary>
public sealed record CandidateDetail(StoredCandidate Candidate, ResultDetail? Result, IReadOnlyList<TrialRecord> Trials, int Matches)
{
    /// <summary>For a refuted candidate: the smallest counterexample found, when one was.</summary>
    public StoredCounterexample? Counterexample { get; init; }

    /// <summary>For a refuted candidate: lhs − rhs recovered, when it was.</summary>
    public StoredDifference? Difference { get; init; }

    /// <summary>Its equivalence group (#15 point 4): the representative it is the same identity as, or the members it represents; null when in none.</summary>
    public StoredEquivalence? Equivalence { get; init; }

    /// <summary>The candidate's state; a candidate without a result row is pending.</summary>
    public ResultState State => Result?.State ?? ResultState.Pending;
}

/// <summary>Reads single candidates for <c>idq show</c> and <c>idq recheck</c>, every value a parameter. Uses the connection it is given.</summary>
public sealed class CandidateReads(StoreConnection store)
{
    /// <summary>The ids of the candidates an argument names: an id (decimal digits), or every candidate with that label, by id.</summary>
    public IReadOnlyList<long> Find(string idOrLabel) =>
        long.TryParse(idOrLabel, NumberStyles.None, CultureInfo.InvariantCulture, out var id)
            ? ReadSql.Rows(store, "SELECT id FROM candidate WHERE id = @id", [("@id", id)], r => r.Long("id"))
            : ReadSql.Rows(store, "SELECT id FROM candidate WHERE label = @label ORDER BY id", [("@label", idOrLabel)], r => r.Long("id"));

    /// <summary>The candidate an id or label names (the first by id when a label is shared), or null when none does.</summary>
    public CandidateDetail? Detail(string idOrLabel)
    {
        var ids = Find(idOrLabel);
        if (ids.Count == 0) return null;
        var candidates = new CandidateStore(store);
        if (candidates.LoadCandidate(ids[0]) is not { } stored) return null;
        var result = ReadSql.Rows(store, """
            SELECT state, degree_bound, height_bound_log2, trials_zero, error_bound_log2, witness_trial_id, certified, message, updated_at
            FROM result WHERE candidate_id = @id
            """, [("@id", ids[0])], r => new ResultDetail(
                ResultStates.Parse(r.Text("state")), r.NullableText("degree_bound"), r.NullableDouble("height_bound_log2"), r.Long("trials_zero"),
                r.NullableDouble("error_bound_log2"), r.NullableLong("witness_trial_id"), r.Long("certified") != 0, r.NullableText("message"),
                r.Text("updated_at")));
        return new CandidateDetail(stored, result.FirstOrDefault(), candidates.LoadTrials(ids[0]), ids.Count)
        {
            Counterexample = RefutationDetailReads.Counterexample(store, ids[0]),
            Difference = RefutationDetailReads.Difference(store, ids[0]),
            Equivalence = EquivalenceReads.Of(store, ids[0]),
        };
    }

    /// <summary>The ids of the candidates in a state, ascending.</summary>
    public IReadOnlyList<long> InState(ResultState state) =>
        ReadSql.Rows(store, "SELECT candidate_id FROM result WHERE state = @state ORDER BY candidate_id", [("@state", state.Text())], r => r.Long("candidate_id"));
}
