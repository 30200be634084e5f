using System.CommandLine;
using IdentityQueue.Screening.Catalogues;
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
        var openBudget = new Option<int?>("--open-budget")
        {
            HelpName = "N",
            Description = $"The open family budget: an open-ended family ('for n >= 1') is screened in increasing n, {OpenFamilyBudget.DefaultChunk} instances at a time, " +
                $"until its first refuted instance or N instances (default {OpenFamilyBudget.DefaultInstances}); stored with the family.",
        };
        var newVersion = new Option<bool>("--new-version")
        {
            Description = "Replace the catalogue of the same name (the file's name, or --catalogue NAME) by this file: every entry whose identity\n" +
                "is unchanged keeps its id, verdict and trials (a new label is taken over); new or edited entries are screened by the next run;\n" +
                "entries no longer in the file are removed. The old version's verdicts are kept for 'idq compare NAME'. One file only.",
        };
        var noGrouping = new Option<bool>("--no-grouping")
        {
            Description = "Do not fingerprint the entries to group those that are the same identity written differently (by default\n" +
                "each group's first entry is screened and the others share its result, marked as shared).",
        };
        var store = new StoreOptions();
        var command = new Command("import", "Load catalogue files into the store. Every good entry is imported; a bad one is recorded in the\n" +
            "table 'rejection' with its line, raw text and reason, and does not stop the import. A file whose catalogue name\n" +
            "is already in the store is refused (exit 2): give another name with --catalogue, or replace it with --new-version.\n\n" +
            "Examples:\n  idq import identities.idq\n  idq import batch.jsonl --catalogue batch-2 --seed 42\n  idq import moser.idq --open-budget 200\n" +
            "  idq import identities.idq --new-version   # screen only what changed; then: idq compare identities")
        {
            files, catalogue, seed, openBudget, newVersion, noGrouping,
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
            OpenFamilyBudget? budget = null;
            if (parse.GetValue(openBudget) is int instances)
            {
                var made = OpenFamilyBudget.Create(instances);
                if (!made.Success)
                {
                    error.WriteLine($"idq import: --open-budget: {made.Error.Message}");
                    return ExitCodes.BadInput;
                }
                budget = made.Value;
            }
            if (parse.GetValue(newVersion) && paths.Length > 1)
            {
                error.WriteLine("idq import: --new-version replaces one catalogue; give it with one file at a time");
                return ExitCodes.BadInput;
            }
            using var connection = store.OpenCurrent(parse, "import", error);
            if (connection is null) return ExitCodes.BadInput;
            if (parse.GetValue(newVersion))
                return ExecuteNewVersion(connection, paths[0], new ImportOptions { CatalogueName = name, Seed = parse.GetValue(seed), OpenBudget = budget, GroupEquivalents = !parse.GetValue(noGrouping) }, output, error);
            return Execute(connection, paths, new ImportOptions { CatalogueName = name, Seed = parse.GetValue(seed), OpenBudget = budget, GroupEquivalents = !parse.GetValue(noGrouping) }, output, error);
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

    internal static int ExecuteNewVersion(StoreConnection connection, string path, ImportOptions options, TextWriter output, TextWriter error)
    {
        var result = new CatalogueReimporter(connection).Reimport(path, options with { RejectionsListed = RejectionsShown });
        if (!result.Success)
        {
            error.WriteLine($"idq import: {result.Error.Message}");
            return ExitCodes.BadInput;
        }
        var s = result.Value;
        output.WriteLine($"{path}: catalogue '{s.Catalogue}' (id {s.CatalogueId}) is now version {s.Version}: " +
            $"{Count(s.Entries, "entry", "entries")}, {Count(s.Instances, "instance", "instances")}, {Count(s.Rejections, "rejection", "rejections")} " +
            $"({s.Lines} lines in {s.Elapsed.TotalSeconds:F1} s)");
        output.WriteLine($"  {s.Kept} unchanged (evidence kept{(s.Relabelled > 0 ? $", {s.Relabelled} with a new label" : "")}), " +
            $"{s.Added} new or changed (pending), {s.Removed} removed");
        foreach (var w in s.Warnings) error.WriteLine($"idq import: warning: {path}: {w}");
        foreach (var r in s.FirstRejections) output.WriteLine($"  rejected {r}");
        if (s.Rejections > s.FirstRejections.Count)
            output.WriteLine($"  … every rejection: idq sql \"SELECT line, reason FROM rejection WHERE catalogue_id = {s.CatalogueId} ORDER BY line\"");
        output.WriteLine($"  next: idq run, then idq compare {s.Catalogue} (version {s.Version - 1} against {s.Version})");
        return ExitCodes.Success;
    }

    private static string Count(int n, string one, string many) => $"{n} {(n == 1 ? one : many)}";
}
