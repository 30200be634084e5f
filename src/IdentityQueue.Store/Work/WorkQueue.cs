using System.Data.Common;
using IdentityQueue.Screening;
using IdentityQueue.Store.Schema;

namespace IdentityQueue.Store.Work;

/// <summary>A candidate claimed for screening: as stored, with its trials so far.</summary>
public sealed record ClaimedCandidate(StoredCandidate Candidate, IReadOnlyList<Screening.TrialRecord> Trials);

/// <summary>
/// The queue side of the worker's store: taking pending work by stage (stages are Screening's), claims and recovery. Like <see cref="CandidateStore"/> it uses the connection it is given and is
/// not thread-safe.
/// </summary>
[System.Diagnostics.CodeAnalysis.SuppressMessage("Naming", "CA1711", Justification = "The store's queue of work (its pending and queued rows), not a collection type; DEVELOPERS.md uses the name.")]
public sealed class WorkQueue(StoreConnection store)
{
    private readonly StoreConnection _store = store;
    private readonly DbConnection _db = store.Connection;
    private readonly CandidateStore _candidates = new(store);

    /// <summary>Candidates per state, over the whole store.</summary>
    public IReadOnlyDictionary<string, long> CountByState()
    {
        using var command = _db.Command("SELECT state, count(*) FROM result GROUP BY state");
        var counts = new Dictionary<string, long>(StringComparer.Ordinal);
        using var r = command.ExecuteReader();
        while (r.Read()) counts[r.GetString(0)] = r.GetInt64(1);
        return counts;
    }

    /// <summary>
    /// Start-up recovery for a store held by this process alone: result rows for hand-inserted candidates, and every claim
    /// (queued or screening) returned to pending — the process that made it is gone. Returns the claims returned.
    /// </summary>
    public int Recover()
    {
        _candidates.EnsureResultRows();
        using var command = _db.Command($"""
            UPDATE result SET state = '{ResultStates.Pending}', claimed_by = NULL, claimed_at = NULL, updated_at = CURRENT_TIMESTAMP
            WHERE state IN ('{ResultStates.Queued}', '{ResultStates.Screening}')
            """);
        return command.ExecuteNonQuery();
    }

    /// <summary>
    /// Recovery for a store that several worker processes share (PostgreSQL): result rows for hand-inserted candidates;
    /// candidates being screened by a worker whose heartbeat is older than <paramref name="deadAfter"/> (or that has no
    /// worker row) go back to pending once their claim is older than <paramref name="deadAfter"/> too; and candidates
    /// queued longer than <paramref name="queuedStaleAfter"/> go back to pending (a safety net: planners enqueue the jobs
    /// before the queued rows commit, see <see cref="TakePending(int, Action{WorkStage, IReadOnlyList{long}}?)"/>). A live worker's work is never touched. Work returned here while its
    /// queue job still exists is screened twice at worst, which the idempotent saves make harmless. Returns the
    /// candidates returned.
    /// </summary>
    public int RecoverShared(TimeSpan deadAfter, TimeSpan queuedStaleAfter)
    {
        _candidates.EnsureResultRows();
        var dead = (int)Math.Ceiling(deadAfter.TotalSeconds);
        var stale = (int)Math.Ceiling(queuedStaleAfter.TotalSeconds);
        using var command = _db.Command($"""
            UPDATE result SET state = '{ResultStates.Pending}', claimed_by = NULL, claimed_at = NULL, updated_at = CURRENT_TIMESTAMP
            WHERE (state = '{ResultStates.Screening}' AND (claimed_at IS NULL OR claimed_at < {_store.SecondsAgo(dead)})
                   AND (claimed_by IS NULL OR claimed_by NOT IN (
                        SELECT name FROM worker WHERE stopped_at IS NULL AND heartbeat_at >= {_store.SecondsAgo(dead)})))
               OR (state = '{ResultStates.Queued}' AND updated_at < {_store.SecondsAgo(stale)})
            """);
        return command.ExecuteNonQuery();
    }

