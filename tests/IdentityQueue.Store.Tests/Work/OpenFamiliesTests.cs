using IdentityQueue.Screening.Catalogues;
using IdentityQueue.Store.Import;
using IdentityQueue.Store.Work;

namespace IdentityQueue.Store.Tests.Work;

/// <summary>
/// Open-ended families in the store: the import records them with their first chunk, <see cref="OpenFamilies.Grow"/> adds
/// the next chunk only when every instance is final and none is refuted, until the budget; the families view says why a
/// family stopped. The screening itself is faked here by setting result states with SQL.
/// </summary>
public sealed class OpenFamiliesTests
{
    // Moser's circle problem (R. K. Guy, "The strong law of small numbers", Amer. Math. Monthly 95 (1988)).
    private const string Moser = "regions: sum(k in 0..4: binom(n-1, k)) = 2^(n-1) for n >= 1\nplain: x = x\n";

    private static int Grow(TempStore store) => new OpenFamilies(store.Connection).Grow();

    private static void Settle(TempStore store, string state, string where = "1 = 1") =>
        store.Execute($"UPDATE result SET state = '{state}' WHERE state = 'pending' AND {where}");

    private static List<string> Labels(TempStore store) =>
        store.Rows("SELECT label FROM candidate WHERE family = 'regions' ORDER BY id").Select(r => (string)r[0]!).ToList();

    private static object?[] View(TempStore store) =>
        store.Rows("SELECT instances, open_ended, open_budget, open_stop, holds_for, fails_for FROM families WHERE family = 'regions'").Single();

    [Fact]
    public void Import_RecordsTheFamilyWithItsBudgetAndFirstChunk()
    {
        using var store = TempStore.Create();
        var summary = store.Import(store.File("m.idq", Moser + "closed: x^n = x^n for n in 1..3\n"), new ImportOptions { OpenBudget = OpenFamilyBudget.Create(20).Value });
        Assert.Equal(12, summary.Instances);
        var row = store.Rows("SELECT family, parameter, first_value, budget, chunk, made FROM open_family").Single();
        Assert.Equal(["regions", "n", 1L, 20L, 8L, 8L], row);
        Assert.Equal(Enumerable.Range(1, 8).Select(n => $"regions[n={n}]"), Labels(store));
        Assert.Equal(8, store.Count("SELECT COUNT(*) FROM result r JOIN candidate c ON c.id = r.candidate_id WHERE c.family = 'regions' AND r.state = 'pending'"));
        // Not final yet: nothing grows, and the view says it is open and still growing (no stop).
        Assert.Equal(0, Grow(store));
        Assert.Equal([8L, 1L, 20L, null, null, null], View(store));
        Assert.Equal([0L, null, null], store.Rows("SELECT open_ended, open_budget, open_stop FROM families WHERE family = 'closed'").Single());
    }

    [Fact]
    public void Grow_AddsChunksUntilTheBudget()
    {
        using var store = TempStore.Create();
        store.Import(store.File("m.idq", "pow: x^n = x^n for n >= 0\n"), new ImportOptions { OpenBudget = OpenFamilyBudget.Create(20).Value });
        Settle(store, "survived");
        Assert.Equal(8, Grow(store));
        Assert.Equal(0, Grow(store)); // the new chunk is pending
        var added = store.Rows("SELECT c.label, c.params, c.lhs, c.rhs, c.field, c.position, r.state FROM candidate c JOIN result r ON r.candidate_id = c.id ORDER BY c.id").Skip(8).ToList();
        Assert.Equal(["pow[n=8]", "{\"n\":8}", "x^n", "x^n", "Q", 1L, "pending"], added[0]);
        Assert.Equal("pow[n=15]", added[^1][0]);
        // An invalid or undecided instance counts as not refuted: the family grows past it.
        Settle(store, "invalid", "candidate_id = (SELECT MIN(id) FROM candidate WHERE label = 'pow[n=9]')");
        Settle(store, "undecided", "candidate_id = (SELECT MIN(id) FROM candidate WHERE label = 'pow[n=10]')");
        Settle(store, "survived");
        Assert.Equal(4, Grow(store)); // 16 made, the budget is 20
        Settle(store, "survived");
        Assert.Equal(0, Grow(store));
        Assert.Equal(20, store.Count("SELECT COUNT(*) FROM candidate"));
        Assert.Equal(20, store.Count("SELECT COUNT(DISTINCT params) FROM candidate"));
        Assert.Equal(["budget of 20 instances reached", "0..8, 11..19"],
            store.Rows("SELECT open_stop, holds_for FROM families").Single());
    }

    [Fact]
    public void Grow_StopsAtTheFirstRefutedInstance()
    {
        using var store = TempStore.Create();
        store.Import(store.File("m.idq", Moser));
        // The first chunk n = 1..8: 1, 2, 4, 8, 16 regions hold, n = 6 (31 against 32) and beyond fail (Guy 1988).
        Settle(store, "refuted", "candidate_id IN (SELECT id FROM candidate WHERE label IN ('regions[n=6]', 'regions[n=7]', 'regions[n=8]'))");
        Assert.Equal(0, Grow(store)); // n = 1..5 are still pending
        Settle(store, "survived");
        Assert.Equal(0, Grow(store));
        Assert.Equal(8, Labels(store).Count);
        Assert.Equal([8L, 1L, 64L, "first refuted at n = 6", "1..5", "6..8"], View(store));
    }

    [Fact]
    public void Grow_AddsEachChunkOnceWhenSeveralGrowAtOnce()
    {
        using var store = TempStore.Create();
        store.Import(store.File("m.idq", "pow: x^n = x^n for n >= 1\n"));
        for (var round = 1; round <= 3; round++)
        {
            store.Execute("UPDATE result SET state = 'survived'");
            // Four growers on their own connections, as four worker processes would: the chunk is claimed by a
            // compare-and-set on open_family.made, so exactly one of them adds it.
            var added = new int[4];
            Parallel.For(0, 4, i =>
            {
                using var connection = StoreConnection.Open(StoreLocation.Sqlite(store.DbPath));
                added[i] = new OpenFamilies(connection).Grow();
            });
            Assert.Equal(8, added.Sum());
            Assert.Equal(8 * (round + 1), store.Count("SELECT COUNT(*) FROM candidate"));
        }
        Assert.Equal(32, store.Count("SELECT COUNT(DISTINCT params) FROM candidate"));
        Assert.Equal(32L, store.Scalar("SELECT made FROM open_family"));
    }
}
