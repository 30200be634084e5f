using System.CommandLine;
using System.Globalization;
using System.Text.Json;
using IdentityQueue.Algebra;
using IdentityQueue.Screening.HandOff;
using IdentityQueue.Store;
using IdentityQueue.Store.Read;
using IdentityQueue.Store.Schema;
using IdentityQueue.Store.Work;

namespace IdentityQueue.Cli;

/// <summary>
/// <c>idq export</c>: candidates by state, with everything needed downstream, as JSON lines or CSV (every column), as
/// SMT-LIB 2 proof obligations (<see cref="SmtLibWriter"/>), or as a LaTeX or Markdown table (<see cref="EvidenceTable"/>).
/// </summary>
internal static class ExportCommand
{
    private static readonly string[] HandOffFormats = ["smtlib", "tex", "md"];

    private const string Help = """
        Write candidates with their evidence.
          jsonl, csv  every column: label, family, params, lhs, rhs, field, state, degree_bound, error_bound_log2, certified,
                      message, trials, the witness (modulus, polynomial, point, difference, entry), height_bound_log2,
                      trials_zero, and for a refuted candidate where it fails: the smallest counterexample found
                      (counterexample_point, _lhs, _rhs, _entry, _max_abs, _exhaustive, and counterexample_text:
                      "fails at a = 1, b = 0: lhs = 4, rhs = 2") and the recovered difference (difference,
                      difference_terms, _total_degree, _terms_estimated, and difference_text: "lhs - rhs = 2*a*b
                      (1 term, total degree 2)"). All candidates unless --state is given. --out FILE.
          smtlib      one SMT-LIB 2 script (logic QF_NRA, over the reals) per candidate asserting the negation of the
                      identity: every variable declared (x[3] as |x[3]|), everything expanded into + - * and rational
                      constants, every divisor asserted nonzero and the sides compared over a common denominator,
                      a matrix identity as "some entry differs"; unsat proves the identity, sat refutes it.
                      --out DIR writes DIR/ID-LABEL.smt2 per candidate; without --out one script goes to standard
                      output with a (push 1) ... (pop 1) block per candidate. Candidates over GF(p), or larger than the
                      limits (MaxExpansionSteps 200000, MaxExpansionOrder 10 for det/perm/pf, MaxMatrixOrder 16,
                      MaxExponent 512, MaxConstantBits 4096), are skipped with the reason on standard error.
          tex, md     a LaTeX longtable or a Markdown table: label, family, parameters, identity, degree bound, trials,
                      error bound (2^x), with the caution in the caption; with refuted candidates, a column "where
                      it fails" (the counterexample and the difference in words). --out FILE.
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
            using var connection = store.OpenCurrent(parse, "export", error);
            if (connection is null) return ExitCodes.BadInput;
            var chosen = parse.GetValue(format)!;
            var names = parse.GetValue(state) ?? [];
            if (names.Length == 0 && HandOffFormats.Contains(chosen)) names = [ResultStates.Survived];
            var states = new List<ResultState>();
            foreach (var name in names)
            {
                if (!ResultStates.TryParse(name, out var known))
                {
                    error.WriteLine($"idq export: unknown state '{name}'; states are {string.Join(", ", ResultStates.All)}");
                    return ExitCodes.BadInput;
                }
                states.Add(known);
            }
            var rows = new ExportRows(connection).Read(states);
            var target = parse.GetValue(outFile);
            var selection = names.Length == 0 ? "all states" : string.Join(", ", names);
            if (chosen == "smtlib") return WriteSmtLib(rows, target, output, error);
            using var file = target is not null ? new StreamWriter(target) : null;
            var writer = (TextWriter?)file ?? output;
            switch (chosen)
            {
                case "csv": QueryCommands.WriteCsv(writer, new QueryResult(ExportRows.Columns, [.. rows.Select(r => r.Values())])); break;
                case "tex": writer.Write(EvidenceTable.Latex(Candidates(rows).Select(c => c.HandOff).ToList(), selection)); break;
                case "md": writer.Write(EvidenceTable.Markdown(Candidates(rows).Select(c => c.HandOff).ToList(), selection)); break;
                default: WriteJsonLines(writer, rows); break;
            }
            if (file is not null) output.WriteLine($"wrote {rows.Count} candidates to {target}");
            return ExitCodes.Success;
        });
        return command;
    }

    /// <summary>The rows as hand-off candidates, with the stored form that binds the parameters.</summary>
    private static IEnumerable<(HandOffCandidate HandOff, StoredCandidate Stored)> Candidates(IReadOnlyList<ExportRow> rows)
    {
        foreach (var row in rows)
        {
            var handOff = new HandOffCandidate(row.Id, row.Label, row.Family, row.Params, row.Lhs, row.Rhs, row.Field, row.State?.Text(),
                row.DegreeBound, row.ErrorBoundLog2, row.Trials)
            {
                CounterexampleText = row.Counterexample?.Describe(),
                DifferenceText = row.Difference?.Describe(),
            };
            var stored = new StoredCandidate(row.Id, 0, row.Catalogue, row.Label, row.Family, row.Params, row.Lhs, row.Rhs, row.Field, null, 0, 0);
            yield return (handOff, stored);
        }
    }

    /// <summary>
    /// smtlib: one file per candidate in <paramref name="directory"/>, or one script with push/pop blocks on standard
    /// output. A skipped candidate is named on standard error with the reason; the closing line counts both.
    /// </summary>
    private static int WriteSmtLib(IReadOnlyList<ExportRow> rows, string? directory, TextWriter output, TextWriter error)
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

    private static void WriteJsonLines(TextWriter output, IReadOnlyList<ExportRow> rows)
    {
        foreach (var row in rows)
        {
            using var stream = new MemoryStream();
            using (var w = new Utf8JsonWriter(stream))
            {
                w.WriteStartObject();
                var values = row.Values();
                for (var i = 0; i < values.Length; i++)
                {
                    var name = ExportRows.Columns[i];
                    switch (values[i])
                    {
                        case string s when ExportRows.JsonColumns.Contains(name): w.WritePropertyName(name); w.WriteRawValue(s); break;
                        case long l when name == "certified": w.WriteBoolean(name, l != 0); break;
                        default: QueryCommands.WriteValue(w, name, values[i]); break;
                    }
                }
                w.WriteEndObject();
            }
            output.WriteLine(System.Text.Encoding.UTF8.GetString(stream.ToArray()));
        }
    }
}