    /// <summary>Returns the candidates that <paramref name="worker"/> still has claimed to pending (it is stopping).</summary>
    public int ReleaseClaimsOf(string worker)
    {
        using var command = _db.Command($"""
            UPDATE result SET state = '{ResultStates.Pending}', claimed_by = NULL, claimed_at = NULL, updated_at = CURRENT_TIMESTAMP
            WHERE state = '{ResultStates.Screening}' AND claimed_by = @worker
            """);
        command.Parameter("@worker", worker);
        return command.ExecuteNonQuery();
    }

    /// <summary>
    /// Reopens survivors whose evidence is short of <paramref name="target"/> (a run with a higher target) and records
    /// the target on every catalogue; nothing already settled is redone. Returns the candidates reopened.
    /// </summary>
    public int RaiseTarget(EvidenceTarget target)
    {
        using var transaction = _db.BeginTransaction();
        using (var catalogues = _db.Command("UPDATE catalogue SET target_bits = @bits WHERE target_bits < @bits", transaction))
        {
            catalogues.Parameter("@bits", target.Bits);
            catalogues.ExecuteNonQuery();
        }
        using var reopen = _db.Command($"""
            UPDATE result SET state = '{ResultStates.Pending}', updated_at = CURRENT_TIMESTAMP
            WHERE state = '{ResultStates.Survived}' AND (error_bound_log2 IS NULL OR error_bound_log2 > @bound)
            """, transaction);
        reopen.Parameter("@bound", target.BoundLog2);
        var reopened = reopen.ExecuteNonQuery();
        transaction.Commit();
        return reopened;
    }

    /// <summary>
    /// Takes up to <paramref name="max"/> pending candidates of the earliest of the policy's stages that has any and
    /// marks them queued, in one transaction. A stage is Screening's (<see cref="WorkStage"/>): a range of the stored count
    /// of zero trials (<c>result.trials_zero</c>), which this method only selects by. Returns the stage and the ids, lowest
    /// first; no ids when nothing is pending. <paramref name="beforeCommit"/> runs with the rows taken but not yet committed
    /// (the planner enqueues their jobs there): if it throws, or the process dies before the commit, the rows stay pending,
    /// so no candidate is ever left queued without a job (a job enqueued before a failed commit finds its candidates pending
    /// and screens them, harmlessly). A member of an equivalence group waits while its representative is not final
    /// (<see cref="SharedResults"/>).
    /// </summary>
    public (WorkStage Stage, IReadOnlyList<long> Ids) TakePending(int max, Action<WorkStage, IReadOnlyList<long>>? beforeCommit = null) =>
        TakePending(ScreeningPolicy.Default.Stages, max, beforeCommit);

    /// <summary>As <see cref="TakePending(int, Action{WorkStage, IReadOnlyList{long}}?)"/>, over the given stages in order.</summary>
    public (WorkStage Stage, IReadOnlyList<long> Ids) TakePending(IReadOnlyList<WorkStage> stages, int max,
        Action<WorkStage, IReadOnlyList<long>>? beforeCommit = null)
    {
        using var transaction = _db.BeginTransaction();
        foreach (var stage in stages)
        {
            // One statement takes the rows, so that two planners (worker processes sharing a PostgreSQL store) never take
            // the same candidate: there the inner select locks what it takes and skips rows another planner is taking.
            // SQLite has one writer at a time and no row locks.
            var lockRows = _store.IsPostgreSql ? " FOR UPDATE SKIP LOCKED" : "";
            var upper = stage.MaxZeroTrials is null ? "" : " AND trials_zero <= @most";
            using var take = _db.Command($"""
                UPDATE result SET state = '{ResultStates.Queued}', updated_at = CURRENT_TIMESTAMP
                WHERE candidate_id IN (SELECT candidate_id FROM result w WHERE state = '{ResultStates.Pending}'
                                       AND trials_zero >= @least{upper} AND NOT {SharedResults.WaitsForRepresentative("w")}
                                       ORDER BY candidate_id LIMIT @max{lockRows})
                RETURNING candidate_id
                """, transaction);
            take.Parameter("@max", max);
            take.Parameter("@least", stage.MinZeroTrials);
            if (stage.MaxZeroTrials is int most) take.Parameter("@most", most);
            var ids = new List<long>();
            using (var r = take.ExecuteReader())
                while (r.Read()) ids.Add(r.GetInt64(0));
            if (ids.Count == 0) continue;
            ids.Sort();
            beforeCommit?.Invoke(stage, ids);
            transaction.Commit();
            return (stage, ids);
        }
        transaction.Commit();
        return (stages.Count > 0 ? stages[0] : WorkStage.FirstTrial, []);
    }

