using Microsoft.EntityFrameworkCore;
using Microsoft.EntityFrameworkCore.Infrastructure;
namespace IdentityQueue.Store.Tests.Schema;

public sealed class MigrationTests
{
    // The names of SPEC §4, as listed by the project's contract check (shared/contract/check-contract.sh).
    public static TheoryData<string, string[]> PublicColumns => new()
    {
        { "catalogue", ["id", "name", "source", "imported_at", "seed"] },
        { "candidate", ["id", "catalogue_id", "label", "family", "params", "lhs", "rhs", "field", "created_at"] },
        { "result", ["candidate_id", "state", "degree_bound", "height_bound_log2", "trials_zero", "error_bound_log2", "witness_trial_id", "certified", "message", "updated_at"] },
        { "trial", ["id", "candidate_id", "seq", "modulus", "field_bits", "point_seed", "outcome", "difference", "bound_log2", "elapsed_us", "worker"] },
        { "rejection", ["id", "catalogue_id", "source", "line", "raw", "reason"] },
        { "verdicts", ["candidate_id", "catalogue", "label", "family", "state", "degree_bound", "trials", "error_bound_log2", "witness_modulus", "witness_point", "message"] },
        { "survivors", ["label", "state"] },
        { "families", ["catalogue", "family", "instances", "survived", "refuted", "other", "first_refuted", "survived_params", "holds_for", "fails_for"] },
        { "counterexamples", ["candidate_id", "label", "point", "lhs_value", "rhs_value", "max_abs", "exhaustive"] },
        { "differences", ["candidate_id", "label", "difference", "terms", "total_degree"] },
        { "equivalents", ["candidate_id", "label", "group_label"] },
    };

    [Theory]
    [MemberData(nameof(PublicColumns))]
    public void Migrations_CreateEveryPublicColumn(string table, string[] columns)
    {
        using var store = TempStore.Create();
        var have = store.Columns(table);
        Assert.NotEmpty(have);
        Assert.All(columns, c => Assert.Contains(c, have));
    }

    [Fact]
    public void Verdicts_HasTheSpecColumnsFirstAndInOrder()
    {
        using var store = TempStore.Create();
        var have = store.Columns("verdicts");
        string[] spec = ["candidate_id", "catalogue", "label", "family", "state", "degree_bound", "trials", "error_bound_log2", "witness_modulus", "witness_point", "message"];
        Assert.Equal(spec, have.Take(spec.Length));
    }

    [Fact]
    public void Migrations_MatchTheModel()
    {
        // A model change without a migration would make Migrate() refuse to run (EF Core's PendingModelChangesWarning).
        using var store = TempStore.Create();
        using var context = store.Connection.CreateContext();
        Assert.False(Microsoft.EntityFrameworkCore.RelationalDatabaseFacadeExtensions.HasPendingModelChanges(context.Database));
    }

    [Fact]
    public void Migrate_IsIdempotent()
    {
        using var store = TempStore.Create();
        var before = store.Rows("SELECT type, name, sql FROM sqlite_master ORDER BY name").Select(r => string.Join("|", r)).ToList();
        store.Connection.Migrate();
        store.Connection.Migrate();
        var after = store.Rows("SELECT type, name, sql FROM sqlite_master ORDER BY name").Select(r => string.Join("|", r)).ToList();
        Assert.Equal(before, after);
        using (var context = store.Connection.CreateContext())
            Assert.Equal(context.Database.GetMigrations().Count(), store.Count("SELECT COUNT(*) FROM __EFMigrationsHistory"));
        Assert.True(store.Connection.CheckVersion().IsCurrent);
    }

    [Fact]
    public void CheckVersion_OfAnEmptyDatabase_SaysToRunInit()
    {
        using var store = TempStore.Create(migrate: false);
        var version = store.Connection.CheckVersion();
        Assert.False(version.IsCurrent);
        Assert.Null(version.Applied);
        Assert.Contains("idq init", version.Message);
        Assert.Throws<StoreUnavailableException>(store.Connection.EnsureCurrent);
    }

    [Fact]
    public void CheckVersion_OfAStoreWithAnUnknownMigration_SaysItIsNewer()
    {
        using var store = TempStore.Create();
        store.Execute("INSERT INTO __EFMigrationsHistory (MigrationId, ProductVersion) VALUES ('29991231000000_FromTheFuture', '99.0')");
        var version = store.Connection.CheckVersion();
        Assert.False(version.IsCurrent);
        Assert.True(version.IsNewer);
        Assert.Contains("newer idq", version.Message);
    }

    [Fact]
    public void OpenSqlite_WithoutCreate_RefusesAMissingFile_AndCreatesNothing()
    {
        var path = Path.Combine(Path.GetTempPath(), "idq-store-tests", Guid.NewGuid().ToString("N") + ".db");
        var e = Assert.Throws<StoreUnavailableException>(() => StoreConnection.OpenSqlite(path));
        Assert.Contains("idq init", e.Message);
        Assert.False(File.Exists(path));
    }

