using System.Data.Common;
using System.Numerics;
using IdentityQueue.Screening;
using IdentityQueue.Screening.Ports;
using IdentityQueue.Store.Schema;

namespace IdentityQueue.Store.Work;

/// <summary>
/// The worker's side of the store: the queue of candidates and the outcomes of screening them. Every write is
/// idempotent, so a job delivered twice (at-least-once) leaves the store as one delivery would: trials are keyed by
/// (candidate_id, seq) and inserted with ON CONFLICT DO NOTHING, and the result row is upserted. Uses the connection
/// it is given and, like it, is not thread-safe: one per worker thread.
/// </summary>
public sealed class CandidateStore(StoreConnection store)
{
    private readonly StoreConnection _store = store;
    private readonly DbConnection _db = store.Connection;

    /// <summary>Gives every candidate without a result row (e.g. one inserted by hand) a 'pending' one; returns how many.</summary>
    public int EnsureResultRows()
    {
        using var command = _db.Command($"""
            INSERT INTO result (candidate_id, state)
            SELECT c.id, '{ResultStates.Pending}' FROM candidate c
            WHERE NOT EXISTS (SELECT 1 FROM result r WHERE r.candidate_id = c.id)
            ON CONFLICT (candidate_id) DO NOTHING
            """);
        return command.ExecuteNonQuery();
    }

    /// <summary>Up to <paramref name="max"/> pending candidates, lowest id first.</summary>
    public IReadOnlyList<long> PendingCandidateIds(int max)
    {
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(max);
        using var command = _db.Command($"SELECT candidate_id FROM result WHERE state = '{ResultStates.Pending}' ORDER BY candidate_id LIMIT @max");
        command.Parameter("@max", max);
        var ids = new List<long>();
        using var reader = command.ExecuteReader();
        while (reader.Read()) ids.Add(reader.GetInt64(0));
        return ids;
    }

    /// <summary>Moves pending candidates to 'queued' (one transaction); candidates in any other state are left alone. Returns how many moved.</summary>
    public int MarkQueued(IEnumerable<long> candidateIds)
    {
        using var transaction = _db.BeginTransaction();
        using var command = _db.Command($"""
            UPDATE result SET state = '{ResultStates.Queued}', updated_at = CURRENT_TIMESTAMP
            WHERE candidate_id = @id AND state = '{ResultStates.Pending}'
            """, transaction);
        var id = command.Parameter("@id");
        command.Prepare();
        var moved = 0;
        foreach (var candidateId in candidateIds)
        {
            id.Set(candidateId);
            moved += command.ExecuteNonQuery();
        }
        transaction.Commit();
        return moved;
    }

    /// <summary>
    /// Marks a candidate 'screening' by <paramref name="worker"/> unless it already has a final state. A candidate
    /// already screening can be claimed again (a redelivered job whose first worker died). False: nothing to do.
    /// </summary>
    public bool Claim(long candidateId, string worker)
    {
        using var command = _db.Command($"""
            UPDATE result SET state = '{ResultStates.Screening}', claimed_by = @worker, claimed_at = CURRENT_TIMESTAMP, updated_at = CURRENT_TIMESTAMP
            WHERE candidate_id = @id AND state IN ('{ResultStates.Pending}', '{ResultStates.Queued}', '{ResultStates.Screening}')
            """);
        command.Parameter("@id", candidateId);
        command.Parameter("@worker", worker);
        return command.ExecuteNonQuery() == 1;
    }

    /// <summary>Puts candidates claimed longer ago than <paramref name="age"/> (their worker presumably died) back to 'queued'; returns how many.</summary>
    public int RequeueStaleClaims(TimeSpan age)
    {
        using var command = _db.Command($"""
            UPDATE result SET state = '{ResultStates.Queued}', claimed_by = NULL, claimed_at = NULL, updated_at = CURRENT_TIMESTAMP
            WHERE state = '{ResultStates.Screening}' AND claimed_at < @cutoff
            """);
        command.Parameter("@cutoff", DateTime.UtcNow - age);
        return command.ExecuteNonQuery();
    }

    /// <summary>One candidate with its catalogue's seed and target, or null when there is no such candidate.</summary>
    public StoredCandidate? LoadCandidate(long candidateId)
    {
        using var command = _db.Command(CandidateColumns + " WHERE c.id = @id");
        command.Parameter("@id", candidateId);
        using var r = command.ExecuteReader();
        return r.Read() ? ReadCandidate(r) : null;
    }

