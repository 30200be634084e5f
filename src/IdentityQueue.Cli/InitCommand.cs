using System.CommandLine;
using IdentityQueue.Store;

namespace IdentityQueue.Cli;

/// <summary><c>idq init</c>: creates the store, or upgrades it to this build's migration. Idempotent.</summary>
public static class InitCommand
{
    public static Command Create(TextWriter output, TextWriter error)
    {
        var store = new StoreOptions();
        var command = new Command("init", "Create the store, or upgrade it by applying the migrations it lacks. Running it again does nothing.\n" +
            "On PostgreSQL it also creates the queue's tables (schema 'hangfire'); run it once before any worker starts.\n\n" +
            "Examples:\n  idq init\n  idq init --db results.db\n  idq init --postgres \"Host=db1;Database=idq;Username=idq;Password=secret\"");
        store.AddTo(command);
        command.SetAction(parse =>
        {
            if (store.Conflict(parse) is { } conflict)
            {
                error.WriteLine($"idq init: {conflict}");
                return ExitCodes.BadInput;
            }
            return Execute(store.Location(parse), output, error);
        });
        return command;
    }

    internal static int Execute(string path, TextWriter output, TextWriter error) => Execute(StoreLocation.Sqlite(path), output, error);

    internal static int Execute(StoreLocation location, TextWriter output, TextWriter error)
    {
        var path = location.Display;
        try
        {
            var existed = location.IsPostgreSql || File.Exists(location.Target);
            using var store = StoreConnection.Open(location, create: true);
            var before = store.CheckVersion();
            if (before.IsNewer)
            {
                error.WriteLine($"idq init: {before.Message}");
                return ExitCodes.BadInput;
            }
            // Hangfire's own tables (idempotent; its installer takes a lock so a second init waits for the first).
            if (location.IsPostgreSql) Worker.WorkerHost.InstallQueueSchema(StoreConnection.DataSource(location.Target));
            if (before.IsCurrent)
            {
                output.WriteLine($"store {path} is up to date (migration {before.Latest})");
                return ExitCodes.Success;
            }
            store.Migrate();
            output.WriteLine(before.Applied is null
                ? $"{(existed ? "initialised" : "created")} store {path} (migration {before.Latest})"
                : $"upgraded store {path} from migration {before.Applied} to {before.Latest}");
            return ExitCodes.Success;
        }
        catch (StoreUnavailableException e)
        {
            error.WriteLine($"idq init: {e.Message}");
            return ExitCodes.BadInput;
        }
        catch (System.Data.Common.DbException e) when (location.IsPostgreSql)
        {
            error.WriteLine($"idq init: the PostgreSQL store {path} could not be initialised: {e.Message}");
            return ExitCodes.BadInput;
        }
    }
}
