using System.CommandLine;
using IdentityQueue.Store;
using IdentityQueue.Store.Import;

namespace IdentityQueue.Cli;

/// <summary><c>idq import FILE...</c>: loads catalogue files into the store, one catalogue per file.</summary>
public static class ImportCommand
{
    private const int RejectionsShown = 5;

    public static Command Create(TextWriter output, TextWriter error)
    {
        var files = new Argument<string[]>("FILE")
        {
            Description = "Catalogue files: .idq (catalogue lines), .jsonl (one JSON object per line) or .csv (header label,lhs,rhs,over,for).",
            Arity = ArgumentArity.OneOrMore,
        };
        var catalogue = new Option<string?>("--catalogue") { HelpName = "NAME", Description = "The catalogue's name (default: the file name without its extension); one file only." };
        var seed = new Option<long?>("--seed") { HelpName = "S", Description = "The catalogue's run seed, 0 to 2^63-1 (default: a random one, stored, so runs can be repeated)." };
        var noGrouping = new Option<bool>("--no-grouping")
        {
            Description = "Do not fingerprint the entries to group those that are the same identity written differently (by default\n" +
                "each group's first entry is screened and the others share its result, marked as shared).",
        };
        var store = new StoreOptions();
        var command = new Command("import", "Load catalogue files into the store. Every good entry is imported; a bad one is recorded in the\n" +
            "table 'rejection' with its line, raw text and reason, and does not stop the import. A file whose catalogue name\n" +
            "is already in the store is refused (exit 2): give another name with --catalogue.\n\n" +
            "Examples:\n  idq import identities.idq\n  idq import batch.jsonl --catalogue batch-2 --seed 42")
        {
            files, catalogue, seed, noGrouping,
        };
        store.AddTo(command);
        command.SetAction(parse =>
        {
            var paths = parse.GetValue(files) ?? [];
            var name = parse.GetValue(catalogue);
            if (name is not null && paths.Length > 1)
            {
                error.WriteLine("idq import: --catalogue names one catalogue; give it with one file at a time");
                return ExitCodes.BadInput;
            }
            using var connection = store.OpenCurrent(parse, "import", error);
            if (connection is null) return ExitCodes.BadInput;
            return Execute(connection, paths, new ImportOptions { CatalogueName = name, Seed = parse.GetValue(seed), GroupEquivalents = !parse.GetValue(noGrouping) }, output, error);
        });
        return command;
    }

    internal static int Execute(StoreConnection connection, IReadOnlyList<string> paths, ImportOptions options, TextWriter output, TextWriter error)
    {
        var importer = new CatalogueImporter(connection);
        // Every file is checked before any is imported, so a typo in the third name does not leave the first two half done.
        var refusals = paths.Select(p => importer.Check(p, options)).OfType<string>().ToList();
        var names = paths.Select(p => options.CatalogueName ?? CatalogueImporter.DefaultName(p)).ToList();
        refusals.AddRange(names.GroupBy(n => n, StringComparer.Ordinal).Where(g => g.Count() > 1)
            .Select(g => $"several files would make the catalogue '{g.Key}'; import them one at a time with --catalogue NAME"));
        if (refusals.Count > 0)
        {
            foreach (var r in refusals) error.WriteLine($"idq import: {r}");
            return ExitCodes.BadInput;
        }
        var shown = 0;
        foreach (var path in paths)
        {
            var result = importer.Import(path, options with { RejectionsListed = RejectionsShown });
            if (!result.Success)
            {
                error.WriteLine($"idq import: {result.Error.Message}");
                return ExitCodes.BadInput;
            }
            var s = result.Value;
            var rate = s.Elapsed.TotalSeconds > 0 ? $", {s.Lines / s.Elapsed.TotalSeconds:F0} lines/s" : "";
            output.WriteLine($"{path}: catalogue '{s.Catalogue}' (id {s.CatalogueId}, seed {s.Seed}): " +
                $"{Count(s.Entries, "entry", "entries")}, {Count(s.Instances, "instance", "instances")}, " +
                $"{Count(s.Rejections, "rejection", "rejections")} ({s.Lines} lines in {s.Elapsed.TotalSeconds:F1} s{rate})");
            if (s.Grouping is { Members: > 0 } g)
                output.WriteLine($"  {Count(g.Members, "entry is", "entries are")} the same identity as an earlier one ({Count(g.Groups, "group", "groups")}; " +
                    $"screened once per group, the others share the result: idq sql \"SELECT * FROM equivalents\"); grouping took " +
                    $"{g.Elapsed.TotalSeconds:F1} s ({g.Computed} fingerprints in {g.FingerprintTime.TotalSeconds:F1} s, {g.Pairs} chance bounds in {g.BoundTime.TotalSeconds:F1} s)");
            foreach (var w in s.Warnings) error.WriteLine($"idq import: warning: {path}: {w}");
            foreach (var r in s.FirstRejections.Take(RejectionsShown - shown)) output.WriteLine($"  rejected {r}");
            shown += Math.Min(s.FirstRejections.Count, RejectionsShown - shown);
            if (s.Rejections > s.FirstRejections.Count)
                output.WriteLine($"  … every rejection: idq sql \"SELECT line, reason FROM rejection WHERE catalogue_id = {s.CatalogueId} ORDER BY line\"");
        }
        return ExitCodes.Success;
    }

    private static string Count(int n, string one, string many) => $"{n} {(n == 1 ? one : many)}";
}
