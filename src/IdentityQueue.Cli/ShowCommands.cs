using System.CommandLine;
using System.Globalization;
using System.Text.Json;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Screening;
using IdentityQueue.Store;
using IdentityQueue.Store.Work;

namespace IdentityQueue.Cli;

/// <summary><c>idq show</c> and <c>idq recheck</c>: one candidate's evidence, and re-verification of stored witnesses.</summary>
internal static class ShowCommands
{
    public static Command Show(TextWriter output, TextWriter error)
    {
        var key = new Argument<string>("candidate") { Description = "A candidate id or label (for a family instance, e.g. 'binomial[n=3]')." };
        var store = new StoreOptions();
        var json = new Option<bool>("--json") { Description = "Print JSON." };
        var command = new Command("show", "One candidate: its text, degree bound, every trial, the result and the witness.\n\nExamples:\n  idq show 17\n  idq show 'vdm[n=5]' --json") { key, json };
        store.AddTo(command);
        command.SetAction(parse =>
        {
            using var connection = store.OpenCurrent(parse, "show", error);
            if (connection is null) return ExitCodes.BadInput;
            var path = store.Location(parse);
            var text = parse.GetValue(key)!;
            var idQuery = long.TryParse(text, NumberStyles.None, CultureInfo.InvariantCulture, out var id)
                ? $"SELECT id FROM candidate WHERE id = {id}"
                : $"SELECT id FROM candidate WHERE label = '{text.Replace("'", "''")}' ORDER BY id";
            var ids = ReadOnlyQuery.Run(path, idQuery).Rows.Select(r => Convert.ToInt64(r[0], CultureInfo.InvariantCulture)).ToList();
            if (ids.Count == 0)
            {
                error.WriteLine($"idq show: no candidate with id or label '{text}'");
                return ExitCodes.BadInput;
            }
            var candidates = new CandidateStore(connection);
            var stored = candidates.LoadCandidate(ids[0])!;
            var trials = candidates.LoadTrials(ids[0]);
            var result = ReadOnlyQuery.Run(path, $"""
                SELECT state, degree_bound, height_bound_log2, trials_zero, error_bound_log2, witness_trial_id, certified, message, updated_at
                FROM result WHERE candidate_id = {ids[0]}
                """);
            var row = result.Rows.Count > 0 ? result.Rows[0] : null;
            var state = row?[0] as string ?? "pending";
            if (parse.GetValue(json)) WriteJson(output, stored, row, result.Columns, trials);
            else WriteText(output, stored, state, row, trials, ids.Count);
            return ExitCodes.Success;
        });
        return command;
    }

    private static void WriteText(TextWriter o, StoredCandidate c, string state, object?[]? row, IReadOnlyList<TrialRecord> trials, int matches)
    {
        o.WriteLine($"candidate {c.Id}  {c.Label}" + (c.Family is null ? "" : $"  (family {c.Family}, {c.Params})") + $"  catalogue {c.Catalogue}");
        o.WriteLine($"  {c.Text}");
        var exact = row?[7] is string text && text.StartsWith(ExactDecision.Prefix, StringComparison.Ordinal);
        o.WriteLine($"  state          {state}" + (exact ? " (decided exactly: the identity has no variables)"
            : state == "survived" ? " (very likely true; screening is evidence, not proof)" : ""));
        if (row is not null)
        {
            if (row[1] is not null) o.WriteLine($"  degree bound   {row[1]}");
            if (row[4] is double e) o.WriteLine($"  error bound    2^{e:F1} (valid as far as the degree bound holds)");
            if (row[7] is string m) o.WriteLine($"  message        {m}");
            if (row[6] is long certified && certified != 0 && !exact) o.WriteLine("  certified      the witness was confirmed exactly");
        }
        o.WriteLine($"  trials         {trials.Count}");
        foreach (var t in trials)
        {
            var bound = t.BoundLog2 is double b ? $"bound 2^{b:F1}" : "";
            o.WriteLine($"    #{t.Seq,-3} {t.Outcome.ToString().ToLowerInvariant(),-9} {t.Field.Bits,5}-bit field  p = {t.Field.Modulus}  {bound}  {t.ElapsedMicroseconds} µs");
            if (t.Outcome == TrialOutcome.Nonzero)
            {
                foreach (var v in t.Point) o.WriteLine($"          {v.Name} = {Residue(v.Coordinates)}");
                o.WriteLine($"          lhs - rhs = {Residue(t.Difference!)}" + (t.Entry is null ? "" : $" at entry {t.Entry}"));
                if (t.Field.DefiningPolynomial is { } f) o.WriteLine($"          field GF(p)[t]/({TextReport.Polynomial(f)})");
            }
        }
        if (matches > 1) o.WriteLine($"  ({matches - 1} more candidates have this label; use the id)");
    }

    private static string Residue(System.Numerics.BigInteger[] c) => c.Length == 1 ? c[0].ToString() : TextReport.Polynomial(c);

