using System.CommandLine;
using System.Globalization;
using System.Text.Json;
using IdentityQueue.Algebra;
using IdentityQueue.Screening.HandOff;
using IdentityQueue.Store;
using IdentityQueue.Store.Work;

namespace IdentityQueue.Cli;

/// <summary>
/// <c>idq export</c>: candidates by state, with everything needed downstream, as JSON lines or CSV (every column), as
/// SMT-LIB 2 proof obligations (<see cref="SmtLibWriter"/>), or as a LaTeX or Markdown table (<see cref="EvidenceTable"/>).
/// </summary>
internal static class ExportCommand
{
    /// <summary>One row per candidate: the candidate, its result and its witness (if refuted). Portable SQL.</summary>
    internal const string Query = """
        SELECT c.id, k.name AS catalogue, c.label, c.family, c.params, c.lhs, c.rhs, c.field,
               r.state, r.degree_bound, r.error_bound_log2, r.certified, r.message,
               (SELECT count(*) FROM trial t WHERE t.candidate_id = c.id) AS trials,
               w.modulus AS witness_modulus, w.defining_polynomial AS witness_polynomial, w.point AS witness_point,
               w.difference AS witness_difference, w.entry AS witness_entry,
               r.height_bound_log2, r.trials_zero
        FROM candidate c
        JOIN catalogue k ON k.id = c.catalogue_id
        LEFT JOIN result r ON r.candidate_id = c.id
        LEFT JOIN trial w ON w.id = r.witness_trial_id
        """;

    private static readonly string[] HandOffFormats = ["smtlib", "tex", "md"];

    private const string Help = """
        Write candidates with their evidence.
          jsonl, csv  every column: label, family, params, lhs, rhs, field, state, degree_bound, error_bound_log2, certified,
                      message, trials, the witness (modulus, polynomial, point, difference, entry), height_bound_log2,
                      trials_zero. All candidates unless --state is given. --out FILE.
          smtlib      one SMT-LIB 2 script (logic QF_NRA, over the reals) per candidate asserting the negation of the
                      identity: every variable declared (x[3] as |x[3]|), everything expanded into + - * and rational
                      constants, every divisor asserted nonzero and the sides compared over a common denominator,
                      a matrix identity as "some entry differs"; unsat proves the identity, sat refutes it.
                      --out DIR writes DIR/ID-LABEL.smt2 per candidate; without --out one script goes to standard
                      output with a (push 1) ... (pop 1) block per candidate. Candidates over GF(p), or larger than the
                      limits (MaxExpansionSteps 200000, MaxExpansionOrder 10 for det/perm/pf, MaxMatrixOrder 16,
                      MaxExponent 512, MaxConstantBits 4096), are skipped with the reason on standard error.
          tex, md     a LaTeX longtable or a Markdown table: label, family, parameters, identity, degree bound, trials,
                      error bound (2^x), with the caution in the caption. --out FILE.
        smtlib, tex and md export the survivors unless --state is given.
        A survivor is very likely true, not proven: its error bound is only as good as its degree bound.

        Examples:
          idq export --state survived --format csv --out survivors.csv
          idq export --state refuted > refuted.jsonl
          idq export --format smtlib --out proofs && for f in proofs/*.smt2; do z3 -smt2 -T:20 "$f"; done
          idq export --format smtlib > survivors.smt2 && z3 -smt2 survivors.smt2
          idq export --format tex --out appendix.tex
          idq export --format md --state survived undecided
        """;

    public static Command Create(TextWriter output, TextWriter error)
    {
        var format = new Option<string>("--format") { Description = "jsonl, csv, smtlib, tex or md.", DefaultValueFactory = _ => "jsonl" };
        format.AcceptOnlyFromAmong("jsonl", "csv", "smtlib", "tex", "md");
        var state = new Option<string[]>("--state") { Description = "Only candidates in these states (repeatable): survived, refuted, … (smtlib, tex, md: survived by default).", AllowMultipleArgumentsPerToken = true };
        var outFile = new Option<string?>("--out") { Description = "Write to this file instead of standard output (smtlib: a directory, one file per candidate)." };
        var store = new StoreOptions();
        var command = new Command("export", Help) { format, state, outFile };
        store.AddTo(command);
        command.SetAction(parse =>
        {
            using (var connection = store.OpenCurrent(parse, "export", error)) if (connection is null) return ExitCodes.BadInput;
            var chosen = parse.GetValue(format)!;
            var states = parse.GetValue(state) ?? [];
            if (states.Length == 0 && HandOffFormats.Contains(chosen)) states = ["survived"];
            var known = new[] { "pending", "queued", "screening", "refuted", "survived", "undecided", "invalid", "failed" };
            if (states.FirstOrDefault(s => !known.Contains(s)) is { } bad)
            {
                error.WriteLine($"idq export: unknown state '{bad}'; states are {string.Join(", ", known)}");
                return ExitCodes.BadInput;
            }
            var where = states.Length == 0 ? "" : $" WHERE r.state IN ({string.Join(",", states.Select(s => $"'{s}'"))})";
            var rows = ReadOnlyQuery.Run(store.Location(parse), Query + where + " ORDER BY c.id");
            var target = parse.GetValue(outFile);
            var selection = states.Length == 0 ? "all states" : string.Join(", ", states);
            if (chosen == "smtlib") return WriteSmtLib(rows, target, output, error);
            using var file = target is not null ? new StreamWriter(target) : null;
            var writer = (TextWriter?)file ?? output;
            switch (chosen)
            {
                case "csv": QueryCommands.WriteCsv(writer, rows); break;
                case "tex": writer.Write(EvidenceTable.Latex(Candidates(rows).Select(c => c.HandOff).ToList(), selection)); break;
                case "md": writer.Write(EvidenceTable.Markdown(Candidates(rows).Select(c => c.HandOff).ToList(), selection)); break;
                default: WriteJsonLines(writer, rows); break;
            }
            if (file is not null) output.WriteLine($"wrote {rows.Rows.Count} candidates to {target}");
            return ExitCodes.Success;
        });
        return command;
    }

