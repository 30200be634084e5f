using System.Data.Common;
using IdentityQueue.Store.Schema;
using Microsoft.Data.Sqlite;
using Microsoft.EntityFrameworkCore;

namespace IdentityQueue.Store;

/// <summary>The store cannot be used as asked: its file is missing, unreadable, not a store, or at another migration.</summary>
public sealed class StoreUnavailableException(string message, Exception? inner = null) : Exception(message, inner);

/// <summary>Where a store's schema stands against the migrations this build knows.</summary>
/// <param name="IsCurrent">Every known migration is applied and no unknown one is.</param>
/// <param name="IsNewer">The store has a migration this build does not know: a newer idq upgraded it.</param>
/// <param name="Applied">The last applied migration, or null for an empty database.</param>
/// <param name="Latest">The last migration this build knows.</param>
/// <param name="Message">When not current: what is wrong and what to do.</param>
public sealed record StoreVersion(bool IsCurrent, bool IsNewer, string? Applied, string Latest, string? Message);

/// <summary>
/// One open connection to a store: a SQLite file in WAL journal mode with a busy timeout and foreign keys on.
/// Opening is cheap; a connection is not thread-safe, so each worker thread opens its own. Owns the connection.
/// </summary>
public sealed class StoreConnection : IDisposable
{
    /// <summary>The assembly holding the SQLite migrations; it must be deployed beside the application.</summary>
    public const string SqliteMigrationsAssembly = "IdentityQueue.Migrations.Sqlite";

    /// <summary>How long a statement waits for another connection's write lock before failing.</summary>
    public static readonly TimeSpan BusyTimeout = TimeSpan.FromSeconds(10);

    private readonly SqliteConnection _connection;
    private readonly DbContextOptions<IdentityStoreContext> _options;

    private StoreConnection(string path, SqliteConnection connection)
    {
        Path = path;
        _connection = connection;
        _options = ContextOptions(connection);
    }

    /// <summary>The store's file path as given.</summary>
    public string Path { get; }

    /// <summary>The open connection, for commands the EF model does not express (bulk inserts, upserts).</summary>
    public DbConnection Connection => _connection;

    /// <summary>
    /// Opens the SQLite store at <paramref name="path"/>. With <paramref name="create"/> a missing file is created
    /// (for <c>idq init</c>); otherwise a missing file is a <see cref="StoreUnavailableException"/> that says to run init.
    /// </summary>
    public static StoreConnection OpenSqlite(string path, bool create = false)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        if (!create && !File.Exists(path))
            throw new StoreUnavailableException($"there is no store at '{path}': run 'idq init --db {path}' first");
        var builder = new SqliteConnectionStringBuilder
        {
            DataSource = path,
            Mode = create ? SqliteOpenMode.ReadWriteCreate : SqliteOpenMode.ReadWrite,
            // One connection per StoreConnection, held for its life; pooling would only keep files open after Dispose.
            Pooling = false,
            ForeignKeys = true,
        };
        var connection = new SqliteConnection(builder.ToString());
        try
        {
            connection.Open();
            using var pragma = connection.CreateCommand();
            // WAL lets readers (idq status, idq sql) run beside the writers; busy_timeout makes a writer wait for the
            // lock instead of failing at once (SQLite documentation, "Write-Ahead Logging" and "busy_timeout").
            pragma.CommandText = $"PRAGMA journal_mode = WAL; PRAGMA synchronous = NORMAL; PRAGMA busy_timeout = {(int)BusyTimeout.TotalMilliseconds}; PRAGMA foreign_keys = ON;";
            pragma.ExecuteNonQuery();
        }
        catch (SqliteException e)
        {
            connection.Dispose();
            throw new StoreUnavailableException($"cannot open the store '{path}': {e.Message}", e);
        }
        return new StoreConnection(path, connection);
    }

    /// <summary>A new EF context on this connection (the caller disposes it; the connection stays open).</summary>
    public IdentityStoreContext CreateContext() => new(_options);

    /// <summary>Applies every migration not yet applied (idempotent; concurrent callers are serialised by EF's migration lock).</summary>
    public void Migrate()
    {
        using var context = CreateContext();
        context.Database.Migrate();
    }

    /// <summary>Whether the store is at the migration this build expects; every store command calls this first.</summary>
    public StoreVersion CheckVersion()
    {
        using var context = CreateContext();
        var known = context.Database.GetMigrations().ToList();
        if (known.Count == 0)
            throw new InvalidOperationException($"no migrations found: the assembly {SqliteMigrationsAssembly} is not deployed with the application");
        var latest = known[^1];
        List<string> applied;
        try
        {
            applied = context.Database.GetAppliedMigrations().ToList();
        }
        catch (SqliteException e)
        {
            throw new StoreUnavailableException($"cannot read the store '{Path}': {e.Message}", e);
        }
        var last = applied.Count == 0 ? null : applied[^1];
        var unknown = applied.Except(known, StringComparer.Ordinal).ToList();
        if (unknown.Count > 0)
            return new StoreVersion(false, true, last, latest,
                $"the store '{Path}' was upgraded by a newer idq (migration {unknown[^1]}); use that version of idq");
        if (applied.Count == 0)
            return new StoreVersion(false, false, null, latest, $"'{Path}' is not an initialised store: run 'idq init --db {Path}'");
        var pending = known.Except(applied, StringComparer.Ordinal).Count();
        if (pending > 0)
            return new StoreVersion(false, false, last, latest,
                $"the store '{Path}' is at migration {last}, {pending} behind this idq ({latest}): run 'idq init --db {Path}' to upgrade it");
        return new StoreVersion(true, false, last, latest, null);
    }

    /// <summary>Throws a <see cref="StoreUnavailableException"/> with <see cref="StoreVersion.Message"/> unless the store is current.</summary>
    public void EnsureCurrent()
    {
        var version = CheckVersion();
        if (!version.IsCurrent) throw new StoreUnavailableException(version.Message!);
    }

    /// <summary>The EF options for a SQLite connection, with the migrations in <see cref="SqliteMigrationsAssembly"/>.</summary>
    public static DbContextOptions<IdentityStoreContext> ContextOptions(DbConnection connection) =>
        new DbContextOptionsBuilder<IdentityStoreContext>()
            .UseSqlite(connection, sqlite => sqlite.MigrationsAssembly(SqliteMigrationsAssembly))
            .Options;

    public void Dispose() => _connection.Dispose();
}
