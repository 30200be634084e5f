using System.Numerics;
using IdentityQueue.Screening;
using IdentityQueue.Screening.Ports;
using IdentityQueue.Store.Work;

namespace IdentityQueue.Store.Tests.Work;

public sealed class CandidateStoreTests
{
    [Fact]
    public void HandInsertedCandidate_GetsAPendingResult_AndBindsToAValidEntry()
    {
        using var store = TempStore.Create();
        store.Execute("INSERT INTO catalogue (name, seed) VALUES ('by-hand', 7)");
        store.Execute("INSERT INTO candidate (catalogue_id, label, lhs, rhs) VALUES (1, 'square', '(x+1)^2', 'x^2 + 2*x + 1')");
        var candidates = new CandidateStore(store.Connection);

        Assert.Equal(1, candidates.EnsureResultRows());
        Assert.Equal(0, candidates.EnsureResultRows());
        Assert.Equal("pending", store.Scalar("SELECT state FROM result"));

        var candidate = candidates.LoadCandidate(1)!;
        Assert.Equal(("by-hand", "square", "Q", 7L, 64), (candidate.Catalogue, candidate.Label, candidate.Field, candidate.CatalogueSeed, candidate.CatalogueTargetBits));
        var bound = candidate.Bind();
        Assert.True(bound.Success, bound.Error);
        Assert.Equal("square", bound.Entry!.Label);
        Assert.True(bound.Entry.Field.IsRationals);
        Assert.Empty(bound.Parameters);
        Assert.Equal(Verdict.Survived, Some.Screen(store, 1).Verdict);
    }

    [Fact]
    public void HandInsertedFamilyInstance_BindsItsParams()
    {
        using var store = TempStore.Create();
        store.Execute("INSERT INTO catalogue (name) VALUES ('by-hand')");
        store.Execute("""INSERT INTO candidate (catalogue_id, label, family, params, lhs, rhs, field) VALUES (1, 'f[n=3]', 'f', '{"n": "3"}', 'x^n', 'x*x*x', 'GF(5)')""");
        var bound = new CandidateStore(store.Connection).LoadCandidate(1)!.Bind();
        Assert.True(bound.Success, bound.Error);
        Assert.Equal(new BigInteger(3), bound.Parameters["n"]);
        Assert.Equal("GF(5)", bound.Entry!.Field.ToString());
    }

    [Theory]
    [InlineData("x +", "x", null, "lhs: line 1, column")]
    [InlineData("x", "y = y", null, "rhs: line 1, column")]
    [InlineData("x", "x", "{\"n\": 1.5}", "must be an integer")]
    [InlineData("x", "x", "[1]", "must be a JSON object")]
    [InlineData("x", "x", "{n: 1}", "not valid JSON")]
    public void StoredTextThatDoesNotParse_GivesTheMessageForInvalid(string lhs, string rhs, string? parameters, string message)
    {
        using var store = TempStore.Create();
        store.Execute("INSERT INTO catalogue (name) VALUES ('c')");
        using (var command = store.Connection.Connection.CreateCommand())
        {
            command.CommandText = "INSERT INTO candidate (catalogue_id, label, lhs, rhs, params) VALUES (1, 'bad', @lhs, @rhs, @params)";
            command.Parameters.Add(new Microsoft.Data.Sqlite.SqliteParameter("@lhs", lhs));
            command.Parameters.Add(new Microsoft.Data.Sqlite.SqliteParameter("@rhs", rhs));
            command.Parameters.Add(new Microsoft.Data.Sqlite.SqliteParameter("@params", (object?)parameters ?? DBNull.Value));
            command.ExecuteNonQuery();
        }
        var bound = new CandidateStore(store.Connection).LoadCandidate(1)!.Bind();
        Assert.False(bound.Success);
        Assert.Contains(message, bound.Error);
    }

    [Fact]
    public void LoadCandidate_OfAMissingId_IsNull()
    {
        using var store = TempStore.Create();
        Assert.Null(new CandidateStore(store.Connection).LoadCandidate(99));
    }

