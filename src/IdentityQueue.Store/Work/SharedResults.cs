using IdentityQueue.Store.Schema;

namespace IdentityQueue.Store.Work;

/// <summary>
/// The SQL of shared results (#15 point 4): a member of an equivalence group (a row of <c>equivalence</c>, written at
/// import by <see cref="Import.CatalogueGrouping"/>) is not screened while its representative is waiting or being screened
/// (<see cref="WaitsForRepresentative"/>, in <see cref="WorkQueue.TakePending(int, Action{Screening.WorkStage, IReadOnlyList{long}}?)"/>);
/// when the representative is saved <c>refuted</c> or <c>survived</c>, the same transaction gives each waiting member
/// (pending or queued) its state, degree bound, height bound and error bound, <c>shared_from</c> = the representative and
/// the message "same identity as LABEL (fingerprint match, chance of a false match ≤ 2^-k)" (<see cref="Share"/>). A
/// representative that ends <c>invalid</c>, <c>undecided</c> or <c>failed</c> shares nothing: its members are then taken
/// like any pending candidate and screened on their own (the first of them is not made a new representative). The
/// member's own counts stay its own (no trials, <c>trials_zero</c> 0, no witness, not certified). Written once for both stores.
/// </summary>
internal static class SharedResults
{
    /// <summary>A condition on a pending row aliased <paramref name="alias"/>: true when it is a member whose representative is still pending, queued or being screened.</summary>
    public static string WaitsForRepresentative(string alias) => $"""
        EXISTS (SELECT 1 FROM equivalence e JOIN result g ON g.candidate_id = e.group_candidate_id
                WHERE e.candidate_id = {alias}.candidate_id
                  AND g.state IN ('{ResultStates.Pending}', '{ResultStates.Queued}', '{ResultStates.Screening}'))
        """;

    /// <summary>
    /// Gives the waiting members of the representatives in the id list <c>@representatives</c> (<see cref="StoreConnection.IdList"/>)
    /// their representative's result, when it is <c>refuted</c> or <c>survived</c>. Idempotent: a member already final is left alone.
    /// </summary>
    public static string Share(StoreConnection store) => $"""
        UPDATE result SET state = g.state, degree_bound = g.degree_bound, height_bound_log2 = g.height_bound_log2,
            error_bound_log2 = g.error_bound_log2, shared_from = e.group_candidate_id,
            message = 'same identity as ' || gc.label || ' ('
                || CASE WHEN e.swapped THEN 'sides swapped, ' ELSE '' END
                || 'fingerprint match, chance of a false match '
                || COALESCE('≤ 2^-' || CAST(e.false_match_bits AS TEXT), 'not bounded') || ')',
            updated_at = CURRENT_TIMESTAMP, claimed_by = NULL, claimed_at = NULL
        FROM equivalence e JOIN result g ON g.candidate_id = e.group_candidate_id JOIN candidate gc ON gc.id = e.group_candidate_id
        WHERE e.candidate_id = result.candidate_id AND {store.IdIn("e.group_candidate_id", "@representatives")}
          AND result.state IN ('{ResultStates.Pending}', '{ResultStates.Queued}')
          AND g.state IN ('{ResultStates.Refuted}', '{ResultStates.Survived}')
        """;
}
