using System.CommandLine;
using IdentityQueue.Store;

namespace IdentityQueue.Cli;

/// <summary><c>idq init</c>: creates the store, or upgrades it to this build's migration. Idempotent.</summary>
public static class InitCommand
{
    public static Command Create(TextWriter output, TextWriter error)
    {
        var store = new StoreOptions();
        var command = new Command("init", "Create the store, or upgrade it by applying the migrations it lacks. Running it again does nothing.\n\n" +
            "Examples:\n  idq init\n  idq init --db results.db\n  IDQ_DB=night.db idq init");
        store.AddTo(command);
        command.SetAction(parse => Execute(store.Path(parse), output, error));
        return command;
    }

    internal static int Execute(string path, TextWriter output, TextWriter error)
    {
        try
        {
            var existed = File.Exists(path);
            using var store = StoreConnection.OpenSqlite(path, create: true);
            var before = store.CheckVersion();
            if (before.IsNewer)
            {
                error.WriteLine($"idq init: {before.Message}");
                return ExitCodes.BadInput;
            }
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
    }
}