    [Fact]
    public void SaveOutcome_Twice_StoresEachTrialOnce_AndTheSameResult()
    {
        using var store = TempStore.Create();
        Some.Catalogue(store, "two-squares: (a^2+b^2)*(c^2+d^2) = (a*c-b*d)^2 + (a*d+b*c)^2\n");
        var candidates = new CandidateStore(store.Connection);
        var result = Some.Screen(store, 1);
        Assert.Equal(Verdict.Survived, result.Verdict);

        Assert.True(candidates.SaveOutcome(1, result, Some.Worker));
        const string resultColumns = "state, degree_bound, height_bound_log2, trials_zero, error_bound_log2, witness_trial_id, certified, message, claimed_by";
        var first = store.Rows($"SELECT {resultColumns} FROM result");
        var trials = store.Rows("SELECT * FROM trial ORDER BY seq");
        Assert.True(candidates.SaveOutcome(1, result, Some.Worker));

        Assert.Equal(first, store.Rows($"SELECT {resultColumns} FROM result"));
        Assert.Equal(trials, store.Rows("SELECT * FROM trial ORDER BY seq"));
        Assert.Equal(result.TrialCount, store.Count("SELECT COUNT(*) FROM trial"));
        Assert.Equal(result.TrialCount, store.Count("SELECT COUNT(DISTINCT seq) FROM trial WHERE candidate_id = 1"));
        Assert.Equal(["survived", "4"], first[0].Take(2));
        Assert.Equal(result.ErrorBoundLog2, (double)first[0][4]!);
        Assert.Equal(Some.Worker, store.Scalar("SELECT DISTINCT worker FROM trial"));
    }

    [Fact]
    public void SaveOutcome_OfARefutation_StoresTheWitness_ReadableInVerdicts()
    {
        using var store = TempStore.Create();
        Some.Catalogue(store, "wrong: (x+y)^2 = x^2 + y^2\n");
        var result = Some.Screen(store, 1);
        Assert.Equal(Verdict.Refuted, result.Verdict);
        new CandidateStore(store.Connection).SaveOutcome(1, result, Some.Worker);

        var row = Assert.Single(store.Rows("SELECT state, witness_modulus, witness_point, witness_difference, certified, error_bound_log2 FROM verdicts"));
        Assert.Equal("refuted", row[0]);
        Assert.Equal(result.Witness!.Field.Modulus.ToString(), row[1]);
        var x = result.Witness.Point.Single(p => p.Name == "x").Coordinates[0];
        var y = result.Witness.Point.Single(p => p.Name == "y").Coordinates[0];
        Assert.Equal($"{{\"x\":\"{x}\",\"y\":\"{y}\"}}", row[2]);
        Assert.Equal(result.Witness.Difference![0].ToString(), row[3]);
        Assert.Equal(result.Certified ? 1L : 0L, row[4]);
        Assert.Null(row[5]);
        Assert.Equal(result.Witness.Seq, store.Count("SELECT t.seq FROM result r JOIN trial t ON t.id = r.witness_trial_id"));
    }

