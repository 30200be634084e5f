using System.Collections.Concurrent;
using System.Data.Common;
using IdentityQueue.Store.Schema;
using Microsoft.Data.Sqlite;
using Microsoft.EntityFrameworkCore;
using Npgsql;

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
/// One open connection to a store: a SQLite file in WAL journal mode with a busy timeout and foreign keys on, or a
/// PostgreSQL connection from the process's one <see cref="NpgsqlDataSource"/> for that database. Opening is cheap
/// (PostgreSQL connections come from the data source's pool); a connection is not thread-safe, so each worker thread
/// opens its own. Owns the connection.
/// </summary>
public sealed class StoreConnection : IDisposable
{
    /// <summary>The assembly holding the SQLite migrations; it must be deployed beside the application.</summary>
    public const string SqliteMigrationsAssembly = "IdentityQueue.Migrations.Sqlite";

    /// <summary>The assembly holding the PostgreSQL migrations; it must be deployed beside the application.</summary>
    public const string PostgreSqlMigrationsAssembly = "IdentityQueue.Migrations.PostgreSql";

    /// <summary>How long a statement waits for another connection's write lock before failing.</summary>
    public static readonly TimeSpan BusyTimeout = TimeSpan.FromSeconds(10);

    private static readonly ConcurrentDictionary<string, NpgsqlDataSource> DataSources = new(StringComparer.Ordinal);

    private readonly DbConnection _connection;
    private readonly DbContextOptions<IdentityStoreContext> _options;

    private StoreConnection(StoreLocation location, DbConnection connection)
    {
        Location = location;
        _connection = connection;
        _options = location.IsPostgreSql ? PostgreSqlContextOptions(connection) : ContextOptions(connection);
    }

    /// <summary>Where the store is.</summary>
    public StoreLocation Location { get; }

    /// <summary>The store as given, safe to print: a file path, or a PostgreSQL address without credentials.</summary>
    public string Path => Location.Display;

    /// <summary>Whether this is a PostgreSQL store (SQL that differs between the two asks this).</summary>
    public bool IsPostgreSql => Location.IsPostgreSql;

    /// <summary>The open connection, for commands the EF model does not express (bulk inserts, upserts).</summary>
    public DbConnection Connection => _connection;

    /// <summary>Opens the store at <paramref name="location"/>; see <see cref="OpenSqlite"/> and <see cref="OpenPostgreSql"/>.</summary>
    public static StoreConnection Open(StoreLocation location, bool create = false) =>
        location.IsPostgreSql ? OpenPostgreSql(location.Target) : OpenSqlite(location.Target, create);

    /// <summary>
    /// The process's data source for a PostgreSQL connection string: one per database and process, shared by the store's
    /// connections and the queue's (Hangfire's), so that one pool serves them all. Its size is the connection string's
    /// <c>Maximum Pool Size</c> (Npgsql's default 100).
    /// </summary>
    public static NpgsqlDataSource DataSource(string connectionString) =>
        DataSources.GetOrAdd(connectionString, static c =>
        {
            var builder = new NpgsqlConnectionStringBuilder(c);
            // The workers run the same few statements per candidate over and over: let Npgsql prepare them on the server
            // (Npgsql documentation, "Automatic preparation"), unless the connection string says otherwise.
            if (builder.MaxAutoPrepare == 0)
            {
                builder.MaxAutoPrepare = 64;
                builder.AutoPrepareMinUsages = 2;
            }
            return NpgsqlDataSource.Create(builder.ConnectionString);
        });

    /// <summary>Opens a connection to the PostgreSQL store; a server that cannot be reached is a <see cref="StoreUnavailableException"/>.</summary>
    public static StoreConnection OpenPostgreSql(string connectionString)
    {
        ArgumentException.ThrowIfNullOrEmpty(connectionString);
        var location = StoreLocation.PostgreSql(connectionString);
        NpgsqlDataSource source;
        try
        {
            source = DataSource(connectionString);
        }
        catch (ArgumentException e)
        {
            throw new StoreUnavailableException($"the PostgreSQL connection string is not valid: {e.Message}", e);
        }
        try
        {
            return new StoreConnection(location, source.OpenConnection());
        }
        catch (Exception e) when (e is NpgsqlException or System.Net.Sockets.SocketException or TimeoutException)
        {
            throw new StoreUnavailableException($"cannot connect to the PostgreSQL store {location.Display}: {e.Message}", e);
        }
    }

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
        return new StoreConnection(StoreLocation.Sqlite(path), connection);
    }

    /// <summary>A new EF context on this connection (the caller disposes it; the connection stays open).</summary>
    public IdentityStoreContext CreateContext() => new(_options);

    /// <summary>
    /// Applies every migration not yet applied. Idempotent; concurrent callers are serialised by EF's migration lock, but
    /// <c>idq init</c> is meant to run once before any worker starts.
    /// </summary>
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
            throw new InvalidOperationException($"no migrations found: the assembly {(IsPostgreSql ? PostgreSqlMigrationsAssembly : SqliteMigrationsAssembly)} is not deployed with the application");
        var latest = known[^1];
        List<string> applied;
        try
        {
            applied = context.Database.GetAppliedMigrations().ToList();
        }
        catch (DbException e)
        {
            throw new StoreUnavailableException($"cannot read the store '{Path}': {e.Message}", e);
        }
        var init = $"idq init {Location.Option}";
        var last = applied.Count == 0 ? null : applied[^1];
        var unknown = applied.Except(known, StringComparer.Ordinal).ToList();
        if (unknown.Count > 0)
            return new StoreVersion(false, true, last, latest,
                $"the store '{Path}' was upgraded by a newer idq (migration {unknown[^1]}); use that version of idq");
        if (applied.Count == 0)
            return new StoreVersion(false, false, null, latest, $"'{Path}' is not an initialised store: run '{init}'");
        var pending = known.Except(applied, StringComparer.Ordinal).Count();
        if (pending > 0)
            return new StoreVersion(false, false, last, latest,
                $"the store '{Path}' is at migration {last}, {pending} behind this idq ({latest}): run '{init}' to upgrade it");
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

    /// <summary>The EF options for a PostgreSQL connection, with the migrations in <see cref="PostgreSqlMigrationsAssembly"/>.</summary>
    public static DbContextOptions<IdentityStoreContext> PostgreSqlContextOptions(DbConnection connection) =>
        new DbContextOptionsBuilder<IdentityStoreContext>()
            .UseNpgsql(connection, npgsql => npgsql.MigrationsAssembly(PostgreSqlMigrationsAssembly))
            .Options;

    // ---- The few places where the two SQL dialects differ. ----

    /// <summary>
    /// A condition "<paramref name="column"/> is one of the ids in <paramref name="parameter"/>", whose value is
    /// <see cref="IdList"/>: SQLite reads a JSON array with json_each, PostgreSQL takes a bigint[] with = ANY.
    /// </summary>
    internal string IdIn(string column, string parameter) =>
        IsPostgreSql ? $"{column} = ANY({parameter})" : $"{column} IN (SELECT value FROM json_each({parameter}))";

    /// <summary>The parameter value for <see cref="IdIn"/>.</summary>
    internal object IdList(IEnumerable<long> ids) =>
        IsPostgreSql ? ids.ToArray() : "[" + string.Join(',', ids) + "]";

    /// <summary>SQL for "now minus <paramref name="seconds"/> seconds", comparable with the store's timestamps.</summary>
    public string SecondsAgo(int seconds) =>
        IsPostgreSql ? $"(now() - interval '{seconds} seconds')" : $"datetime('now', '-{seconds} seconds')";

    public void Dispose() => _connection.Dispose();
}
