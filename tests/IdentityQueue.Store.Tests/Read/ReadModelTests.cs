using IdentityQueue.Store.Import;
using IdentityQueue.Store.Read;
using IdentityQueue.Store.Schema;

namespace IdentityQueue.Store.Tests.Read;

/// <summary>
/// The read models on a real SQLite store: each figure is compared with a direct SQL count over the public tables, and
/// the states with the names of SPEC §4 (the contract).
/// </summary>
public sealed class ReadModelTests
{
    [Fact]
    public void ResultStates_AreTheStoredTextsOfTheSpec_InOrder_AndRoundTrip()
    {
        // SPEC §4, table result: "States: pending, queued, screening, refuted, survived, undecided, invalid, failed."
        Assert.Equal(["pending", "queued", "screening", "refuted", "survived", "undecided", "invalid", "failed"], ResultStates.All);
        foreach (var state in ResultStates.Values)
        {
            Assert.True(ResultStates.TryParse(state.Text(), out var back));
            Assert.Equal(state, back);
        }
        Assert.False(ResultStates.TryParse("Refuted", out _));
        Assert.False(ResultStates.TryParse("", out _));
        Assert.Throws<FormatException>(() => ResultStates.Parse("done"));
        Assert.Equal([ResultState.Refuted, ResultState.Survived, ResultState.Undecided, ResultState.Invalid, ResultState.Failed], ResultStates.Final);
    }

    [Fact]
    public void EveryStateText_IsAcceptedByTheStoresCheckConstraint_AndNoOther()
    {
        using var store = TempStore.Create();
        store.Import(store.File("c.idq", "a: x = x\n"));
        foreach (var text in ResultStates.All)
            Assert.Equal(1, store.Execute($"UPDATE result SET state = '{text}'"));
        Assert.ThrowsAny<System.Data.Common.DbException>(() => store.Execute("UPDATE result SET state = 'done'"));
    }

    [Fact]
    public void CandidateReads_FindByIdOrLabel_ALabelWithQuotesIsAValue()
    {
        using var store = TempStore.Create();
        store.Import(store.File("c.idq", "a: x = x\nb: x + 1 = 1 + x\n"));
        // A label the catalogue syntax cannot write, inserted by hand (README, SQL cookbook): quotes and SQL in it.
        store.Execute("INSERT INTO candidate (catalogue_id, label, lhs, rhs) SELECT id, 'o''brien'' OR ''1''=''1', 'y', 'y' FROM catalogue");
        var reads = new CandidateReads(store.Connection);
        Assert.Equal([store.Count("SELECT id FROM candidate WHERE label = 'b'")], reads.Find("b"));
        Assert.Equal([store.Count("SELECT id FROM candidate WHERE label = 'a'")], reads.Find(store.Count("SELECT id FROM candidate WHERE label = 'a'").ToString()));
        Assert.Single(reads.Find("o'brien' OR '1'='1"));
        Assert.Empty(reads.Find("x' OR '1'='1"));
        Assert.Empty(reads.Find("999999"));

        var detail = reads.Detail("b")!;
        Assert.Equal("b", detail.Candidate.Label);
        Assert.Equal(ResultState.Pending, detail.State);
        Assert.Equal(ResultState.Pending, detail.Result!.State);
        Assert.Empty(detail.Trials);
        Assert.Equal(1, detail.Matches);
        // The hand-inserted candidate has no result row yet: it reads as pending, without a result.
        var byHand = reads.Detail("o'brien' OR '1'='1")!;
        Assert.Null(byHand.Result);
        Assert.Equal(ResultState.Pending, byHand.State);
        Assert.Null(reads.Detail("nothing"));
    }

    [Fact]
    public void StatusCounts_AreTheResultRowsCounts_PerCatalogueAndState()
    {
        using var store = TempStore.Create();
        store.Import(store.File("one.idq", "a: x = x\nb: x = 1\nc: x = 2\n"));
        store.Import(store.File("two.idq", "d: y = y\n"));
        store.Execute("UPDATE result SET state = 'refuted', updated_at = CURRENT_TIMESTAMP WHERE candidate_id = (SELECT id FROM candidate WHERE label = 'b')");
        store.Execute("UPDATE result SET state = 'queued' WHERE candidate_id = (SELECT id FROM candidate WHERE label = 'c')");
        var counts = StatusCounts.Read(store.Connection);
        var expected = store.Rows("""
            SELECT k.name, r.state, count(*) FROM result r JOIN candidate c ON c.id = r.candidate_id JOIN catalogue k ON k.id = c.catalogue_id
            GROUP BY k.name, r.state ORDER BY k.name, r.state
            """).Select(r => new CatalogueStateCount((string)r[0]!, ResultStates.Parse((string)r[1]!), Convert.ToInt64(r[2]))).ToList();
        Assert.Equal(expected, counts.Counts);
        Assert.Equal(3, counts.Open); // a and c in one, d in two
        Assert.Equal(1, counts.SettledLastMinute);
        var byCatalogue = counts.ByCatalogue();
        Assert.Equal(["one", "two"], byCatalogue.Select(c => c.Catalogue));
        Assert.Equal(1, byCatalogue[0].States[ResultState.Refuted]);
        Assert.False(byCatalogue[1].States.ContainsKey(ResultState.Refuted));
    }

