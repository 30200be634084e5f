using IdentityQueue.Store;
using Microsoft.Data.Sqlite;

namespace IdentityQueue.Cli.Tests.Postgres;

/// <summary>
/// Issue #15 point 5 on a real PostgreSQL server: the same new-version scenario as <see cref="CatalogueVersionTests"/>
/// (kept ids and trials for unchanged identities, only new or edited instances pending and screened), and compare.
/// </summary>
public sealed class PostgresCatalogueVersionTests : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("idq-pg-versions-").FullName;
    private readonly List<string> _databases = [];

    public void Dispose()
    {
        foreach (var db in _databases) PostgresServer.DropDatabase(db);
        SqliteConnection.ClearAllPools();
        try { Directory.Delete(_dir, recursive: true); } catch (IOException) { }
    }

    [PostgresFact]
    public void NewVersion_KeepsUnchangedEvidence_AndScreensOnlyTheRest()
    {
        var pg = PostgresServer.CreateDatabase();
        _databases.Add(pg);
        var location = StoreLocation.PostgreSql(pg);
        CatalogueVersionTests.ImportRunNewVersionRun(_dir, ["--postgres", pg], location);
        var compared = StoreEndToEndTests.Idq("compare", "alg", "--postgres", pg);
        Assert.True(compared.Code == 0, compared.Err);
        Assert.Contains("alg version 1 → alg version 2: 3 added, 1 removed, 2 changed, 5 unchanged", compared.Out);
    }
}
