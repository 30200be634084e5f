using System.Numerics;
using System.Text.Json;
using IdentityQueue.Algebra.Syntax;
using IdentityQueue.Screening;
using static IdentityQueue.Cli.CheckCommand;

namespace IdentityQueue.Cli;

/// <summary>The JSON face of <c>idq check --json</c> (SPEC §2): one object, keys fixed by the contract, extras after them.</summary>
internal static class JsonReport
{
    private static readonly JsonWriterOptions Options = new() { Indented = true };
    private static readonly BigInteger MaxExactDouble = BigInteger.Pow(2, 53);

    public static void WriteInvalid(TextWriter output, string message)
    {
        using var stream = new MemoryStream();
        using (var w = new Utf8JsonWriter(stream, Options))
        {
            w.WriteStartObject();
            w.WriteString("verdict", Verdict.Invalid.ToString().ToLowerInvariant());
            w.WriteNull("degreeBound");
            w.WriteNull("errorBoundLog2");
            w.WriteNumber("trials", 0);
            w.WriteNull("witness");
            w.WriteString("message", message);
            w.WriteEndObject();
        }
        output.WriteLine(System.Text.Encoding.UTF8.GetString(stream.ToArray()));
    }

    public static void Write(TextWriter output, IdentityEntry entry, ScreeningOptions options, IReadOnlyList<InstanceOutcome> outcomes)
    {
        using var stream = new MemoryStream();
        using (var w = new Utf8JsonWriter(stream, Options))
        {
            // A family reports the deciding instance at the top level: the first refuted, else the first invalid, the first
            // undecided, or the weakest survivor; every instance follows under "instances".
            var lead = Lead(outcomes);
            w.WriteStartObject();
            WriteInstance(w, lead);
            w.WriteString("field", entry.Field.ToString());
            if (entry.Label is not null) w.WriteString("label", entry.Label);
            w.WriteString("seed", options.Seed.ToString());
            w.WriteNumber("targetBits", options.Target.Bits);
            if (entry.IsFamily)
            {
                w.WriteStartArray("instances");
                foreach (var o in outcomes)
                {
                    w.WriteStartObject();
                    WriteInstance(w, o);
                    w.WriteEndObject();
                }
                w.WriteEndArray();
            }
            w.WriteEndObject();
        }
        output.WriteLine(System.Text.Encoding.UTF8.GetString(stream.ToArray()));
    }

    internal static InstanceOutcome Lead(IReadOnlyList<InstanceOutcome> outcomes) =>
        outcomes.FirstOrDefault(o => o.Verdict == Verdict.Refuted)
        ?? outcomes.FirstOrDefault(o => o.Verdict == Verdict.Invalid)
        ?? outcomes.FirstOrDefault(o => o.Verdict == Verdict.Undecided)
        ?? outcomes.MaxBy(o => o.Result!.ErrorBoundLog2 ?? 0)!;

    private static void WriteInstance(Utf8JsonWriter w, InstanceOutcome o)
    {
        var r = o.Result;
        w.WriteString("verdict", o.Verdict.ToString().ToLowerInvariant());
        if (r is null) w.WriteNull("degreeBound");
        else if (BigInteger.Abs(r.DegreeBound) <= MaxExactDouble) w.WriteNumber("degreeBound", (ulong)r.DegreeBound);
        else w.WriteString("degreeBound", r.DegreeBound.ToString());
        if (r?.ErrorBoundLog2 is double e && r.Verdict != Verdict.Refuted) w.WriteNumber("errorBoundLog2", Math.Round(e, 3));
        else w.WriteNull("errorBoundLog2");
        w.WriteNumber("trials", r?.TrialCount ?? 0);
        if (r?.Witness is { } witness) WriteWitness(w, witness, r.Certified);
        else w.WriteNull("witness");
        WriteDetails(w, o.Details);
        if (o.Invalid is not null) w.WriteString("message", o.Invalid);
        else if (r?.Message is not null) w.WriteString("message", r.Message);
        else w.WriteNull("message");
        if (o.Parameters.Count > 0)
        {
            w.WriteStartObject("params");
            foreach (var (name, value) in o.Parameters) w.WriteString(name, value.ToString());
            w.WriteEndObject();
        }
        if (r is not null)
        {
            w.WriteNumber("heightBoundLog2", double.IsNegativeInfinity(r.HeightBoundLog2) ? 0 : Math.Round(r.HeightBoundLog2, 3));
            w.WriteStartArray("trialsByField");
            foreach (var g in r.Trials.GroupBy(t => t.Field.Bits).OrderBy(g => g.Key))
            {
                w.WriteStartObject();
                w.WriteNumber("fieldBits", g.Key);
                w.WriteNumber("zero", g.Count(t => t.Outcome == TrialOutcome.Zero));
                w.WriteNumber("nonzero", g.Count(t => t.Outcome == TrialOutcome.Nonzero));
                w.WriteNumber("undefined", g.Count(t => t.Outcome == TrialOutcome.Undefined));
                w.WriteEndObject();
            }
            w.WriteEndArray();
        }
    }