    /// <summary>Claims the candidates for <paramref name="worker"/> and loads them with their trials; settled ones are skipped.</summary>
    public IReadOnlyList<ClaimedCandidate> Claim(IReadOnlyList<long> ids, string worker)
    {
        var claimed = new List<ClaimedCandidate>(ids.Count);
        using var transaction = _db.BeginTransaction();
        // One statement claims the chunk and says which candidates were still open.
        using var command = _db.Command($"""
            UPDATE result SET state = '{ResultStates.Screening}', claimed_by = @worker, claimed_at = CURRENT_TIMESTAMP, updated_at = CURRENT_TIMESTAMP
            WHERE {_store.IdIn("candidate_id", "@ids")}
              AND state IN ('{ResultStates.Pending}', '{ResultStates.Queued}', '{ResultStates.Screening}')
            RETURNING candidate_id
            """, transaction);
        command.Parameter("@ids", _store.IdList(ids));
        command.Parameter("@worker", worker);
        var toLoad = new List<long>(ids.Count);
        using (var r = command.ExecuteReader())
            while (r.Read()) toLoad.Add(r.GetInt64(0));
        // Two reads for the whole chunk: the candidates, then their trials in (candidate, seq) order.
        var idList = _store.IdList(toLoad);
        var stored = new List<StoredCandidate>(toLoad.Count);
        using (var read = _db.Command(CandidateStore.CandidateColumns + " WHERE " + _store.IdIn("c.id", "@ids") + " ORDER BY c.id", transaction))
        {
            read.Parameter("@ids", idList);
            using var r = read.ExecuteReader();
            while (r.Read()) stored.Add(CandidateStore.ReadCandidate(r));
        }
        var trials = new Dictionary<long, List<Screening.TrialRecord>>();
        using (var read = _db.Command(CandidateStore.TrialColumns + " WHERE " + _store.IdIn("candidate_id", "@ids") + " ORDER BY candidate_id, seq", transaction))
        {
            read.Parameter("@ids", idList);
            using var r = read.ExecuteReader();
            while (r.Read())
            {
                var candidate = r.GetInt64(12);
                if (!trials.TryGetValue(candidate, out var list)) trials[candidate] = list = [];
                list.Add(CandidateStore.ReadTrial(r));
            }
        }
        transaction.Commit();
        foreach (var s in stored) claimed.Add(new ClaimedCandidate(s, trials.TryGetValue(s.Id, out var t) ? t : []));
        return claimed;
    }

    /// <summary>Returns claimed candidates to pending (a graceful stop released them unscreened).</summary>
    public void Release(IReadOnlyList<long> ids)
    {
        using var transaction = _db.BeginTransaction();
        using var command = _db.Command($"""
            UPDATE result SET state = '{ResultStates.Pending}', claimed_by = NULL, claimed_at = NULL, updated_at = CURRENT_TIMESTAMP
            WHERE candidate_id = @id AND state IN ('{ResultStates.Queued}', '{ResultStates.Screening}')
            """, transaction);
        var id = command.Parameter("@id");
        command.Prepare();
        foreach (var candidate in ids) { id.Set(candidate); command.ExecuteNonQuery(); }
        transaction.Commit();
    }
}
