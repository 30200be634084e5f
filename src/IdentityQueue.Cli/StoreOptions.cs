using System.CommandLine;
using IdentityQueue.Store;

namespace IdentityQueue.Cli;

/// <summary>
/// <c>--db PATH</c>, shared by every store command (SPEC §2): the SQLite file, else <c>IDQ_DB</c>, else
/// <c>identityqueue.db</c> in the working directory. One instance per command.
/// </summary>
internal sealed class StoreOptions
{
    public const string DefaultPath = "identityqueue.db";
    public const string EnvironmentVariable = "IDQ_DB";

    public Option<string?> Db { get; } = new("--db")
    {
        HelpName = "PATH",
        Description = $"The store, a SQLite file (default: ${EnvironmentVariable}, else {DefaultPath} in the working directory).",
    };

    public void AddTo(Command command) => command.Options.Add(Db);

    public string Path(ParseResult parse)
    {
        var given = parse.GetValue(Db);
        if (!string.IsNullOrEmpty(given)) return given;
        var fromEnvironment = Environment.GetEnvironmentVariable(EnvironmentVariable);
        return string.IsNullOrEmpty(fromEnvironment) ? DefaultPath : fromEnvironment;
    }

    /// <summary>
    /// Opens the store for a command that needs it initialised and at this build's migration. Null, after writing
    /// why to <paramref name="error"/> (missing, unreadable, or to be upgraded with <c>idq init</c>), when it cannot.
    /// </summary>
    public StoreConnection? OpenCurrent(ParseResult parse, string command, TextWriter error)
    {
        var path = Path(parse);
        StoreConnection? store = null;
        try
        {
            store = StoreConnection.OpenSqlite(path);
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