    /// <summary>The select of <see cref="ReadCandidate"/>'s columns; add a WHERE clause.</summary>
    internal const string CandidateColumns = """
        SELECT c.id, c.catalogue_id, k.name, c.label, c.family, c.params, c.lhs, c.rhs, c.field, c.position, k.seed, k.target_bits, k.key_scheme, c.lhs_column, c.rhs_column
        FROM candidate c JOIN catalogue k ON k.id = c.catalogue_id
        """;

    internal static StoredCandidate ReadCandidate(DbDataReader r) =>
        new(r.GetInt64(0), r.GetInt64(1), r.GetString(2), r.GetString(3), r.NullableString(4), r.NullableString(5),
            r.GetString(6), r.GetString(7), r.GetString(8), r.NullableInt(9), r.GetInt64(10), r.GetInt32(11), r.GetInt32(12))
        {
            LhsColumn = r.NullableInt(13),
            RhsColumn = r.NullableInt(14),
        };

    /// <summary>The stored trials of a candidate in seq order, as the screener takes them for prior evidence.</summary>
    public IReadOnlyList<TrialRecord> LoadTrials(long candidateId)
    {
        using var command = _db.Command(TrialColumns + " WHERE candidate_id = @id ORDER BY seq");
        command.Parameter("@id", candidateId);
        var trials = new List<TrialRecord>();
        using var r = command.ExecuteReader();
        while (r.Read()) trials.Add(ReadTrial(r));
        return trials;
    }

    /// <summary>The select of <see cref="ReadTrial"/>'s columns (candidate_id last); add a WHERE clause.</summary>
    internal const string TrialColumns = """
        SELECT seq, modulus, extension_degree, defining_polynomial, field_size_log2, point_seed, outcome, point,
               difference, entry, bound_log2, elapsed_us, candidate_id
        FROM trial
        """;

    internal static TrialRecord ReadTrial(DbDataReader r)
    {
        var polynomial = r.NullableString(3);
        var field = new TrialField(BigInteger.Parse(r.GetString(1)), r.GetInt32(2), polynomial is null ? null : TrialText.Array(polynomial), r.GetDouble(4));
        var difference = r.NullableString(8);
        return new TrialRecord(r.GetInt32(0), field, ulong.Parse(r.GetString(5)), TrialText.Outcome(r.GetString(6)),
            TrialText.Point(r.GetString(7)), difference is null ? null : TrialText.Residue(difference), r.NullableString(9),
            r.NullableDouble(10), r.GetInt64(11));
    }

    /// <summary>Stores a screen result: its new trials and the result row, in one transaction. See <see cref="Save"/>.</summary>
    public bool SaveOutcome(long candidateId, ScreenResult result, string worker) =>
        Save([CandidateOutcome.Screened(candidateId, result)], worker) == 1;

    /// <summary>Marks a candidate 'invalid' with the reason (its text does not parse or compile, or a limit refused it).</summary>
    public bool SaveInvalid(long candidateId, string message) => Save([CandidateOutcome.Invalid(candidateId, message)], worker: "") == 1;

    /// <summary>Marks a candidate 'failed' with what went wrong; its stored trials and bounds stay.</summary>
    public bool SaveFailed(long candidateId, string message) => Save([CandidateOutcome.Failed(candidateId, message)], worker: "") == 1;

