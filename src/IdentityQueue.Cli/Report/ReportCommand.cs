using System.CommandLine;
using System.Reflection;
using IdentityQueue.Store;
using IdentityQueue.Store.Read;

namespace IdentityQueue.Cli.Report;

/// <summary><c>idq report</c>: one self-contained HTML page with inline SVG charts for a store, written to <c>DIR/index.html</c>.</summary>
internal static class ReportCommand
{
    public const string DefaultFolder = "idq-report";

    public static Command Create(TextWriter output, TextWriter error)
    {
        var outDir = new Option<string>("--out") { HelpName = "DIR", Description = $"The folder to write index.html to (created if needed; default {DefaultFolder}).", DefaultValueFactory = _ => DefaultFolder };
        var catalogue = new Option<string[]>("--catalogue") { HelpName = "NAME", Description = "Only this catalogue (repeatable; default: all of them)." };
        var store = new StoreOptions();
        var command = new Command("report", "Write a self-contained HTML report of a store: counts by state, refutations by escalation stage, the survivors'\n" +
            "error bounds, screening time per candidate, families with the parameters at which they fail, and the rejections.\n" +
            "One file, DIR/index.html, with inline SVG charts; it loads nothing from the network. Survivors are very likely\n" +
            "true, not proven: an error bound is only as good as the degree bound behind it.\n\n" +
            "Examples:\n  idq report\n  idq report --db night.db --out night-report\n  idq report --catalogue harrowgate-sums --out sums-report")
        {
            outDir, catalogue,
        };
        store.AddTo(command);
        command.SetAction(parse =>
        {
            using var connection = store.OpenCurrent(parse, "report", error);
            if (connection is null) return ExitCodes.BadInput;
            var location = store.Location(parse);
            var path = location.Display;
            var names = parse.GetValue(catalogue) ?? [];
            if (names.Length > 0)
            {
                var known = ReportReads.CatalogueNames(connection);
                if (names.FirstOrDefault(n => !known.Contains(n)) is { } missing)
                {
                    error.WriteLine($"idq report: there is no catalogue named '{missing}'; the store has {(known.Count == 0 ? "none" : string.Join(", ", known))}");
                    return ExitCodes.BadInput;
                }
            }
            var data = ReportData.Load(connection, names);
            var html = ReportPage.Render(data, path, Version, DateTime.UtcNow);
            var folder = parse.GetValue(outDir)!;
            Directory.CreateDirectory(folder);
            var file = Path.Combine(folder, "index.html");
            File.WriteAllText(file, html);
            output.WriteLine($"wrote {file}: {data.Candidates} candidates in {data.Catalogues.Count} catalogue{(data.Catalogues.Count == 1 ? "" : "s")}");
            return ExitCodes.Success;
        });
        return command;
    }

    /// <summary>The tool's version, as <c>idq --version</c> prints it.</summary>
    internal static string Version =>
        typeof(ReportCommand).Assembly.GetCustomAttribute<AssemblyInformationalVersionAttribute>()?.InformationalVersion ?? "unknown";
}