    [Fact]
    public void ExportRows_SelectByState_WithTheColumnsOfTheExport()
    {
        using var store = TempStore.Create();
        store.Import(store.File("c.idq", "a: x = x\nb: x^n = x for n in 1..2\n"));
        store.Execute("UPDATE result SET state = 'survived', certified = 1, error_bound_log2 = -64.5 WHERE candidate_id = (SELECT id FROM candidate WHERE label = 'a')");
        var reads = new ExportRows(store.Connection);
        var all = reads.Read([]);
        Assert.Equal(store.Count("SELECT count(*) FROM candidate"), all.Count);
        Assert.Equal(all.Select(r => r.Id).Order(), all.Select(r => r.Id));
        var survivors = reads.Read([ResultState.Survived]);
        var a = Assert.Single(survivors);
        Assert.Equal(("a", ResultState.Survived, true, -64.5), (a.Label, a.State!.Value, a.Certified!.Value, a.ErrorBoundLog2!.Value));
        Assert.Equal(2, reads.Read([ResultState.Pending]).Count);
        Assert.Equal(3, reads.Read([ResultState.Pending, ResultState.Survived]).Count);
        var family = reads.Read([ResultState.Pending])[0];
        Assert.Equal("b", family.Family);
        Assert.Equal("{\"n\":1}", family.Params);
        Assert.Equal(ExportRows.Columns.Count, a.Values().Length);
        Assert.Equal("survived", a.Values()[ExportRows.Columns.ToList().IndexOf("state")]);
        Assert.Equal(1L, a.Values()[ExportRows.Columns.ToList().IndexOf("certified")]);
    }

    [Fact]
    public void ExportRows_OfAMemberWhoseResultIsShared_ShowTheRepresentativesDetails_UnlessItsSidesAreSwapped()
    {
        // (x+y)^2 = x^2 + y^2 lacks the cross term 2xy (the binomial theorem, common practice): at x = y = 1 the sides are
        // 4 and 2. "again" is the same identity written in another order, "mirror" the same with its sides swapped.
        using var store = TempStore.Create();
        store.Import(store.File("c.idq", "wrong: (x+y)^2 = x^2 + y^2\nagain: (y+x)^2 = y^2 + x^2\nmirror: x^2 + y^2 = (x+y)^2\n"),
            new ImportOptions { Seed = 5 });
        Assert.Equal(["again|1|0", "mirror|1|1"],
            store.Rows("SELECT c.label, e.group_candidate_id, e.swapped FROM equivalence e JOIN candidate c ON c.id = e.candidate_id ORDER BY c.id")
                .Select(r => $"{r[0]}|{r[1]}|{r[2]}"));
        // The representative's refutation details, and the members' results shared from it (as CandidateStore.Save writes them).
        store.Execute("UPDATE result SET state = 'refuted' WHERE candidate_id = 1");
        store.Execute("UPDATE result SET state = 'refuted', shared_from = 1 WHERE candidate_id IN (2, 3)");
        store.Execute("""INSERT INTO counterexample (candidate_id, point, lhs_value, rhs_value, max_abs, exhaustive, points_tried) VALUES (1, '{"x":"1","y":"1"}', '4', '2', 1, 1, 4)""");
        store.Execute("INSERT INTO recovered_difference (candidate_id, difference, terms, total_degree, terms_estimated) VALUES (1, '2*x*y', 1, 2, 0)");

        var rows = new ExportRows(store.Connection).Read([ResultState.Refuted]).ToDictionary(r => r.Label);
        Assert.Equal("fails at x = 1, y = 1: lhs = 4, rhs = 2", rows["wrong"].Counterexample!.Describe());
        Assert.Equal(rows["wrong"].Counterexample, rows["again"].Counterexample);
        Assert.Equal(rows["wrong"].Difference, rows["again"].Difference);
        // Read the other way round the values would be wrong (lhs = 2, rhs = 4), so a swapped member shows none.
        Assert.Null(rows["mirror"].Counterexample);
        Assert.Null(rows["mirror"].Difference);
    }
}