    private static void WriteJson(TextWriter output, StoredCandidate c, object?[]? row, IReadOnlyList<string> columns, IReadOnlyList<TrialRecord> trials)
    {
        using var stream = new MemoryStream();
        using (var w = new Utf8JsonWriter(stream, new JsonWriterOptions { Indented = true }))
        {
            w.WriteStartObject();
            w.WriteNumber("id", c.Id);
            w.WriteString("catalogue", c.Catalogue);
            w.WriteString("label", c.Label);
            if (c.Family is null) w.WriteNull("family"); else w.WriteString("family", c.Family);
            if (c.Params is null) w.WriteNull("params"); else { w.WritePropertyName("params"); w.WriteRawValue(c.Params); }
            w.WriteString("lhs", c.Lhs);
            w.WriteString("rhs", c.Rhs);
            w.WriteString("field", c.Field);
            w.WriteStartObject("result");
            if (row is not null)
                for (var i = 0; i < columns.Count; i++) QueryCommands.WriteValue(w, columns[i], row[i]);
            w.WriteEndObject();
            w.WriteStartArray("trials");
            foreach (var t in trials)
            {
                w.WriteStartObject();
                w.WriteNumber("seq", t.Seq);
                w.WriteString("outcome", t.Outcome.ToString().ToLowerInvariant());
                w.WriteString("modulus", t.Field.Modulus.ToString());
                w.WriteNumber("fieldBits", t.Field.Bits);
                if (t.Field.DefiningPolynomial is { } f) { w.WriteStartArray("definingPolynomial"); foreach (var x in f) w.WriteStringValue(x.ToString()); w.WriteEndArray(); }
                w.WriteString("pointSeed", t.PointSeed.ToString(CultureInfo.InvariantCulture));
                w.WriteStartObject("point");
                foreach (var v in t.Point)
                {
                    if (v.Coordinates.Length == 1) w.WriteString(v.Name, v.Coordinates[0].ToString());
                    else { w.WriteStartArray(v.Name); foreach (var x in v.Coordinates) w.WriteStringValue(x.ToString()); w.WriteEndArray(); }
                }
                w.WriteEndObject();
                if (t.Difference is { } d)
                {
                    if (d.Length == 1) w.WriteString("difference", d[0].ToString());
                    else { w.WriteStartArray("difference"); foreach (var x in d) w.WriteStringValue(x.ToString()); w.WriteEndArray(); }
                }
                if (t.Entry is not null) w.WriteString("entry", t.Entry);
                if (t.BoundLog2 is double b) w.WriteNumber("boundLog2", b); else w.WriteNull("boundLog2");
                w.WriteNumber("elapsedUs", t.ElapsedMicroseconds);
                w.WriteEndObject();
            }
            w.WriteEndArray();
            w.WriteEndObject();
        }
        output.WriteLine(System.Text.Encoding.UTF8.GetString(stream.ToArray()));
    }

    public static Command Recheck(TextWriter output, TextWriter error)
    {
        var ids = new Argument<long[]>("id") { Description = "Candidate ids to re-check.", Arity = ArgumentArity.ZeroOrMore };
        var all = new Option<bool>("--all") { Description = "Re-check every refuted candidate." };
        var store = new StoreOptions();
        var command = new Command("recheck", "Re-verify stored refutation witnesses from their modulus and point alone (no seed), with a general-purpose field implementation. Exit 1 if any witness fails.\n\nExamples:\n  idq recheck --all\n  idq recheck 17 42") { ids, all };
        store.AddTo(command);
        command.SetAction(parse =>
        {
            using var connection = store.OpenCurrent(parse, "recheck", error);
            if (connection is null) return ExitCodes.BadInput;
            var given = parse.GetValue(ids) ?? [];
            if (given.Length == 0 && !parse.GetValue(all))
            {
                error.WriteLine("idq recheck: give candidate ids or --all");
                return ExitCodes.BadInput;
            }
            var path = store.Location(parse);
            var targets = given.Length > 0 ? given.ToList()
                : ReadOnlyQuery.Run(path, "SELECT candidate_id FROM result WHERE state = 'refuted' ORDER BY candidate_id")
                    .Rows.Select(r => Convert.ToInt64(r[0], CultureInfo.InvariantCulture)).ToList();
            var candidates = new CandidateStore(connection);
            int confirmed = 0, failed = 0;
            foreach (var id in targets)
            {
                var verdict = RecheckOne(candidates, id);
                if (verdict is null) confirmed++;
                else { failed++; output.WriteLine($"candidate {id}: {verdict}"); }
            }
            output.WriteLine($"{confirmed} witnesses confirmed, {failed} not");
            return failed > 0 ? ExitCodes.Found : ExitCodes.Success;
        });
        return command;
    }

    /// <summary>Null when the stored witness refutes the candidate again; otherwise what is wrong.</summary>
    private static string? RecheckOne(CandidateStore candidates, long id)
    {
        var stored = candidates.LoadCandidate(id);
        if (stored is null) return "no such candidate";
        var witness = candidates.LoadTrials(id).LastOrDefault(t => t.Outcome == TrialOutcome.Nonzero);
        var bound = stored.Bind();
        if (!bound.Success) return $"its text does not parse: {bound.Error}";
        var compiled = IdentityCompiler.Compile(bound.Entry!, bound.Parameters);
        if (!compiled.Success) return $"it does not compile: {compiled.Error}";
        if (witness is null)
            // An identity without variables is refuted by exact evaluation, with no trial: evaluate it again.
            return ExactDecision.TryDecide(compiled.Value!, ScreeningPolicy.Default) is { Verdict: Verdict.Refuted } ? null
                : "no refutation witness is stored";
        var again = WitnessChecker.Recheck(compiled.Value!, witness.Field, witness.Point);
        if (!again.Refutes) return "the witness no longer refutes it: lhs - rhs is zero or undefined there";
        if (!again.Difference!.SequenceEqual(witness.Difference!)) return "the re-evaluated difference differs from the stored one";
        return null;
    }
}
