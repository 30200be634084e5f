using System.CommandLine;
using System.Globalization;
using System.Text.Json;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Screening;
using IdentityQueue.Store;
using IdentityQueue.Store.Read;
using IdentityQueue.Store.Schema;
using IdentityQueue.Store.Work;

namespace IdentityQueue.Cli;

/// <summary><c>idq show</c> and <c>idq recheck</c>: one candidate's evidence, and re-verification of stored witnesses.</summary>
internal static class ShowCommands
{
    public static Command Show(TextWriter output, TextWriter error)
    {
        var key = new Argument<string>("candidate") { Description = "A candidate id or label (for a family instance, e.g. 'binomial[n=3]'), or a family's label (e.g. 'binomial')." };
        var store = new StoreOptions();
        var json = new Option<bool>("--json") { Description = "Print JSON." };
        var command = new Command("show", "One candidate: its text, degree bound, every trial, the result and the witness; for a refutation, where it fails (the smallest counterexample found) and the difference lhs - rhs. Given a family's label: where the family holds and fails (\"holds for n = 1..5, fails for n = 6..10\"), the first failing instance's counterexample and every instance's state.\n\nExamples:\n  idq show 17\n  idq show 'vdm[n=5]' --json\n  idq show vdm") { key, json };
        store.AddTo(command);
        command.SetAction(parse =>
        {
            using var connection = store.OpenCurrent(parse, "show", error);
            if (connection is null) return ExitCodes.BadInput;
            var text = parse.GetValue(key)!;
            if (new CandidateReads(connection).Detail(text) is not { } detail)
            {
                var families = new FamilyReads(connection).Find(text);
                if (families.Count == 0)
                {
                    error.WriteLine($"idq show: no candidate with id or label '{text}', and no family with that label");
                    return ExitCodes.BadInput;
                }
                if (parse.GetValue(json)) WriteFamiliesJson(output, families);
                else foreach (var family in families) WriteFamilyText(output, family);
                return ExitCodes.Success;
            }
            if (parse.GetValue(json)) WriteJson(output, detail);
            else WriteText(output, detail);
            return ExitCodes.Success;
        });
        return command;
    }

    private static void WriteText(TextWriter o, CandidateDetail detail)
    {
        var (c, result, trials, state) = (detail.Candidate, detail.Result, detail.Trials, detail.State);
        o.WriteLine($"candidate {c.Id}  {c.Label}" + (c.Family is null ? "" : $"  (family {c.Family}, {c.Params})") + $"  catalogue {c.Catalogue}");
        o.WriteLine($"  {c.Text}");
        var exact = result?.Message is { } text && text.StartsWith(ExactDecision.Prefix, StringComparison.Ordinal);
        o.WriteLine($"  state          {state.Text()}" + (exact ? " (decided exactly: the identity has no variables)"
            : state == ResultState.Survived ? " (very likely true; screening is evidence, not proof)" : ""));
        if (result is not null)
        {
            if (result.DegreeBound is not null) o.WriteLine($"  degree bound   {result.DegreeBound}");
            if (result.ErrorBoundLog2 is double e) o.WriteLine($"  error bound    2^{e:F1} (valid as far as the degree bound holds)");
            if (result.Message is string m) o.WriteLine($"  message        {m}");
            if (result.Certified && !exact) o.WriteLine("  certified      the witness was confirmed exactly");
        }
        if (detail.Counterexample is { } x)
        {
            o.WriteLine($"  counterexample {x.Describe()}");
            o.WriteLine($"                 {x.Smallness}");
        }
        if (detail.Difference is { } d) o.WriteLine($"  difference     {d.Describe()}");
        if (detail.Equivalence is { } g) WriteEquivalence(o, g, state);
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
        if (detail.Matches > 1) o.WriteLine($"  ({detail.Matches - 1} more candidates have this label; use the id)");
    }

