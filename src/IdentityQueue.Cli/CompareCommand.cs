using System.CommandLine;
using System.Text;
using System.Text.Json;
using IdentityQueue.Store.Read;

namespace IdentityQueue.Cli;

/// <summary>
/// <c>idq compare A [B]</c>: what differs between two catalogues, or between an earlier version of a catalogue and its
/// current one (<c>idq import --new-version</c>): entries added, removed, and whose verdict (or identity) changed.
/// </summary>
internal static class CompareCommand
{
    public static Command Create(TextWriter output, TextWriter error)
    {
        var first = new Argument<string>("CATALOGUE") { Description = "A catalogue's name: with a second one, the first side; alone, the catalogue whose versions are compared." };
        var second = new Argument<string?>("OTHER") { Description = "A second catalogue's name.", Arity = ArgumentArity.ZeroOrOne };
        var version = new Option<int?>("--version")
        {
            HelpName = "V",
            Description = "With one catalogue: the earlier version to compare with the current one (default: the one before the current).",
        };
        var json = new Option<bool>("--json") { Description = "Print one JSON object (from, to, added, removed, changed, unchanged)." };
        var store = new StoreOptions();
        var command = new Command("compare", "Show what differs between two catalogues, or between two versions of one: entries added, entries removed,\n" +
            "and entries whose verdict changed (or whose identity was edited under the same label). Entries are paired by their\n" +
            "canonical identity first (a relabelled entry is the same entry), then by label.\n\n" +
            "Examples:\n  idq compare algebra                 # the version before the last 'idq import --new-version' against the current one\n" +
            "  idq compare algebra --version 1 --json\n  idq compare guesses-may guesses-june")
        {
            first, second, version, json,
        };
        store.AddTo(command);
        command.SetAction(parse =>
        {
            var a = parse.GetValue(first)!;
            var b = parse.GetValue(second);
            var v = parse.GetValue(version);
            if (b is not null && v is not null)
            {
                error.WriteLine("idq compare: --version compares versions of one catalogue; give one catalogue with it");
                return ExitCodes.BadInput;
            }
            using var connection = store.OpenCurrent(parse, "compare", error);
            if (connection is null) return ExitCodes.BadInput;
            var compared = b is null ? CatalogueComparison.Versions(connection, a, v) : CatalogueComparison.Catalogues(connection, a, b);
            if (!compared.Success)
            {
                error.WriteLine($"idq compare: {compared.Error.Message}");
                return ExitCodes.BadInput;
            }
            if (parse.GetValue(json)) WriteJson(output, compared.Value);
            else WriteText(output, compared.Value);
            return ExitCodes.Success;
        });
        return command;
    }

    internal static void WriteText(TextWriter output, CatalogueComparison c)
    {
        output.WriteLine($"{c.From} → {c.To}: {c.Added.Count} added, {c.Removed.Count} removed, {c.Changed.Count} changed, {c.Unchanged} unchanged");
        if (c.Added.Count > 0)
        {
            output.WriteLine();
            output.WriteLine("added:");
            foreach (var e in c.Added) output.WriteLine($"  + {Describe(e)}");
        }
        if (c.Removed.Count > 0)
        {
            output.WriteLine();
            output.WriteLine("removed:");
            foreach (var e in c.Removed) output.WriteLine($"  - {Describe(e)}");
        }
        if (c.Changed.Count > 0)
        {
            output.WriteLine();
            output.WriteLine("changed:");
            foreach (var change in c.Changed)
            {
                var label = change.From.Label == change.To.Label ? change.To.Label : $"{change.From.Label} → {change.To.Label}";
                var what = new List<string>();
                if (change.VerdictChanged) what.Add($"{change.From.State} → {change.To.State}");
                if (change.IdentityChanged) what.Add($"edited: {Line(change.From)}  →  {Line(change.To)}");
                output.WriteLine($"  ~ {label}: {string.Join("; ", what)}");
            }
        }
    }

    private static string Describe(ComparedEntry e) => $"{e.Label} [{e.State}]: {Line(e)}";

    private static string Line(ComparedEntry e) => e.Params is null ? e.Text : $"{e.Text} with {e.Params}";

    internal static void WriteJson(TextWriter output, CatalogueComparison c)
    {
        using var stream = new MemoryStream();
        using (var w = new Utf8JsonWriter(stream, new JsonWriterOptions { Indented = true }))
        {
            w.WriteStartObject();
            w.WriteString("from", c.From);
            w.WriteString("to", c.To);
            w.WriteStartArray("added");
            foreach (var e in c.Added) WriteEntry(w, e);
            w.WriteEndArray();
            w.WriteStartArray("removed");
            foreach (var e in c.Removed) WriteEntry(w, e);
            w.WriteEndArray();
            w.WriteStartArray("changed");
            foreach (var change in c.Changed)
            {
                w.WriteStartObject();
                w.WriteBoolean("verdictChanged", change.VerdictChanged);
                w.WriteBoolean("identityChanged", change.IdentityChanged);
                w.WritePropertyName("from");
                WriteEntry(w, change.From);
                w.WritePropertyName("to");
                WriteEntry(w, change.To);
                w.WriteEndObject();
            }
            w.WriteEndArray();
            w.WriteNumber("unchanged", c.Unchanged);
            w.WriteEndObject();
        }
        output.WriteLine(Encoding.UTF8.GetString(stream.ToArray()));
    }

    private static void WriteEntry(Utf8JsonWriter w, ComparedEntry e)
    {
        w.WriteStartObject();
        w.WriteNumber("candidateId", e.CandidateId);
        w.WriteString("label", e.Label);
        w.WriteString("identity", e.Text);
        if (e.Params is null) w.WriteNull("params");
        else w.WriteString("params", e.Params);
        w.WriteString("state", e.State);
        if (e.ErrorBoundLog2 is { } bound && double.IsFinite(bound)) w.WriteNumber("errorBoundLog2", Math.Round(bound, 3));
        else w.WriteNull("errorBoundLog2");
        w.WriteEndObject();
    }
}
