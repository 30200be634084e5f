using IdentityQueue.Store;
using IdentityQueue.Store.Schema;
using Microsoft.EntityFrameworkCore.Design;
using Npgsql;

namespace IdentityQueue.Migrations.PostgreSql;

/// <summary>
/// Lets <c>dotnet ef migrations add</c> build the model for the PostgreSQL provider without a running server: the
/// connection is never opened by scaffolding.
/// </summary>
public sealed class DesignTimeContextFactory : IDesignTimeDbContextFactory<IdentityStoreContext>
{
    public IdentityStoreContext CreateDbContext(string[] args) =>
        new(StoreConnection.PostgreSqlContextOptions(new NpgsqlConnection("Host=127.0.0.1;Database=design_time")));
}