    private static void WriteWitness(Utf8JsonWriter w, TrialRecord t, bool certified)
    {
        var extension = t.Field.DefiningPolynomial is not null;
        w.WriteStartObject("witness");
        w.WriteString("modulus", t.Field.Modulus.ToString());
        w.WriteNumber("fieldBits", t.Field.Bits);
        if (extension)
        {
            w.WriteNumber("extensionDegree", t.Field.ExtensionDegree);
            WriteCoefficients(w, "definingPolynomial", t.Field.DefiningPolynomial!);
        }
        w.WriteStartObject("point");
        foreach (var v in t.Point)
        {
            if (extension) WriteCoefficients(w, v.Name, v.Coordinates);
            else w.WriteString(v.Name, v.Coordinates[0].ToString());
        }
        w.WriteEndObject();
        if (extension) WriteCoefficients(w, "difference", t.Difference!);
        else w.WriteString("difference", t.Difference![0].ToString());
        if (t.Entry is not null) w.WriteString("entry", t.Entry);
        w.WriteNumber("trial", t.Seq);
        w.WriteString("pointSeed", t.PointSeed.ToString());
        w.WriteBoolean("certified", certified);
        w.WriteEndObject();
    }

    private static void WriteCoefficients(Utf8JsonWriter w, string name, BigInteger[] coefficients)
    {
        w.WriteStartArray(name);
        foreach (var c in coefficients) w.WriteStringValue(c.ToString());
        w.WriteEndArray();
    }

    /// <summary>A refuted instance's smallest counterexample and recovered difference (null when none was found).</summary>
    private static void WriteDetails(Utf8JsonWriter w, Screening.Counterexamples.RefutationDetails? details)
    {
        if (details?.Counterexample is { } c)
        {
            w.WriteStartObject("counterexample");
            w.WriteStartObject("point");
            foreach (var (variable, value) in c.Point) w.WriteString(variable, value.ToString());
            w.WriteEndObject();
            w.WriteString("lhsValue", c.LhsValue);
            w.WriteString("rhsValue", c.RhsValue);
            if (c.Entry is null) w.WriteNull("entry"); else w.WriteString("entry", c.Entry);
            w.WriteString("maxAbs", c.MaxAbs.ToString());
            w.WriteBoolean("exhaustive", c.Exhaustive);
            w.WriteString("text", c.Describe());
            w.WriteEndObject();
        }
        else w.WriteNull("counterexample");
        if (details?.Difference is { } d)
        {
            w.WriteStartObject("difference");
            if (d.StoredText is { } text) w.WriteString("text", text); else w.WriteNull("text");
            if (d.Terms is { } terms) w.WriteNumber("terms", terms); else w.WriteNull("terms");
            if (d.EstimatedTerms is { } estimate) w.WriteNumber("estimatedTerms", estimate); else w.WriteNull("estimatedTerms");
            if (d.TotalDegree >= 0) w.WriteNumber("totalDegree", d.TotalDegree); else w.WriteNull("totalDegree");
            w.WriteBoolean("verified", d.Verified);
            w.WriteEndObject();
        }
        else w.WriteNull("difference");
    }
}
