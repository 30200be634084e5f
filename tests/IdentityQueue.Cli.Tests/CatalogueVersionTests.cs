using System.Text.Json;
using IdentityQueue.Store;
using Microsoft.Data.Sqlite;
using static IdentityQueue.Cli.Tests.StoreEndToEndTests;

namespace IdentityQueue.Cli.Tests;

/// <summary>
/// Issue #15 point 5 on a real SQLite file: a new version of a catalogue keeps the evidence of the entries whose canonical
/// identity did not change and screens only the new or edited ones; <c>idq compare</c> lists the differences; <c>idq run
/// --summary</c> writes the counts as JSON and <c>--on-finish</c> runs a command that sees the summary's path.
/// </summary>
public sealed class CatalogueVersionTests : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("idq-versions-").FullName;

    public void Dispose()
    {
        SqliteConnection.ClearAllPools();
        try { Directory.Delete(_dir, recursive: true); } catch (IOException) { }
    }

    // Verdicts: (x+1)^2 and (x+1)^3 are the binomial theorem; (x+y)^2 = x^2 + y^2 is false (the cross term 2xy is
    // missing); x*y = y*x is commutativity; sum k = n(n+1)/2 is Gauss's formula; x^2 - y^2 = (x-y)(x+y) the difference of
    // squares (all common practice, school algebra).
    internal const string Version1 = """
        sq: (x+1)^2 = x^2 + 2*x + 1
        cube: (x+1)^3 = x^3 + 3*x^2 + 3*x + 1
        wrong: (x+y)^2 = x^2 + y^2
        gone: x*y = y*x
        fam: sum(k in 1..n: k) = n*(n+1)/2 for n in 1..4
        """;

    // sq is relabelled and respaced (same canonical identity); cube loses its +1 (now false); wrong gets its cross term
    // (now true); gone is dropped; fam grows to n = 6; new is added.
    internal const string Version2 = """
        square: (x + 1)^2 = x^2 + 2*x + 1
        cube: (x+1)^3 = x^3 + 3*x^2 + 3*x
        wrong: (x+y)^2 = x^2 + 2*x*y + y^2
        fam: sum(k in 1..n: k) = n*(n+1)/2 for n in 1..6
        new: x^2 - y^2 = (x-y)*(x+y)
        """;

    internal static List<string> Rows(StoreLocation store, string sql) =>
        ReadOnlyQuery.Run(store, sql).Rows.Select(r => string.Join("|", r.Select(QueryCommands.Text))).ToList();

    /// <summary>
    /// The whole scenario on a store given by its options (<c>--db FILE</c> or <c>--postgres CONN</c>): import, run, a new
    /// version, checks that the kept candidates kept ids and trials and that only the new or edited ones are pending, a second
    /// run, and checks that the kept trials were not touched.
    /// </summary>
    internal static void ImportRunNewVersionRun(string dir, string[] store, StoreLocation location, Action<string[]>? secondRunExtra = null, string[]? secondRunArgs = null)
    {
        var v1 = Path.Combine(dir, "alg.idq");
        File.WriteAllText(v1, Version1);
        Assert.Equal(0, Idq(["init", .. store]).Code);
        var imported = Idq(["import", v1, "--seed", "7", .. store]);
        Assert.True(imported.Code == 0, imported.Err);
        var run = Idq(["run", "--workers", "1", .. store]);
        Assert.True(run.Code == 0, run.Err + run.Out);
        Assert.Equal(["refuted"], Rows(location, "SELECT r.state FROM result r JOIN candidate c ON c.id = r.candidate_id WHERE c.label = 'wrong'"));

        const string Kept = """
            SELECT c.label, c.id, r.state, r.trials_zero,
                (SELECT COUNT(*) FROM trial t WHERE t.candidate_id = c.id), (SELECT MAX(t.id) FROM trial t WHERE t.candidate_id = c.id)
            FROM candidate c JOIN result r ON r.candidate_id = c.id
            WHERE c.label IN ('sq', 'square', 'fam[n=1]', 'fam[n=2]', 'fam[n=3]', 'fam[n=4]') ORDER BY c.id
            """;
        var before = Rows(location, Kept);
        Assert.Equal(5, before.Count);
        var oldIds = Rows(location, "SELECT label || '=' || id FROM candidate ORDER BY id");

        File.WriteAllText(v1, Version2);
        var again = Idq(["import", v1, "--new-version", .. store]);
        Assert.True(again.Code == 0, again.Err);
        Assert.Contains("is now version 2", again.Out);
        Assert.Contains("5 unchanged (evidence kept, 1 with a new label), 5 new or changed (pending), 3 removed", again.Out);

        // The unchanged identities kept their rows, verdicts and trials; sq is now called square.
        var after = Rows(location, Kept);
        Assert.Equal(before.Select(r => r.Replace("sq|", "square|", StringComparison.Ordinal)), after);
        // Exactly the new and edited instances are pending, under new ids; gone and the old cube and wrong are gone.
        Assert.Equal(["cube", "fam[n=5]", "fam[n=6]", "new", "wrong"],
            Rows(location, "SELECT c.label FROM candidate c JOIN result r ON r.candidate_id = c.id WHERE r.state = 'pending' ORDER BY c.label"));
        Assert.Equal(["0"], Rows(location, "SELECT COUNT(*) FROM candidate WHERE label = 'gone'"));
        foreach (var label in new[] { "cube", "wrong" })
            Assert.DoesNotContain(Rows(location, $"SELECT label || '=' || id FROM candidate WHERE label = '{label}'")[0], oldIds);
        // The old version's verdicts are kept for compare.
        Assert.Equal(["cube|survived", "fam[n=1]|survived", "fam[n=2]|survived", "fam[n=3]|survived", "fam[n=4]|survived", "gone|survived", "sq|survived", "wrong|refuted"],
            Rows(location, "SELECT label, state FROM catalogue_version_entry WHERE version = 1 ORDER BY label"));
        Assert.Equal(["2|5"], Rows(location, "SELECT version, entries FROM catalogue WHERE name = 'alg'"));

        var second = Idq(["run", "--workers", "1", .. store, .. secondRunArgs ?? []]);
        Assert.True(second.Code == 0, second.Err + second.Out);
        Assert.Equal(after, Rows(location, Kept));
        Assert.Equal(["cube|refuted", "wrong|survived"],
            Rows(location, "SELECT c.label, r.state FROM candidate c JOIN result r ON r.candidate_id = c.id WHERE c.label IN ('cube', 'wrong') ORDER BY c.label"));
        secondRunExtra?.Invoke([second.Out, second.Err]);
    }

    [Fact]
    public void NewVersion_KeepsUnchangedEvidence_ScreensOnlyTheRest_AndCompareListsTheDifferences()
    {
        var db = Path.Combine(_dir, "s.db");
        var location = StoreLocation.Sqlite(db);
        var summary = Path.Combine(_dir, "run.json");
        var seen = Path.Combine(_dir, "seen.txt");
        ImportRunNewVersionRun(_dir, ["--db", db], location, secondRunArgs:
            ["--summary", summary, "--on-finish", $"printf '%s %s' \"$IDQ_SUMMARY\" \"$IDQ_EXIT_CODE\" > '{seen}'; exit 3"],
            secondRunExtra: outputs =>
            {
                // The command ran, saw the summary's path and the exit code, and its own exit code 3 is reported, not returned.
                Assert.Equal($"{summary} 0", File.ReadAllText(seen));
                Assert.Contains("--on-finish exited with code 3", outputs[1]);
            });

        // The summary is valid JSON with the store's counts.
        using var json = JsonDocument.Parse(File.ReadAllText(summary));
        var root = json.RootElement;
        Assert.Equal(5, root.GetProperty("settledThisRun").GetInt64());
        Assert.Equal(0, root.GetProperty("exitCode").GetInt32());
        Assert.False(root.GetProperty("stopped").GetBoolean());
        Assert.Equal(1, root.GetProperty("totals").GetProperty("refuted").GetInt64());
        Assert.Equal(9, root.GetProperty("totals").GetProperty("survived").GetInt64());
        Assert.Equal(0, root.GetProperty("totals").GetProperty("pending").GetInt64());
        var catalogue = Assert.Single(root.GetProperty("catalogues").EnumerateArray());
        Assert.Equal("alg", catalogue.GetProperty("name").GetString());
        Assert.Equal("7", catalogue.GetProperty("seed").GetString());
        Assert.Equal(2, catalogue.GetProperty("version").GetInt32());
        Assert.Equal(9, catalogue.GetProperty("states").GetProperty("survived").GetInt64());
        Assert.Equal(["cube"], catalogue.GetProperty("refuted").EnumerateArray().Select(e => e.GetString()));
        Assert.Equal(Rows(location, "SELECT c.label FROM candidate c JOIN result r ON r.candidate_id = c.id WHERE r.state = 'survived' ORDER BY c.label"),
            catalogue.GetProperty("survived").EnumerateArray().Select(e => e.GetString()!).Order(StringComparer.Ordinal));

        // compare: version 1 against version 2.
        var text = Idq("compare", "alg", "--db", db);
        Assert.True(text.Code == 0, text.Err);
        Assert.Contains("alg version 1 → alg version 2: 3 added, 1 removed, 2 changed, 5 unchanged", text.Out);
        Assert.Contains("  - gone [survived]: x*y = y*x", text.Out);
        Assert.Contains("  ~ cube: survived → refuted; edited:", text.Out);
        var compared = Idq("compare", "alg", "--version", "1", "--json", "--db", db);
        Assert.True(compared.Code == 0, compared.Err);
        using var doc = JsonDocument.Parse(compared.Out);
        var c = doc.RootElement;
        Assert.Equal(["fam[n=5]", "fam[n=6]", "new"], c.GetProperty("added").EnumerateArray().Select(e => e.GetProperty("label").GetString()).Order(StringComparer.Ordinal));
        Assert.Equal(["gone"], c.GetProperty("removed").EnumerateArray().Select(e => e.GetProperty("label").GetString()));
        var changed = c.GetProperty("changed").EnumerateArray()
            .Select(e => $"{e.GetProperty("to").GetProperty("label").GetString()}:{e.GetProperty("from").GetProperty("state").GetString()}->{e.GetProperty("to").GetProperty("state").GetString()}:{e.GetProperty("identityChanged").GetBoolean()}")
            .Order(StringComparer.Ordinal);
        Assert.Equal(["cube:survived->refuted:True", "wrong:refuted->survived:True"], changed);
        Assert.Equal(5, c.GetProperty("unchanged").GetInt32());

        // Two catalogues: the first version imported beside the second, unscreened, pairs by identity.
        var v1 = Path.Combine(_dir, "first.idq");
        File.WriteAllText(v1, Version1);
        Assert.Equal(0, Idq("import", v1, "--db", db).Code);
        var two = Idq("compare", "first", "alg", "--json", "--db", db);
        Assert.True(two.Code == 0, two.Err);
        using var pair = JsonDocument.Parse(two.Out);
        Assert.Equal(["gone"], pair.RootElement.GetProperty("removed").EnumerateArray().Select(e => e.GetProperty("label").GetString()));
        Assert.Equal(3, pair.RootElement.GetProperty("added").GetArrayLength());
    }

    [Fact]
    public void NewVersion_IsRefused_ForAnUnknownCatalogue_OrAnotherSeed_AndCompareNeedsTwoVersions()
    {
        var db = Path.Combine(_dir, "s.db");
        var file = Path.Combine(_dir, "alg.idq");
        File.WriteAllText(file, Version1);
        Assert.Equal(0, Idq("init", "--db", db).Code);
        var unknown = Idq("import", file, "--new-version", "--db", db);
        Assert.Equal(2, unknown.Code);
        Assert.Contains("the store has no catalogue named 'alg' to replace", unknown.Err);
        Assert.Equal(0, Idq("import", file, "--seed", "5", "--db", db).Code);
        var seed = Idq("import", file, "--new-version", "--seed", "6", "--db", db);
        Assert.Equal(2, seed.Code);
        Assert.Contains("keeps the catalogue's seed 5", seed.Err);
        var one = Idq("compare", "alg", "--db", db);
        Assert.Equal(2, one.Code);
        Assert.Contains("has one version only", one.Err);
        // The same file again as a new version changes nothing and keeps every candidate.
        var ids = Query(db, "SELECT id FROM candidate ORDER BY id").Select(r => r[0]).ToList();
        var same = Idq("import", file, "--new-version", "--db", db);
        Assert.True(same.Code == 0, same.Err);
        Assert.Contains("8 unchanged (evidence kept), 0 new or changed (pending), 0 removed", same.Out);
        Assert.Equal(ids, Query(db, "SELECT id FROM candidate ORDER BY id").Select(r => r[0]).ToList());
    }

    [Fact]
    public void Run_WithOnFinishOnly_PassesATemporarySummary_AndABadSummaryFolderIsBadInput()
    {
        var db = Path.Combine(_dir, "s.db");
        var file = Path.Combine(_dir, "alg.idq");
        File.WriteAllText(file, Version1);
        Assert.Equal(0, Idq("init", "--db", db).Code);
        Assert.Equal(0, Idq("import", file, "--db", db).Code);
        var bad = Idq("run", "--db", db, "--summary", Path.Combine(_dir, "no-such-folder", "run.json"));
        Assert.Equal(2, bad.Code);
        Assert.Contains("does not exist", bad.Err);
        var copy = Path.Combine(_dir, "copy.json");
        var run = Idq("run", "--workers", "1", "--db", db, "--on-finish", $"cp \"$IDQ_SUMMARY\" '{copy}'");
        Assert.True(run.Code == 0, run.Err);
        Assert.Contains("--on-finish: exit code 0", run.Out);
        using var json = JsonDocument.Parse(File.ReadAllText(copy));
        // 8 candidates (4 lines and a family of 4), settled in this run: one refuted (wrong), seven survived.
        Assert.Equal(8, json.RootElement.GetProperty("settledThisRun").GetInt64());
        Assert.Equal(1, json.RootElement.GetProperty("totals").GetProperty("refuted").GetInt64());
        Assert.Equal(7, json.RootElement.GetProperty("totals").GetProperty("survived").GetInt64());
    }
}