    /// <summary>
    /// Stores several outcomes in one transaction and returns how many result rows it wrote. For a screen result, the trials
    /// not yet stored are inserted and the result row (state, bounds, trials_zero, witness, certified, message) is
    /// written and its claim cleared — unless the store already holds more trials for the candidate than the result
    /// has: then a later screening (e.g. with a higher target) got there first, and this stale result leaves the row as it
    /// is. Invalid and failed outcomes always write state and message. A candidate deleted meanwhile is skipped.
    /// If the process dies before the commit, nothing of the batch is stored and the jobs run again.
    /// </summary>
    public int Save(IReadOnlyList<CandidateOutcome> outcomes, string worker)
    {
        using var transaction = _db.BeginTransaction();
        var existing = new HashSet<long>();
        using (var exists = _db.Command("SELECT id FROM candidate WHERE " + _store.IdIn("id", "@ids"), transaction))
        {
            exists.Parameter("@ids", _store.IdList(outcomes.Select(o => o.CandidateId)));
            using var r = exists.ExecuteReader();
            while (r.Read()) existing.Add(r.GetInt64(0));
        }
        // PostgreSQL: the statements of the whole save go to the server as one batch (one round trip instead of several
        // per candidate); they run in order in this transaction, so each sees the rows the earlier ones wrote. SQLite runs
        // in-process, where a statement costs no round trip: there they run one by one.
        using var batch = _store.IsPostgreSql && _db.CanCreateBatch ? _db.CreateBatch() : null;
        if (batch is not null) batch.Transaction = transaction;
        var resultStatements = new List<DbBatchCommand>();
        int Run(DbCommand command, bool isResult)
        {
            if (batch is null) return command.ExecuteNonQuery();
            var copy = batch.CreateBatchCommand();
            copy.CommandText = command.CommandText;
            foreach (DbParameter parameter in command.Parameters)
            {
                var p = copy.CreateParameter();
                p.ParameterName = parameter.ParameterName;
                p.Value = parameter.Value;
                copy.Parameters.Add(p);
            }
            batch.BatchCommands.Add(copy);
            if (isResult) resultStatements.Add(copy);
            return 0;
        }
        using var trials = new TrialInsert(_db, transaction);
        using var screened = _db.Command("""
            INSERT INTO result (candidate_id, state, degree_bound, height_bound_log2, trials_zero, error_bound_log2,
                                witness_trial_id, certified, message, updated_at, claimed_by, claimed_at)
            VALUES (@candidate, @state, @degree, @height, @zero, @error,
                    (SELECT id FROM trial WHERE candidate_id = @candidate AND seq = @witness), @certified, @message,
                    CURRENT_TIMESTAMP, NULL, NULL)
            ON CONFLICT (candidate_id) DO UPDATE SET
                state = excluded.state, degree_bound = excluded.degree_bound, height_bound_log2 = excluded.height_bound_log2,
                trials_zero = excluded.trials_zero, error_bound_log2 = excluded.error_bound_log2,
                witness_trial_id = excluded.witness_trial_id, certified = excluded.certified, message = excluded.message,
                updated_at = excluded.updated_at, claimed_by = NULL, claimed_at = NULL, shared_from = NULL
            WHERE @trials >= (SELECT COUNT(*) FROM trial t WHERE t.candidate_id = excluded.candidate_id)
            """, transaction);
        var p = new
        {
            Candidate = screened.Parameter("@candidate"), State = screened.Parameter("@state"), Degree = screened.Parameter("@degree"),
            Height = screened.Parameter("@height"), Zero = screened.Parameter("@zero"), Error = screened.Parameter("@error"),
            Witness = screened.Parameter("@witness"), Certified = screened.Parameter("@certified"), Message = screened.Parameter("@message"),
            Trials = screened.Parameter("@trials"),
        };
        using var unscreened = _db.Command("""
            INSERT INTO result (candidate_id, state, message, updated_at, claimed_by, claimed_at)
            VALUES (@candidate, @state, @message, CURRENT_TIMESTAMP, NULL, NULL)
            ON CONFLICT (candidate_id) DO UPDATE SET
                state = excluded.state, message = excluded.message, updated_at = excluded.updated_at, claimed_by = NULL, claimed_at = NULL,
                shared_from = NULL
            """, transaction);
        var u = new { Candidate = unscreened.Parameter("@candidate"), State = unscreened.Parameter("@state"), Message = unscreened.Parameter("@message") };
        using var details = new DetailInsert(_db, transaction);

        var written = 0;
        foreach (var outcome in outcomes)
        {
            if (!existing.Contains(outcome.CandidateId)) continue;
            if (outcome.Screen is not { } result)
            {
                u.Candidate.Set(outcome.CandidateId);
                u.State.Set(StateOf(outcome));
                u.Message.Set(outcome.Message);
                written += Run(unscreened, isResult: true);
                continue;
            }
            foreach (var trial in result.Trials) Run(trials.Bind(outcome.CandidateId, trial, worker), isResult: false);
            p.Candidate.Set(outcome.CandidateId);
            p.State.Set(StateOf(outcome));
            p.Degree.Set(TrialText.Decimal(result.DegreeBound));
            p.Height.Set(Sql.Real(result.HeightBoundLog2));
            p.Zero.Set(result.Trials.Count(t => t.Outcome == TrialOutcome.Zero));
            p.Error.Set(Sql.Real(result.ErrorBoundLog2));
            p.Witness.Set(result.Witness?.Seq);
            p.Certified.Set(result.Certified);
            p.Message.Set(result.Message);
            p.Trials.Set(result.Trials.Count);
            written += Run(screened, isResult: true);
            if (outcome.Details?.Counterexample is { } found) Run(details.Counterexample(outcome.CandidateId, found), isResult: false);
            if (outcome.Details?.Difference is { } difference && details.Difference(outcome.CandidateId, difference) is { } insert)
                Run(insert, isResult: false);
        }
        // Members of the groups of representatives that settled share their result, in this transaction (after their rows).
        using var share = _db.Command(SharedResults.Share(_store), transaction);
        var settled = outcomes.Where(o => existing.Contains(o.CandidateId) && StateOf(o) is ResultStates.Refuted or ResultStates.Survived).Select(o => o.CandidateId).ToList();
        share.Parameter("@representatives", _store.IdList(settled));
        if (settled.Count > 0) Run(share, isResult: false);
        if (batch is { BatchCommands.Count: > 0 })
        {
            batch.ExecuteNonQuery();
            written = resultStatements.Sum(c => c.RecordsAffected);
        }
        transaction.Commit();
        return written;
    }