    [Theory]
    [InlineData("two-squares: (a^2+b^2)*(c^2+d^2) = (a*c-b*d)^2 + (a*d+b*c)^2")]
    [InlineData("frobenius: (x+y)^7 = x^7 + y^7 over GF(7)")]
    [InlineData("not-frobenius: x^7 = x over GF(7)")]
    [InlineData("matrix: [[a, b], [c, d]] * [[1, 0], [0, 1]] = [[a, b], [c, d+1]]")]
    [InlineData("undefined-first: 1/(x - x) = 0")]
    public void LoadTrials_GivesBackTheTrialsSaved(string line)
    {
        using var store = TempStore.Create();
        Some.Catalogue(store, line + "\n");
        var result = Some.Screen(store, 1);
        var candidates = new CandidateStore(store.Connection);
        candidates.SaveOutcome(1, result, Some.Worker);

        var loaded = candidates.LoadTrials(1);
        Assert.Equal(result.Trials.Count, loaded.Count);
        foreach (var (saved, back) in result.Trials.Zip(loaded))
        {
            Assert.Equal(saved.Seq, back.Seq);
            Assert.Equal(saved.Field.Modulus, back.Field.Modulus);
            Assert.Equal(saved.Field.ExtensionDegree, back.Field.ExtensionDegree);
            Assert.Equal(saved.Field.DefiningPolynomial, back.Field.DefiningPolynomial);
            Assert.Equal(saved.Field.SizeLog2, back.Field.SizeLog2);
            Assert.Equal(saved.PointSeed, back.PointSeed);
            Assert.Equal(saved.Outcome, back.Outcome);
            Assert.Equal(saved.Point.Select(p => p.Name), back.Point.Select(p => p.Name));
            Assert.Equal(saved.Point.Select(p => p.Coordinates), back.Point.Select(p => p.Coordinates));
            Assert.Equal(saved.Difference, back.Difference);
            Assert.Equal(saved.Entry, back.Entry);
            Assert.Equal(saved.BoundLog2, back.BoundLog2);
            Assert.Equal(saved.ElapsedMicroseconds, back.ElapsedMicroseconds);
        }
    }

    [Fact]
    public void ExtensionFieldTrials_StoreCoefficientListsAndTheDefiningPolynomial()
    {
        using var store = TempStore.Create();
        Some.Catalogue(store, "not-frobenius: x^7 = x over GF(7)\n");
        var result = Some.Screen(store, 1);
        Assert.Equal(Verdict.Refuted, result.Verdict);
        new CandidateStore(store.Connection).SaveOutcome(1, result, Some.Worker);
        var row = Assert.Single(store.Rows("SELECT w.modulus, w.defining_polynomial, w.point, w.difference FROM result r JOIN trial w ON w.id = r.witness_trial_id"));
        Assert.Equal("7", row[0]);
        Assert.Matches(@"^\[(""\d+"",)+""\d+""\]$", (string)row[1]!);
        Assert.Matches(@"^\{""x"":\[(""\d+"",)*""\d+""\]\}$", (string)row[2]!);
        Assert.Matches(@"^\[(""\d+"",)*""\d+""\]$", (string)row[3]!);
    }

    [Fact]
    public void ScreeningAgainWithAHigherTarget_AddsTrials_AndAStaleSaveDoesNotUndoIt()
    {
        using var store = TempStore.Create();
        Some.Catalogue(store, "two-squares: (a^2+b^2)*(c^2+d^2) = (a*c-b*d)^2 + (a*d+b*c)^2\n");
        var candidates = new CandidateStore(store.Connection);
        var weak = Some.Screen(store, 1, targetBits: 32);
        candidates.SaveOutcome(1, weak, Some.Worker);

        var strong = Some.Screen(store, 1, targetBits: 128);
        Assert.True(strong.TrialCount > weak.TrialCount);
        Assert.Equal(weak.Trials.Select(t => t.PointSeed), strong.Trials.Take(weak.TrialCount).Select(t => t.PointSeed));
        Assert.True(candidates.SaveOutcome(1, strong, Some.Worker));
        Assert.Equal(strong.TrialCount, store.Count("SELECT COUNT(*) FROM trial"));

        // A redelivered job that screened to the old target saves late: the stronger evidence stays.
        Assert.False(candidates.SaveOutcome(1, weak, Some.Worker));
        Assert.Equal(strong.ErrorBoundLog2, (double)store.Scalar("SELECT error_bound_log2 FROM result")!);
        Assert.Equal(strong.TrialCount, store.Count("SELECT trials FROM verdicts"));
    }

