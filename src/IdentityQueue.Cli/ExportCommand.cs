using System.CommandLine;
using System.Globalization;
using System.Text.Json;
using IdentityQueue.Store;

namespace IdentityQueue.Cli;

/// <summary><c>idq export</c>: candidates by state, with everything needed downstream, as JSON lines or CSV.</summary>
internal static class ExportCommand
{
    /// <summary>One row per candidate: the candidate, its result and its witness (if refuted).</summary>
    internal const string Query = """
        SELECT c.id, k.name AS catalogue, c.label, c.family, c.params, c.lhs, c.rhs, c.field,
               r.state, r.degree_bound, r.error_bound_log2, r.certified, r.message,
               (SELECT count(*) FROM trial t WHERE t.candidate_id = c.id) AS trials,
               w.modulus AS witness_modulus, w.defining_polynomial AS witness_polynomial, w.point AS witness_point,
               w.difference AS witness_difference, w.entry AS witness_entry
        FROM candidate c
        JOIN catalogue k ON k.id = c.catalogue_id
        LEFT JOIN result r ON r.candidate_id = c.id
        LEFT JOIN trial w ON w.id = r.witness_trial_id
        """;

    public static Command Create(TextWriter output, TextWriter error)
    {
        var format = new Option<string>("--format") { Description = "jsonl or csv.", DefaultValueFactory = _ => "jsonl" };
        format.AcceptOnlyFromAmong("jsonl", "csv");
        var state = new Option<string[]>("--state") { Description = "Only candidates in these states (repeatable): survived, refuted, …", AllowMultipleArgumentsPerToken = true };
        var outFile = new Option<string?>("--out") { Description = "Write to this file instead of standard output." };
        var store = new StoreOptions();
        var command = new Command("export", "Write candidates with their evidence: label, family, parameters, lhs, rhs, field, state, degree bound, error bound, trials, witness.\n" +
            "A survivor is very likely true, not proven: its error bound is only as good as its degree bound.\n\n" +
            "Examples:\n  idq export --state survived --format csv --out survivors.csv\n  idq export --state refuted > refuted.jsonl") { format, state, outFile };
        store.AddTo(command);
        command.SetAction(parse =>
        {
            using (var connection = store.OpenCurrent(parse, "export", error)) if (connection is null) return ExitCodes.BadInput;
            var states = parse.GetValue(state) ?? [];
            var known = new[] { "pending", "queued", "screening", "refuted", "survived", "undecided", "invalid", "failed" };
            if (states.FirstOrDefault(s => !known.Contains(s)) is { } bad)
            {
                error.WriteLine($"idq export: unknown state '{bad}'; states are {string.Join(", ", known)}");
                return ExitCodes.BadInput;
            }
            var where = states.Length == 0 ? "" : $" WHERE r.state IN ({string.Join(",", states.Select(s => $"'{s}'"))})";
            var rows = ReadOnlyQuery.Run(store.Location(parse), Query + where + " ORDER BY c.id");
            using var file = parse.GetValue(outFile) is { } path ? new StreamWriter(path) : null;
            var writer = (TextWriter?)file ?? output;
            if (parse.GetValue(format) == "csv") QueryCommands.WriteCsv(writer, rows); else WriteJsonLines(writer, rows);
            if (file is not null) output.WriteLine($"wrote {rows.Rows.Count} candidates to {parse.GetValue(outFile)}");
            return ExitCodes.Success;
        });
        return command;
    }

    private static readonly HashSet<string> JsonColumns = ["params", "witness_polynomial", "witness_point"];

    private static void WriteJsonLines(TextWriter output, QueryResult rows)
    {
        foreach (var row in rows.Rows)
        {
            using var stream = new MemoryStream();
            using (var w = new Utf8JsonWriter(stream))
            {
                w.WriteStartObject();
                for (var i = 0; i < row.Length; i++)
                {
                    var name = rows.Columns[i];
                    switch (row[i])
                    {
                        case string s when JsonColumns.Contains(name): w.WritePropertyName(name); w.WriteRawValue(s); break;
                        case long l when name == "certified": w.WriteBoolean(name, l != 0); break;
                        default: QueryCommands.WriteValue(w, name, row[i]); break;
                    }
                }
                w.WriteEndObject();
            }
            output.WriteLine(System.Text.Encoding.UTF8.GetString(stream.ToArray()));
        }
    }
}