    /// <summary>The rows as hand-off candidates, with the stored form that binds the parameters.</summary>
    private static IEnumerable<(HandOffCandidate HandOff, StoredCandidate Stored)> Candidates(QueryResult rows)
    {
        var at = rows.Columns.Select((name, i) => (name, i)).ToDictionary(p => p.name, p => p.i);
        foreach (var row in rows.Rows)
        {
            string? Text(string column) => row[at[column]] is { } v ? QueryCommands.Text(v) : null;
            var id = Convert.ToInt64(row[at["id"]], CultureInfo.InvariantCulture);
            var errorBound = row[at["error_bound_log2"]] is { } e ? Convert.ToDouble(e, CultureInfo.InvariantCulture) : (double?)null;
            var handOff = new HandOffCandidate(id, Text("label") ?? "", Text("family"), Text("params"), Text("lhs") ?? "", Text("rhs") ?? "",
                Text("field") ?? "Q", Text("state"), Text("degree_bound"), errorBound, Convert.ToInt64(row[at["trials"]], CultureInfo.InvariantCulture));
            var stored = new StoredCandidate(id, 0, Text("catalogue") ?? "", handOff.Label, handOff.Family, handOff.Params,
                handOff.Lhs, handOff.Rhs, handOff.Field, null, 0, 0);
            yield return (handOff, stored);
        }
    }

    /// <summary>
    /// smtlib: one file per candidate in <paramref name="directory"/>, or one script with push/pop blocks on standard
    /// output. A skipped candidate is named on standard error with the reason; the closing line counts both.
    /// </summary>
    private static int WriteSmtLib(QueryResult rows, string? directory, TextWriter output, TextWriter error)
    {
        if (directory is not null) Directory.CreateDirectory(directory);
        else output.WriteLine($"; idq export --format smtlib: one (push 1) ... (pop 1) block per candidate\n(set-logic {SmtLibWriter.Logic})");
        int written = 0, skipped = 0;
        foreach (var (handOff, stored) in Candidates(rows))
        {
            var bound = stored.Bind();
            var translation = bound.Success ? SmtLibWriter.Translate(bound.Entry!, bound.Parameters) : Result<SmtLibObligation>.Fail(bound.Error!);
            if (!translation.Success)
            {
                skipped++;
                error.WriteLine($"idq export: skipped candidate {handOff.Id} ({handOff.Label}): {translation.Error.Message}");
                continue;
            }
            written++;
            if (directory is null)
            {
                output.Write(SmtLibWriter.Block(handOff, translation.Value));
                continue;
            }
            File.WriteAllText(Path.Combine(directory, FileName(handOff)), SmtLibWriter.Script(handOff, translation.Value));
        }
        var closing = $"wrote {written} SMT-LIB script{(written == 1 ? "" : "s")}{(directory is null ? "" : $" to {directory}")}; skipped {skipped}";
        if (directory is null)
        {
            output.WriteLine($"; {closing}");
            error.WriteLine($"idq export: {closing}");
        }
        else output.WriteLine(closing);
        return ExitCodes.Success;
    }

    /// <summary><c>ID-LABEL.smt2</c>, the label's characters outside [A-Za-z0-9._-] as '_', at most 80 of them.</summary>
    internal static string FileName(HandOffCandidate candidate)
    {
        var label = new string(candidate.Label.Select(c => char.IsAsciiLetterOrDigit(c) || c is '.' or '-' or '_' ? c : '_').ToArray()).Trim('_');
        if (label.Length > 80) label = label[..80];
        return label.Length == 0 ? $"{candidate.Id}.smt2" : $"{candidate.Id}-{label}.smt2";
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