    [Fact]
    public void OpenSqlite_OfAFileThatIsNotADatabase_SaysSo()
    {
        using var store = TempStore.Create(migrate: false);
        var path = store.File("not-a-store.db", new string('x', 4096));
        var e = Assert.Throws<StoreUnavailableException>(() => StoreConnection.OpenSqlite(path));
        Assert.Contains("not-a-store.db", e.Message);
    }

    [Fact]
    public void Connection_UsesWal_ForeignKeys_AndABusyTimeout()
    {
        using var store = TempStore.Create();
        Assert.Equal("wal", store.Scalar("PRAGMA journal_mode"));
        Assert.Equal(1L, store.Scalar("PRAGMA foreign_keys"));
        Assert.Equal((long)StoreConnection.BusyTimeout.TotalMilliseconds, store.Scalar("PRAGMA busy_timeout"));
    }

    [Fact]
    public void HandInsertedRows_GetTheDefaults()
    {
        using var store = TempStore.Create();
        store.Execute("INSERT INTO catalogue (name) VALUES ('by-hand')");
        store.Execute("INSERT INTO candidate (catalogue_id, label, lhs, rhs) VALUES (1, 'square', '(x+1)^2', 'x^2 + 2*x + 1')");
        var row = Assert.Single(store.Rows("SELECT field, family, params, created_at FROM candidate"));
        Assert.Equal("Q", row[0]);
        Assert.Null(row[1]);
        Assert.Null(row[2]);
        // CURRENT_TIMESTAMP: UTC as 'YYYY-MM-DD HH:MM:SS' (SQLite documentation, "Date And Time Functions").
        Assert.Matches(@"^\d{4}-\d{2}-\d{2} \d{2}:\d{2}:\d{2}$", (string)row[3]!);
        Assert.Equal(0, store.Count("SELECT COUNT(*) FROM result"));
        Assert.Equal("pending", store.Scalar("SELECT state FROM verdicts"));
        Assert.Equal(64L, store.Scalar("SELECT target_bits FROM catalogue"));
    }

    [Fact]
    public void Result_RefusesAStateOutsideTheSpec()
    {
        using var store = TempStore.Create();
        store.Execute("INSERT INTO catalogue (name) VALUES ('c')");
        store.Execute("INSERT INTO candidate (catalogue_id, label, lhs, rhs) VALUES (1, 'a', 'x', 'x')");
        Assert.ThrowsAny<Microsoft.Data.Sqlite.SqliteException>(() => store.Execute("INSERT INTO result (candidate_id, state) VALUES (1, 'done')"));
    }

    [Fact]
    public void DeletingACatalogue_RemovesItsCandidatesResultsTrialsAndRejections()
    {
        using var store = TempStore.Create();
        var path = store.File("c.idq", "a: x = x\nb: (x = x\n");
        store.Import(path);
        store.Execute("DELETE FROM catalogue");
        foreach (var table in new[] { "candidate", "result", "trial", "rejection" })
            Assert.Equal(0, store.Count($"SELECT COUNT(*) FROM {table}"));
    }
}

public sealed class KeySchemeMigrationTests
{
    [Fact]
    public void CataloguesOfAnOlderStoreKeepIdKeyedTrials_NewImportsUseCanonicalKeys()
    {
        using var store = TempStore.Create(migrate: false);
        using (var context = store.Connection.CreateContext())
            context.GetService<Microsoft.EntityFrameworkCore.Migrations.IMigrator>().Migrate("20261201224457_AddWorkerTable");
        store.Execute("INSERT INTO catalogue (name, seed) VALUES ('old', 7)");
        store.Execute("INSERT INTO candidate (catalogue_id, label, lhs, rhs) VALUES (1, 'o', '(x+1)^2', 'x^2+1')");
        store.Connection.Migrate();
        Assert.Equal(0L, store.Scalar("SELECT key_scheme FROM catalogue WHERE name = 'old'"));
        Some.Catalogue(store, "n: (x+1)^2 = x^2+1\n");
        Assert.Equal(1L, store.Scalar("SELECT key_scheme FROM catalogue WHERE name = 'c'"));

        // the old catalogue's candidate is seeded by its id, the new one's by its canonical identity
        var candidates = new IdentityQueue.Store.Work.CandidateStore(store.Connection);
        var old = candidates.LoadCandidate(1)!;
        var fresh = candidates.LoadCandidate(Some.Id(store, "n"))!;
        Assert.Equal(1UL, old.TrialKey(old.Bind()));
        var bound = fresh.Bind();
        Assert.Equal(IdentityQueue.Screening.CandidateKey.Of(bound.Entry!, bound.Parameters), fresh.TrialKey(bound));
    }
}