    /// <summary>A family: its counts, where it holds and fails in words, its first failure and each instance's state.</summary>
    private static void WriteFamilyText(TextWriter o, FamilyDetail f)
    {
        var parameters = f.Parameters.Count == 0 ? "" : $"  (parameters {string.Join(", ", f.Parameters)})";
        o.WriteLine($"family {f.Family}  catalogue {f.Catalogue}{parameters}");
        o.WriteLine($"  {f.Words}");
        o.WriteLine($"  instances      {f.Instances}: {f.Survived} survived (very likely true), {f.Refuted} refuted, {f.Other} other");
        if (f.FirstFailing is { } first)
        {
            o.WriteLine($"  first failing  {first.Describe()}  ({first.Label}, candidate {first.Id})");
            if (first.Counterexample is { } x) o.WriteLine($"                 {x.Smallness}");
            if (first.Difference is { } d) o.WriteLine($"  difference     {d.Describe()}");
        }
        foreach (var m in f.Members)
            o.WriteLine($"    {m.Id,-6} {m.State.Text(),-10} {m.Label}");
    }

    /// <summary>An array with one object per family of that label (one per catalogue): the view's columns, the words, the first failure, the instances.</summary>
    private static void WriteFamiliesJson(TextWriter output, IReadOnlyList<FamilyDetail> families)
    {
        using var stream = new MemoryStream();
        using (var w = new Utf8JsonWriter(stream, new JsonWriterOptions { Indented = true }))
        {
            w.WriteStartArray();
            foreach (var f in families)
            {
                w.WriteStartObject();
                w.WriteString("catalogue", f.Catalogue);
                w.WriteString("family", f.Family);
                w.WriteStartArray("parameters");
                foreach (var p in f.Parameters) w.WriteStringValue(p);
                w.WriteEndArray();
                w.WriteNumber("instances", f.Instances);
                w.WriteNumber("survived", f.Survived);
                w.WriteNumber("refuted", f.Refuted);
                w.WriteNumber("other", f.Other);
                if (f.HoldsFor is null) w.WriteNull("holds_for"); else w.WriteString("holds_for", f.HoldsFor);
                if (f.FailsFor is null) w.WriteNull("fails_for"); else w.WriteString("fails_for", f.FailsFor);
                w.WriteString("text", f.Words);
                if (f.FirstFailing is { } first)
                {
                    w.WriteStartObject("first_failing");
                    w.WriteNumber("id", first.Id);
                    w.WriteString("label", first.Label);
                    if (first.Params is null) w.WriteNull("params"); else { w.WritePropertyName("params"); w.WriteRawValue(first.Params); }
                    w.WriteString("text", first.Describe());
                    WriteCounterexample(w, first.Counterexample);
                    WriteDifference(w, first.Difference);
                    w.WriteEndObject();
                }
                else w.WriteNull("first_failing");
                w.WriteStartArray("members");
                foreach (var m in f.Members)
                {
                    w.WriteStartObject();
                    w.WriteNumber("id", m.Id);
                    w.WriteString("label", m.Label);
                    if (m.Params is null) w.WriteNull("params"); else { w.WritePropertyName("params"); w.WriteRawValue(m.Params); }
                    w.WriteString("state", m.State.Text());
                    w.WriteEndObject();
                }
                w.WriteEndArray();
                w.WriteEndObject();
            }
            w.WriteEndArray();
        }
        output.WriteLine(System.Text.Encoding.UTF8.GetString(stream.ToArray()));
    }

    private static string Residue(System.Numerics.BigInteger[] c) => c.Length == 1 ? c[0].ToString() : TextReport.Polynomial(c);