    [Fact]
    public void FamiliesView_ShowsTheFirstRefutedAndTheSurvivingParams()
    {
        using var store = TempStore.Create();
        // True for n = 0 and n = 1 only. Grouping off: other[n=1] (x = x) is the same identity as squares[n=1] and would
        // share its result (#15 point 4); this test is about the families view alone.
        store.Import(store.File("c.idq", "squares: x^n = x^(n*n) for n in 0..3\nother: x^n = x^n for n in 1..2\n"),
            new Store.Import.ImportOptions { Seed = 20261201, GroupEquivalents = false });
        var candidates = new CandidateStore(store.Connection);
        // Saved out of order, as parallel workers would.
        foreach (var id in new long[] { 4, 2, 3, 1 })
            candidates.SaveOutcome(id, Some.Screen(store, id), Some.Worker);

        var row = Assert.Single(store.Rows("SELECT catalogue, family, instances, survived, refuted, other, first_refuted, survived_params FROM families WHERE family = 'squares'"));
        Assert.Equal(["c", "squares", 4L, 2L, 2L, 0L, "{\"n\":2}", "{\"n\":0}, {\"n\":1}"], row);
        var other = Assert.Single(store.Rows("SELECT instances, survived, refuted, other, first_refuted, survived_params FROM families WHERE family = 'other'"));
        Assert.Equal([2L, 0L, 0L, 2L, null, null], other);
        Assert.Equal(["squares[n=0]", "squares[n=1]"], store.Rows("SELECT label FROM survivors WHERE family = 'squares' ORDER BY label").Select(r => (string)r[0]!));
    }

    [Fact]
    public void Survivors_AreOrderedStrongestEvidenceFirst()
    {
        using var store = TempStore.Create();
        Some.Catalogue(store, "a: (x+1)^2 = x^2 + 2*x + 1\nb: (y+1)^2 = y^2 + 2*y + 1\nc: (z+1)^2 = z^2 + 2*z + 1\n");
        var candidates = new CandidateStore(store.Connection);
        candidates.SaveOutcome(1, Some.Screen(store, 1, targetBits: 16), Some.Worker);
        candidates.SaveOutcome(2, Some.Screen(store, 2, targetBits: 200), Some.Worker);
        candidates.SaveOutcome(3, Some.Screen(store, 3, targetBits: 64), Some.Worker);
        var bounds = store.Rows("SELECT label, error_bound_log2 FROM survivors");
        Assert.Equal(["b", "c", "a"], bounds.Select(r => (string)r[0]!));
        Assert.True((double)bounds[0][1]! <= -200 && (double)bounds[2][1]! <= -16);
    }

    [Fact]
    public void QueueAndClaims_MoveThroughTheStates()
    {
        using var store = TempStore.Create();
        Some.Catalogue(store, "a: x = x\nb: y = y\nc: z = z\n");
        var candidates = new CandidateStore(store.Connection);
        Assert.Equal([1L, 2L], candidates.PendingCandidateIds(2));
        Assert.Equal(2, candidates.MarkQueued([1, 2]));
        Assert.Equal(0, candidates.MarkQueued([1, 2]));
        Assert.Equal([3L], candidates.PendingCandidateIds(10));

        Assert.True(candidates.Claim(1, "w1"));
        Assert.Equal(["screening", "w1"], store.Rows("SELECT state, claimed_by FROM result WHERE candidate_id = 1")[0]);
        Assert.True(candidates.Claim(1, "w2"));

        candidates.SaveOutcome(1, Some.Screen(store, 1), "w2");
        Assert.Equal(["survived", null, null], store.Rows("SELECT state, claimed_by, claimed_at FROM result WHERE candidate_id = 1")[0]);
        Assert.False(candidates.Claim(1, "w3"));

        Assert.True(candidates.Claim(2, "w1"));
        Assert.Equal(0, candidates.RequeueStaleClaims(TimeSpan.FromHours(1)));
        store.Execute("UPDATE result SET claimed_at = '2000-01-01 00:00:00' WHERE candidate_id = 2");
        Assert.Equal(1, candidates.RequeueStaleClaims(TimeSpan.FromHours(1)));
        Assert.Equal(["queued", null], store.Rows("SELECT state, claimed_by FROM result WHERE candidate_id = 2")[0]);
    }

