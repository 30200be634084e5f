using System.CommandLine;
using IdentityQueue.Store;

namespace IdentityQueue.Cli;

/// <summary>
/// The store options shared by every store command (SPEC §2): <c>--postgres CONNSTRING</c> (else <c>IDQ_POSTGRES</c>) for
/// a PostgreSQL store shared by many workers, otherwise <c>--db PATH</c> (else <c>IDQ_DB</c>, else
/// <c>identityqueue.db</c> in the working directory) for a SQLite file. One instance per command.
/// </summary>
internal sealed class StoreOptions
{
    public const string DefaultPath = "identityqueue.db";
    public const string EnvironmentVariable = "IDQ_DB";
    public const string PostgresEnvironmentVariable = "IDQ_POSTGRES";

    public Option<string?> Db { get; } = new("--db")
    {
        HelpName = "PATH",
        Description = $"The store, a SQLite file (default: ${EnvironmentVariable}, else {DefaultPath} in the working directory).",
    };

    public Option<string?> Postgres { get; } = new("--postgres")
    {
        HelpName = "CONNSTRING",
        Description = $"A PostgreSQL store instead, shared by any number of workers (default: ${PostgresEnvironmentVariable}), e.g. \"Host=db1;Database=idq;Username=idq;Password=…\".",
    };

    public void AddTo(Command command)
    {
        command.Options.Add(Db);
        command.Options.Add(Postgres);
    }

    /// <summary>
    /// The store the options select: --postgres, then --db, then $IDQ_POSTGRES, then $IDQ_DB, then the default file. An
    /// explicit option beats an environment variable, so --db works in a shell that exports IDQ_POSTGRES.
    /// </summary>
    public StoreLocation Location(ParseResult parse)
    {
        if (parse.GetValue(Postgres) is { Length: > 0 } postgres) return StoreLocation.PostgreSql(postgres);
        if (parse.GetValue(Db) is { Length: > 0 } db) return StoreLocation.Sqlite(db);
        if (Environment.GetEnvironmentVariable(PostgresEnvironmentVariable) is { Length: > 0 } fromEnvPostgres) return StoreLocation.PostgreSql(fromEnvPostgres);
        var fromEnvironment = Environment.GetEnvironmentVariable(EnvironmentVariable);
        return StoreLocation.Sqlite(string.IsNullOrEmpty(fromEnvironment) ? DefaultPath : fromEnvironment);
    }

    /// <summary>The problem when both --db and --postgres are given, else null.</summary>
    public string? Conflict(ParseResult parse) =>
        parse.GetValue(Postgres) is { Length: > 0 } && parse.GetValue(Db) is { Length: > 0 } ? "give either --db or --postgres, not both" : null;

    /// <summary>
    /// Opens the store for a command that needs it initialised and at this build's migration. Null, after writing
    /// why to <paramref name="error"/> (missing, unreachable, or to be upgraded with <c>idq init</c>), when it cannot.
    /// </summary>
    public StoreConnection? OpenCurrent(ParseResult parse, string command, TextWriter error)
    {
        if (Conflict(parse) is { } conflict)
        {
            error.WriteLine($"idq {command}: {conflict}");
            return null;
        }
        StoreConnection? store = null;
        try
        {
            store = StoreConnection.Open(Location(parse));
            store.EnsureCurrent();
            return store;
        }
        catch (StoreUnavailableException e)
        {
            store?.Dispose();
            error.WriteLine($"idq {command}: {e.Message}");
            return null;
        }
    }
}
