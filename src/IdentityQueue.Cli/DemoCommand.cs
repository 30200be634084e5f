using System.CommandLine;
using IdentityQueue.Store;
using IdentityQueue.Store.Import;

namespace IdentityQueue.Cli;

/// <summary><c>idq demo</c>: a fresh store from <c>seeds-demo/</c>, screened, with a summary and example SQL.</summary>
internal static class DemoCommand
{
    /// <summary>The demo store's file and its SQLite and queue companions, removed before a fresh demo.</summary>
    private static readonly string[] StoreFileSuffixes = ["", "-wal", "-shm", ".queue", ".queue-wal", ".queue-shm"];

    internal static readonly (string Title, string Sql)[] Examples =
    [
        ("survivors by family (very likely true; evidence, not proof)",
            "SELECT coalesce(family, label) AS family, count(*) AS survivors, round(max(error_bound_log2), 1) AS weakest_log2 FROM survivors GROUP BY 1 ORDER BY 1"),
        ("refutations with their witnesses",
            "SELECT label, witness_modulus, substr(witness_point, 1, 50) AS witness_point FROM verdicts WHERE state = 'refuted' ORDER BY candidate_id LIMIT 8"),
        ("families that fail only at some n",
            "SELECT family, instances, survived, refuted, first_refuted FROM families WHERE refuted > 0 AND survived > 0 ORDER BY family"),
    ];

    public static Command Create(TextWriter output, TextWriter error)
    {
        var db = new Option<string>("--db") { Description = "Where to make the demo store (replaced if it exists).", DefaultValueFactory = _ => "identityqueue-demo.db" };
        var seeds = new Option<string?>("--seeds") { Description = "The folder of demo catalogues (default: seeds-demo/ here, else the one shipped with idq)." };
        var workers = new Option<int?>("--workers") { Description = "Worker threads (default: the number of cores)." };
        var command = new Command("demo", "Make a fresh store from the demo catalogues, screen it, and print a summary with example SQL.\n\n" +
            "Examples:\n  idq demo\n  idq demo --db /tmp/demo.db --workers 2\n  idq demo && idq report --db identityqueue-demo.db --out demo-report") { db, seeds, workers };
        command.SetAction(parse =>
        {
            var folder = parse.GetValue(seeds) ?? Locate();
            if (folder is null || !Directory.Exists(folder))
            {
                error.WriteLine("idq demo: the folder seeds-demo/ was not found here or beside idq; give it with --seeds DIR");
                return ExitCodes.BadInput;
            }
            var path = parse.GetValue(db)!;
            foreach (var suffix in StoreFileSuffixes)
                if (File.Exists(path + suffix)) File.Delete(path + suffix);
            var files = CatalogueImporter.Extensions.SelectMany(e => Directory.GetFiles(folder, "*" + e)).OrderBy(f => f, StringComparer.Ordinal).ToList();
            output.WriteLine($"demo store {path} from {folder}: {files.Count} catalogues");
            using (var connection = StoreConnection.OpenSqlite(path, create: true))
            {
                connection.Migrate();
                var imported = ImportCommand.Execute(connection, files, new ImportOptions { Seed = 20261201 }, output, error);
                if (imported != ExitCodes.Success) return imported;
            }
            output.WriteLine();
            var runArgs = new List<string> { "run", "--db", path };
            if (parse.GetValue(workers) is int w) runArgs.AddRange(["--workers", w.ToString(System.Globalization.CultureInfo.InvariantCulture)]);
            var code = CliApp.Run([.. runArgs], output, error);
            if (code is not (ExitCodes.Success or ExitCodes.Found)) return code;
            foreach (var (title, sql) in Examples)
            {
                output.WriteLine();
                output.WriteLine($"-- {title}");
                output.WriteLine($"idq sql --db {path} \"{sql}\"");
                QueryCommands.WriteTable(output, ReadOnlyQuery.Run(StoreLocation.Sqlite(path), sql), maxWidth: 50);
            }
            return ExitCodes.Success;
        });
        return command;
    }

    private static string? Locate()
    {
        foreach (var start in new[] { Directory.GetCurrentDirectory(), AppContext.BaseDirectory })
            for (var dir = new DirectoryInfo(start); dir is not null; dir = dir.Parent)
                if (Directory.Exists(Path.Combine(dir.FullName, "seeds-demo"))) return Path.Combine(dir.FullName, "seeds-demo");
        return null;
    }
}