    /// <summary>The <c>result.state</c> an outcome writes.</summary>
    public static string StateOf(CandidateOutcome outcome) => outcome.Kind switch
    {
        OutcomeKind.Screened => outcome.Screen!.Verdict switch
        {
            Verdict.Survived => ResultStates.Survived,
            Verdict.Refuted => ResultStates.Refuted,
            Verdict.Undecided => ResultStates.Undecided,
            Verdict.Pending => ResultStates.Pending,
            _ => ResultStates.Invalid,
        },
        OutcomeKind.Invalid => ResultStates.Invalid,
        _ => ResultStates.Failed,
    };

    /// <summary>
    /// The prepared inserts of a refuted candidate's details (<c>counterexample</c>, <c>recovered_difference</c>); a row
    /// already stored is kept (a job that runs twice changes nothing).
    /// </summary>
    private sealed class DetailInsert : IDisposable
    {
        private readonly DbCommand _counterexample, _difference;
        private readonly DbParameter _cCandidate, _point, _lhs, _rhs, _entry, _maxAbs, _exhaustive, _tried;
        private readonly DbParameter _dCandidate, _text, _terms, _degree, _estimated;

        public DetailInsert(DbConnection db, DbTransaction transaction)
        {
            _counterexample = db.Command("""
                INSERT INTO counterexample (candidate_id, point, lhs_value, rhs_value, entry, max_abs, exhaustive, points_tried, created_at)
                VALUES (@candidate, @point, @lhs, @rhs, @entry, @max_abs, @exhaustive, @tried, CURRENT_TIMESTAMP)
                ON CONFLICT (candidate_id) DO NOTHING
                """, transaction);
            _cCandidate = _counterexample.Parameter("@candidate");
            _point = _counterexample.Parameter("@point");
            _lhs = _counterexample.Parameter("@lhs");
            _rhs = _counterexample.Parameter("@rhs");
            _entry = _counterexample.Parameter("@entry");
            _maxAbs = _counterexample.Parameter("@max_abs");
            _exhaustive = _counterexample.Parameter("@exhaustive");
            _tried = _counterexample.Parameter("@tried");
            _difference = db.Command("""
                INSERT INTO recovered_difference (candidate_id, difference, terms, total_degree, terms_estimated, created_at)
                VALUES (@candidate, @text, @terms, @degree, @estimated, CURRENT_TIMESTAMP)
                ON CONFLICT (candidate_id) DO NOTHING
                """, transaction);
            _dCandidate = _difference.Parameter("@candidate");
            _text = _difference.Parameter("@text");
            _terms = _difference.Parameter("@terms");
            _degree = _difference.Parameter("@degree");
            _estimated = _difference.Parameter("@estimated");
        }

