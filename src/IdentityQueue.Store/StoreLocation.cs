using Npgsql;

namespace IdentityQueue.Store;

/// <summary>The two kinds of store: an embedded SQLite file (the default) or a PostgreSQL database (scale-out).</summary>
public enum StoreProvider
{
    Sqlite,
    PostgreSql,
}

/// <summary>
/// Where a store lives: a SQLite file path or a PostgreSQL connection string. <see cref="Display"/> is safe to print
/// (a PostgreSQL password is never shown). Immutable.
/// </summary>
public sealed record StoreLocation(StoreProvider Provider, string Target)
{
    public static StoreLocation Sqlite(string path) => new(StoreProvider.Sqlite, path);

    public static StoreLocation PostgreSql(string connectionString) => new(StoreProvider.PostgreSql, connectionString);

    public bool IsPostgreSql => Provider == StoreProvider.PostgreSql;

    /// <summary>The file path, or "postgres://host:port/database" without user or password.</summary>
    public string Display
    {
        get
        {
            if (!IsPostgreSql) return Target;
            try
            {
                var b = new NpgsqlConnectionStringBuilder(Target);
                return $"postgres://{b.Host}:{b.Port}/{b.Database}";
            }
            catch (ArgumentException)
            {
                return "postgres://(unreadable connection string)";
            }
        }
    }

    /// <summary>The store option that selects this store on the command line, for messages ("--db x.db" or "--postgres …").</summary>
    public string Option => IsPostgreSql ? "--postgres CONNSTRING" : $"--db {Target}";

    public override string ToString() => Display;
}
