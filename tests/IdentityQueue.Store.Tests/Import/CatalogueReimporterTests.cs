using IdentityQueue.Screening.Catalogues;
using IdentityQueue.Store.Import;
using IdentityQueue.Store.Read;
using IdentityQueue.Store.Work;

namespace IdentityQueue.Store.Tests.Import;

/// <summary>
/// Issue #15 point 5: <see cref="CatalogueReimporter"/> on real SQLite files — which rows a new version keeps, inserts and
/// removes, the rejections it replaces, the refusals; and how <see cref="CatalogueComparison"/> pairs entries.
/// </summary>
public sealed class CatalogueReimporterTests
{
    private static ReimportSummary Reimport(TempStore store, string path, ImportOptions? options = null)
    {
        var result = new CatalogueReimporter(store.Connection).Reimport(path, options);
        Assert.True(result.Success, result.Error?.Message);
        return result.Value!;
    }

    [Fact]
    public void SameIdentityWrittenDifferently_IsKept_WhileAnotherParameterOrFieldIsNew()
    {
        using var store = TempStore.Create();
        var path = store.File("c.idq", "a: (x+1)^2 = x^2+2*x+1\nb: (x+y)^5 = x^5 + y^5 over GF(5)\nf: x^n = x^n for n in 1..3\n");
        store.Import(path);
        var ids = store.Rows("SELECT label, id FROM candidate ORDER BY id").ToDictionary(r => (string)r[0]!, r => (long)r[1]!);
        store.Execute("UPDATE result SET state = 'survived', trials_zero = 3");

        // a: other spacing and redundant parentheses (the printed tree is the same); b: another field; f: n from 2.
        File.WriteAllText(path, "a: ((x + 1))^2 = x^2 + 2*x + 1\nb: (x+y)^5 = x^5 + y^5 over GF(7)\nf: x^n = x^n for n in 2..4\n");
        var s = Reimport(store, path);
        Assert.Equal((3, 0, 2, 2), (s.Kept, s.Relabelled, s.Added, s.Removed));
        Assert.Equal(ids["a"], store.Scalar("SELECT id FROM candidate WHERE label = 'a'"));
        Assert.Equal("((x + 1))^2", store.Scalar("SELECT lhs FROM candidate WHERE label = 'a'"));
        Assert.Equal(ids["f[n=2]"], store.Scalar("SELECT id FROM candidate WHERE label = 'f[n=2]'"));
        Assert.Equal(ids["f[n=3]"], store.Scalar("SELECT id FROM candidate WHERE label = 'f[n=3]'"));
        Assert.NotEqual(ids["b"], store.Scalar("SELECT id FROM candidate WHERE label = 'b'"));
        Assert.Equal(["a|survived", "b|pending", "f[n=2]|survived", "f[n=3]|survived", "f[n=4]|pending"],
            store.Rows("SELECT c.label, r.state FROM candidate c JOIN result r ON r.candidate_id = c.id ORDER BY c.label").Select(r => $"{r[0]}|{r[1]}"));
        Assert.Equal(0, store.Count("SELECT COUNT(*) FROM candidate WHERE label = 'f[n=1]'"));
    }

    [Fact]
    public void OpenEndedFamily_KeepsTheInstancesItHadGrown_AndANewFirstValueStartsOver()
    {
        using var store = TempStore.Create();
        var path = store.File("m.idq", "pow: x^n = x^n for n >= 0\n");
        store.Import(path, new ImportOptions { OpenBudget = OpenFamilyBudget.Create(20).Value });
        store.Execute("UPDATE result SET state = 'survived', trials_zero = 3");
        Assert.Equal(8, new OpenFamilies(store.Connection).Grow());
        store.Execute("UPDATE result SET state = 'survived', trials_zero = 3");
        var ids = store.Rows("SELECT label, id FROM candidate").ToDictionary(r => (string)r[0]!, r => (long)r[1]!);

        // The same family with other spacing: the 16 instances made so far keep their rows and verdicts, and the family
        // goes on growing from 16.
        File.WriteAllText(path, "pow: x ^ n = x ^ n for n >= 0\n");
        var s = Reimport(store, path, new ImportOptions { OpenBudget = OpenFamilyBudget.Create(20).Value });
        Assert.Equal((16, 0, 0), (s.Kept, s.Added, s.Removed));
        Assert.Equal(ids["pow[n=15]"], store.Scalar("SELECT id FROM candidate WHERE label = 'pow[n=15]'"));
        Assert.Equal([16L, 20L], store.Rows("SELECT made, budget FROM open_family").Single());
        Assert.Equal(4, new OpenFamilies(store.Connection).Grow());

        // Another first value is another family: its first chunk, n = 1..8, of which 1..7 were screened before.
        File.WriteAllText(path, "pow: x^n = x^n for n >= 1\n");
        s = Reimport(store, path);
        Assert.Equal((8, 0, 12), (s.Kept, s.Added, s.Removed));
        Assert.Equal([1L, 8L], store.Rows("SELECT first_value, made FROM open_family").Single());
    }