        public DbCommand Counterexample(long candidateId, Screening.Counterexamples.Counterexample found)
        {
            _cCandidate.Set(candidateId);
            _point.Set(Screening.Counterexamples.RefutationDetails.PointJson(found));
            _lhs.Set(found.LhsValue);
            _rhs.Set(found.RhsValue);
            _entry.Set(found.Entry);
            _maxAbs.Set(found.MaxAbs > long.MaxValue ? long.MaxValue : (long)found.MaxAbs);
            _exhaustive.Set(found.Exhaustive);
            _tried.Set((long)found.PointsTried);
            return _counterexample;
        }

        /// <summary>The insert for a recovered difference, or null when nothing about it is known (no text, no estimate, no degree).</summary>
        public DbCommand? Difference(long candidateId, Screening.Counterexamples.RecoveredDifference d)
        {
            var text = d.StoredText;
            long? terms = d.Terms ?? d.EstimatedTerms;
            int? degree = d.TotalDegree >= 0 ? d.TotalDegree : null;
            if (text is null && terms is null && degree is null) return null;
            _dCandidate.Set(candidateId);
            _text.Set(text);
            _terms.Set(terms);
            _degree.Set(degree);
            _estimated.Set(text is null && terms is not null);
            return _difference;
        }

        public void Dispose()
        {
            _counterexample.Dispose();
            _difference.Dispose();
        }
    }

    /// <summary>The prepared insert of one trial row, ignoring a (candidate_id, seq) already stored.</summary>
    private sealed class TrialInsert : IDisposable
    {
        private readonly DbCommand _command;
        private readonly DbParameter _candidate, _seq, _modulus, _bits, _size, _degree, _polynomial, _seed, _outcome, _point,
            _difference, _entry, _bound, _elapsed, _worker;

        public TrialInsert(DbConnection db, DbTransaction transaction)
        {
            _command = db.Command("""
                INSERT INTO trial (candidate_id, seq, modulus, field_bits, field_size_log2, extension_degree, defining_polynomial,
                                   point_seed, outcome, point, difference, entry, bound_log2, elapsed_us, worker)
                VALUES (@candidate, @seq, @modulus, @bits, @size, @degree, @polynomial, @seed, @outcome, @point, @difference,
                        @entry, @bound, @elapsed, @worker)
                ON CONFLICT (candidate_id, seq) DO NOTHING
                """, transaction);
            _candidate = _command.Parameter("@candidate");
            _seq = _command.Parameter("@seq");
            _modulus = _command.Parameter("@modulus");
            _bits = _command.Parameter("@bits");
            _size = _command.Parameter("@size");
            _degree = _command.Parameter("@degree");
            _polynomial = _command.Parameter("@polynomial");
            _seed = _command.Parameter("@seed");
            _outcome = _command.Parameter("@outcome");
            _point = _command.Parameter("@point");
            _difference = _command.Parameter("@difference");
            _entry = _command.Parameter("@entry");
            _bound = _command.Parameter("@bound");
            _elapsed = _command.Parameter("@elapsed");
            _worker = _command.Parameter("@worker");
        }

        /// <summary>Sets the parameters for one trial and returns the command, for the caller to run (or batch).</summary>
        public DbCommand Bind(long candidateId, TrialRecord trial, string worker)
        {
            var extension = trial.Field.DefiningPolynomial is not null;
            _candidate.Set(candidateId);
            _seq.Set(trial.Seq);
            _modulus.Set(TrialText.Decimal(trial.Field.Modulus));
            _bits.Set(trial.Field.Bits);
            _size.Set(trial.Field.SizeLog2);
            _degree.Set(trial.Field.ExtensionDegree);
            _polynomial.Set(extension ? TrialText.Array(trial.Field.DefiningPolynomial!) : null);
            _seed.Set(trial.PointSeed.ToString(System.Globalization.CultureInfo.InvariantCulture));
            _outcome.Set(TrialText.Outcome(trial.Outcome));
            _point.Set(TrialText.Point(trial.Point, extension));
            _difference.Set(trial.Difference is null ? null : TrialText.Residue(trial.Difference, extension));
            _entry.Set(trial.Entry);
            _bound.Set(Sql.Real(trial.BoundLog2));
            _elapsed.Set(trial.ElapsedMicroseconds);
            _worker.Set(worker.Length == 0 ? null : worker);
            return _command;
        }

        public void Dispose() => _command.Dispose();
    }
}