    private static void WriteJson(TextWriter output, CandidateDetail detail)
    {
        var (c, trials) = (detail.Candidate, detail.Trials);
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
            if (detail.Result is { } r) WriteResult(w, r);
            w.WriteEndObject();
            WriteDetails(w, detail);
            WriteEquivalence(w, detail.Equivalence);
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

    /// <summary>The candidate's equivalence group: the representative whose result it shares (or waits for), or the entries that share its own.</summary>
    private static void WriteEquivalence(TextWriter o, StoredEquivalence g, ResultState state)
    {
        if (g.RepresentativeId is { } id)
        {
            var how = g.SharedFrom is not null ? "its result is shared from there, not screened here"
                : state.IsFinal() ? "screened on its own (the representative's result was not shared)"
                : "waits for the representative's result";
            o.WriteLine($"  same identity  as {g.RepresentativeLabel} (candidate {id}{(g.Swapped ? ", sides swapped" : "")}; " +
                $"fingerprint match, chance of a false match {g.Chance}): {how}");
        }
        else
        {
            o.WriteLine($"  written also as {string.Join(", ", g.Members.Take(10))}{(g.Members.Count > 10 ? $", … ({g.Members.Count} in all)" : "")}" +
                " (the same identity by fingerprint; they share this result)");
        }
    }

    /// <summary>The equivalence group under the columns of <c>equivalents</c> and <c>result.shared_from</c>; members for a representative; null when in none.</summary>
    private static void WriteEquivalence(Utf8JsonWriter w, StoredEquivalence? g)
    {
        if (g is null) { w.WriteNull("equivalence"); return; }
        w.WriteStartObject("equivalence");
        if (g.RepresentativeId is { } id)
        {
            w.WriteNumber("group_candidate_id", id);
            w.WriteString("group_label", g.RepresentativeLabel);
            w.WriteNumber("swapped", g.Swapped ? 1 : 0);
            if (g.FalseMatchBits is { } k) w.WriteNumber("false_match_bits", k); else w.WriteNull("false_match_bits");
            if (g.SharedFrom is { } from) w.WriteNumber("shared_from", from); else w.WriteNull("shared_from");
        }
        else
        {
            w.WriteStartArray("members");
            foreach (var m in g.Members) w.WriteStringValue(m);
            w.WriteEndArray();
        }
        w.WriteEndObject();
    }

    /// <summary>The refutation's counterexample and difference under the columns of their views (null when none was found).</summary>
    private static void WriteDetails(Utf8JsonWriter w, CandidateDetail detail)
    {
        WriteCounterexample(w, detail.Counterexample);
        WriteDifference(w, detail.Difference);
    }

    private static void WriteCounterexample(Utf8JsonWriter w, StoredCounterexample? counterexample)
    {
        if (counterexample is { } x)
        {
            w.WriteStartObject("counterexample");
            w.WritePropertyName("point");
            w.WriteRawValue(x.Point);
            w.WriteString("lhs_value", x.LhsValue);
            w.WriteString("rhs_value", x.RhsValue);
            if (x.Entry is null) w.WriteNull("entry"); else w.WriteString("entry", x.Entry);
            w.WriteNumber("max_abs", x.MaxAbs);
            w.WriteNumber("exhaustive", x.Exhaustive ? 1 : 0);
            w.WriteString("text", x.Describe());
            w.WriteEndObject();
        }
        else w.WriteNull("counterexample");
    }

    private static void WriteDifference(Utf8JsonWriter w, StoredDifference? difference)
    {
        if (difference is { } d)
        {
            w.WriteStartObject("difference");
            if (d.Text is null) w.WriteNull("difference"); else w.WriteString("difference", d.Text);
            if (d.Terms is { } terms) w.WriteNumber("terms", terms); else w.WriteNull("terms");
            if (d.TotalDegree is { } degree) w.WriteNumber("total_degree", degree); else w.WriteNull("total_degree");
            w.WriteNumber("terms_estimated", d.TermsEstimated ? 1 : 0);
            w.WriteString("text", d.Describe());
            w.WriteEndObject();
        }
        else w.WriteNull("difference");
    }

    /// <summary>The result row's columns under their SQL names, as <c>idq sql</c> would give them (certified as 1/0).</summary>
    private static void WriteResult(Utf8JsonWriter w, ResultDetail r)
    {
        w.WriteString("state", r.State.Text());
        if (r.DegreeBound is null) w.WriteNull("degree_bound"); else w.WriteString("degree_bound", r.DegreeBound);
        if (r.HeightBoundLog2 is double h) w.WriteNumber("height_bound_log2", h); else w.WriteNull("height_bound_log2");
        w.WriteNumber("trials_zero", r.TrialsZero);
        if (r.ErrorBoundLog2 is double e) w.WriteNumber("error_bound_log2", e); else w.WriteNull("error_bound_log2");
        if (r.WitnessTrialId is long t) w.WriteNumber("witness_trial_id", t); else w.WriteNull("witness_trial_id");
        w.WriteNumber("certified", r.Certified ? 1 : 0);
        if (r.Message is null) w.WriteNull("message"); else w.WriteString("message", r.Message);
        w.WriteString("updated_at", r.UpdatedAt);
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
            var targets = given.Length > 0 ? given.ToList() : [.. new CandidateReads(connection).InState(ResultState.Refuted)];
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
