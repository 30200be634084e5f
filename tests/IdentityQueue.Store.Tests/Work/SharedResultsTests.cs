using IdentityQueue.Store.Import;
using IdentityQueue.Store.Work;

namespace IdentityQueue.Store.Tests.Work;

/// <summary>
/// Equivalence groups in the store (#15 point 4): the import writes them, the queue holds members back while their
/// representative is open, and a representative that ends invalid or failed lets its members be screened on their own.
/// </summary>
public sealed class SharedResultsTests
{
    // (x+y)^2 = x^2 + 2xy + y^2, the binomial theorem for n = 2 (common practice), written three ways; dropping 2xy makes it
    // false (the difference is 2xy), and "+ 1" makes another false identity that is not the same as either.
    private const string Catalogue = """
        square: (x+y)^2 = x^2 + 2*x*y + y^2
        square-product: (x+y)*(x+y) = y^2 + 2*y*x + x^2
        wrong: (x+y)^2 = x^2 + y^2
        wrong-swapped: x^2 + y^2 = (y+x)^2
        near: (x+y)^2 = x^2 + 2*x*y + y^2 + 1
        """;

    [Fact]
    public void Import_WritesOneRowPerMember_WithTheSmallestIdAsRepresentative()
    {
        using var store = TempStore.Create();
        var summary = store.Import(store.File("g.idq", Catalogue), new ImportOptions { Seed = 5 });
        Assert.Equal(2, summary.Grouping!.Members);
        Assert.Equal(2, summary.Grouping.Groups);
        var rows = store.Rows("SELECT label, group_label, swapped, false_match_bits FROM equivalents ORDER BY candidate_id");
        Assert.Equal(["square-product", "wrong-swapped"], rows.Select(r => (string)r[0]!));
        Assert.Equal(["square", "wrong"], rows.Select(r => (string)r[1]!));
        // "wrong" has sides of different values, so its mirror is a swap; "square"'s sides agree, so no side is swapped.
        Assert.Equal([0L, 1L], rows.Select(r => (long)r[2]!));
        // Degree ≤ 2 in two 62-bit fields, K = 2 points each: far below 2^-100 (Fingerprint.FalseMatchLog2's bound).
        Assert.All(rows, r => Assert.True((long)r[3]! >= 100, $"{r[0]}: 2^-{r[3]}"));
    }

    [Fact]
    public void Import_WithGroupingOff_WritesNoRows()
    {
        using var store = TempStore.Create();
        var summary = store.Import(store.File("g.idq", Catalogue), new ImportOptions { Seed = 5, GroupEquivalents = false });
        Assert.Null(summary.Grouping);
        Assert.Equal(0, store.Count("SELECT COUNT(*) FROM equivalence"));
    }

    [Fact]
    public void Members_WaitForTheirRepresentative_AndAreScreenedOnTheirOwnWhenItFailsOrIsInvalid()
    {
        using var store = TempStore.Create();
        store.Import(store.File("g.idq", Catalogue), new ImportOptions { Seed = 5 });
        var queue = new WorkQueue(store.Connection);
        var candidates = new CandidateStore(store.Connection);
        // square 1, square-product 2, wrong 3, wrong-swapped 4, near 5: the members 2 and 4 wait.
        Assert.Equal([1L, 3L, 5L], queue.TakePending(100).Ids);
        Assert.Empty(queue.TakePending(100).Ids);
        Assert.True(candidates.SaveFailed(1, "the worker ran out of memory"));
        Assert.True(candidates.SaveInvalid(3, "a limit refused it"));
        Assert.Equal([2L, 4L], queue.TakePending(100).Ids);
        // Nothing was shared: a failed or invalid representative's result is its own.
        Assert.Equal(0, store.Count("SELECT COUNT(*) FROM result WHERE shared_from IS NOT NULL"));
    }

    [Fact]
    public void ARepresentativeSavedSurvived_SharesWithItsWaitingMembers_OnceAndMarked()
    {
        using var store = TempStore.Create();
        store.Import(store.File("g.idq", Catalogue), new ImportOptions { Seed = 5 });
        var candidates = new CandidateStore(store.Connection);
        Assert.True(candidates.SaveOutcome(1, Some.Screen(store, 1), Some.Worker));
        const string member = "SELECT state, shared_from, degree_bound, error_bound_log2, message, trials_zero FROM result WHERE candidate_id = 2";
        var shared = Assert.Single(store.Rows(member));
        var representative = Assert.Single(store.Rows("SELECT state, degree_bound, error_bound_log2 FROM result WHERE candidate_id = 1"));
        Assert.Equal(["survived", 1L, representative[1], representative[2]], shared[..4]);
        Assert.StartsWith("same identity as square (fingerprint match, chance of a false match ≤ 2^-", (string)shared[4]!);
        Assert.Equal(0L, shared[5]);
        // The member of the other group, whose representative is still pending, waits.
        Assert.Equal("pending", store.Scalar("SELECT state FROM result WHERE candidate_id = 4"));

        // A job that runs twice saves the representative again: the member is already final and stays as it is.
        candidates.SaveOutcome(1, Some.Screen(store, 1), Some.Worker);
        Assert.Equal(shared, Assert.Single(store.Rows(member)));

        // Screened on its own later (a run that reopened it), its result is its own again.
        store.Execute("UPDATE result SET state = 'pending' WHERE candidate_id = 2");
        Assert.True(candidates.SaveOutcome(2, Some.Screen(store, 2), Some.Worker));
        Assert.Null(store.Scalar("SELECT shared_from FROM result WHERE candidate_id = 2"));
    }
}
