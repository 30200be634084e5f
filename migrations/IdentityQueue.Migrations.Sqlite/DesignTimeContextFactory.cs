using IdentityQueue.Store;
using IdentityQueue.Store.Schema;
using Microsoft.Data.Sqlite;
using Microsoft.EntityFrameworkCore.Design;

namespace IdentityQueue.Migrations.Sqlite;

/// <summary>
/// Lets <c>dotnet ef migrations add</c> build the model for the SQLite provider without a running application.
/// The connection is never opened by scaffolding; a throw-away file name keeps any accidental use away from real stores.
/// </summary>
public sealed class DesignTimeContextFactory : IDesignTimeDbContextFactory<IdentityStoreContext>
{
    public IdentityStoreContext CreateDbContext(string[] args) =>
        new(StoreConnection.ContextOptions(new SqliteConnection("Data Source=design-time.db")));
}