    [Fact]
    public void DuplicateIdentities_AreMatchedOneToOne_AndAnUnparsableHandInsertedRowIsRemoved()
    {
        using var store = TempStore.Create();
        var path = store.File("c.idq", "one: x*y = y*x\ntwo: x * y = y * x\n");
        var imported = store.Import(path);
        store.Execute($"INSERT INTO candidate (catalogue_id, label, lhs, rhs) VALUES ({imported.CatalogueId}, 'hand', 'x +', 'x')");
        store.Execute($"INSERT INTO result (candidate_id, state) SELECT id, 'invalid' FROM candidate WHERE label = 'hand'");

        File.WriteAllText(path, "only: x*y = y*x\n");
        var s = Reimport(store, path);
        Assert.Equal((1, 1, 0, 2), (s.Kept, s.Relabelled, s.Added, s.Removed));
        Assert.Equal(["only"], store.Rows("SELECT label FROM candidate").Select(r => (string)r[0]!));
        // The old version's record keeps all three, the hand-made row without an identity, the other two with one and the same.
        Assert.Equal(["hand|1", "one|0", "two|0"],
            store.Rows("SELECT label, CASE WHEN identity IS NULL THEN 1 ELSE 0 END FROM catalogue_version_entry WHERE version = 1 ORDER BY label").Select(r => $"{r[0]}|{r[1]}"));
        Assert.Equal(1, store.Count("SELECT COUNT(DISTINCT identity) FROM catalogue_version_entry"));
    }

    [Fact]
    public void Rejections_AreThoseOfTheNewFile_AndTheCountsAndSourceAreUpdated()
    {
        using var store = TempStore.Create();
        var path = store.File("c.idq", "a: x = x\nbad: x + = 1\n");
        store.Import(path);
        var moved = store.File("c2.idq", "a: x = x\nb: y = y\nworse: (y = 1\n");
        var s = Reimport(store, moved, new ImportOptions { CatalogueName = "c" });
        Assert.Equal((2, 1, 2), (s.Entries, s.Rejections, s.Version));
        Assert.Equal([3L], store.Rows("SELECT line FROM rejection").Select(r => r[0]));
        Assert.Equal(new object?[] { moved, 2L, 2L, 1L, 2L }, store.Rows("SELECT source, version, entries, rejections, instances FROM catalogue").Single());
    }

    [Fact]
    public void IsRefused_WhileCandidatesAreQueuedOrScreening_AndChangesNothing()
    {
        using var store = TempStore.Create();
        var path = store.File("c.idq", "a: x = x\nb: y = y\n");
        store.Import(path);
        store.Execute("UPDATE result SET state = 'screening' WHERE candidate_id = (SELECT id FROM candidate WHERE label = 'b')");
        File.WriteAllText(path, "a: x = x\n");
        var result = new CatalogueReimporter(store.Connection).Reimport(path);
        Assert.False(result.Success);
        Assert.Contains("1 candidates of 'c' are queued or being screened", result.Error?.Message);
        Assert.Equal(2, store.Count("SELECT COUNT(*) FROM candidate"));
        Assert.Equal(0, store.Count("SELECT COUNT(*) FROM catalogue_version_entry"));
    }

    [Fact]
    public void Compare_PairsByIdentityFirst_ThenByLabel()
    {
        static ComparedEntry E(long id, string label, string identity, string state) => new(id, label, identity, null, identity, state, null);
        var from = new[] { E(1, "a", "x = x", "survived"), E(2, "b", "y = 1", "refuted"), E(3, "c", "z = z", "survived"), E(4, "d", "w = w", "survived") };
        // a relabelled to a2 (same identity), b edited (same label, other identity), c unchanged, d removed, e added.
        var to = new[] { E(5, "a2", "x = x", "survived"), E(6, "b", "y = y", "survived"), E(3, "c", "z = z", "survived"), E(7, "e", "v = v", "pending") };
        var c = CatalogueComparison.Compare("v1", "v2", from, to);
        Assert.Equal(["e"], c.Added.Select(e => e.Label));
        Assert.Equal(["d"], c.Removed.Select(e => e.Label));
        var change = Assert.Single(c.Changed);
        Assert.Equal(("b", "b", true, true), (change.From.Label, change.To.Label, change.VerdictChanged, change.IdentityChanged));
        Assert.Equal(2, c.Unchanged);
    }
}