    [Fact]
    public void SaveInvalidAndFailed_WriteStateAndMessage_AndClearTheClaim()
    {
        using var store = TempStore.Create();
        Some.Catalogue(store, "a: x = x\nb: y = y\n");
        var candidates = new CandidateStore(store.Connection);
        candidates.Claim(1, "w1");
        Assert.True(candidates.SaveInvalid(1, "line 1, column 1: the two sides differ in type"));
        Assert.True(candidates.SaveInvalid(1, "line 1, column 1: the two sides differ in type"));
        Assert.True(candidates.SaveFailed(2, "InvalidOperationException: boom"));
        Assert.Equal(["invalid", "line 1, column 1: the two sides differ in type", null], store.Rows("SELECT state, message, claimed_by FROM result WHERE candidate_id = 1")[0]);
        Assert.Equal(["failed", "InvalidOperationException: boom"], store.Rows("SELECT state, message FROM result WHERE candidate_id = 2")[0]);
    }

    [Fact]
    public void Save_OfABatch_WritesEveryOutcomeInOneTransaction_AndSkipsDeletedCandidates()
    {
        using var store = TempStore.Create();
        Some.Catalogue(store, "a: x = x\nb: (x+y)^2 = x^2 + y^2\nc: y = y\n");
        var outcomes = new List<CandidateOutcome>
        {
            CandidateOutcome.Screened(1, Some.Screen(store, 1)),
            CandidateOutcome.Screened(2, Some.Screen(store, 2)),
            CandidateOutcome.Invalid(3, "too large"),
            CandidateOutcome.Failed(99, "gone"),
        };
        Assert.Equal(3, new CandidateStore(store.Connection).Save(outcomes, Some.Worker));
        Assert.Equal(["survived", "refuted", "invalid"], store.Rows("SELECT state FROM result ORDER BY candidate_id").Select(r => (string)r[0]!));
        Assert.Equal(0, store.Count("SELECT COUNT(*) FROM result WHERE candidate_id = 99"));
    }

    [Fact]
    public void SaveOutcome_ForACandidateWithoutAResultRow_CreatesIt()
    {
        using var store = TempStore.Create();
        store.Execute("INSERT INTO catalogue (name) VALUES ('by-hand')");
        store.Execute("INSERT INTO candidate (catalogue_id, label, lhs, rhs) VALUES (1, 'a', 'x + 1', '1 + x')");
        Assert.True(new CandidateStore(store.Connection).SaveOutcome(1, Some.Screen(store, 1), Some.Worker));
        Assert.Equal("survived", store.Scalar("SELECT state FROM result"));
    }

    [Fact]
    public async Task ConcurrentWorkers_OnTheirOwnConnections_SaveWithoutLockErrors()
    {
        using var store = TempStore.Create();
        Some.Catalogue(store, string.Concat(Enumerable.Range(0, 40).Select(i => $"c{i}: (x + {i})^2 = x^2 + {2 * i}*x + {i * i}\n")));
        var results = Enumerable.Range(1, 40).ToDictionary(id => (long)id, id => Some.Screen(store, id, targetBits: 16));
        var workers = Enumerable.Range(0, 4).Select(w => Task.Run(() =>
        {
            using var connection = StoreConnection.OpenSqlite(store.DbPath);
            var candidates = new CandidateStore(connection);
            for (var round = 0; round < 2; round++)
                foreach (var (id, result) in results.Where(r => r.Key % 4 == w || round == 1))
                {
                    candidates.EnsureResultRows();
                    candidates.Claim(id, $"w{w}");
                    candidates.SaveOutcome(id, result, $"w{w}");
                }
        })).ToArray();
        await Task.WhenAll(workers);
        Assert.Equal(40, store.Count("SELECT COUNT(*) FROM result WHERE state = 'survived' AND claimed_by IS NULL"));
        Assert.Equal(results.Values.Sum(r => r.TrialCount), store.Count("SELECT COUNT(*) FROM trial"));
    }
}
