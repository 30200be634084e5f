using System.Numerics;
using IdentityQueue.Algebra.Syntax;
using IdentityQueue.Screening;
using static IdentityQueue.Cli.CheckCommand;

namespace IdentityQueue.Cli;

/// <summary>The human-readable face of <c>idq check</c>.</summary>
internal static class TextReport
{
    public static void Write(TextWriter o, IdentityEntry entry, ScreeningOptions options, IReadOnlyList<InstanceOutcome> outcomes)
    {
        if (outcomes.Count == 1)
        {
            WriteOne(o, entry, outcomes[0]);
        }
        else
        {
            o.WriteLine($"family of {outcomes.Count} instances: " + string.Join(", ",
                outcomes.GroupBy(x => x.Verdict).OrderBy(g => g.Key).Select(g => $"{g.Count()} {g.Key.ToString().ToLowerInvariant()}")));
            foreach (var x in outcomes)
            {
                o.WriteLine();
                o.WriteLine($"[{string.Join(", ", x.Parameters.Select(p => $"{p.Key} = {p.Value}"))}]");
                WriteOne(o, entry, x);
            }
        }
        o.WriteLine();
        o.WriteLine($"seed {options.Seed}, target {options.Target} (rerun with --seed {options.Seed} to reproduce)");
    }

    private static void WriteOne(TextWriter o, IdentityEntry entry, InstanceOutcome x)
    {
        var r = x.Result;
        switch (x.Verdict)
        {
            case Verdict.Invalid:
                o.WriteLine("invalid (the reason is on standard error)");
                return;
            case Verdict.Survived or Verdict.Refuted when r is { Trials.Count: 0, Message: { } exact }:
                o.WriteLine($"{(x.Verdict == Verdict.Survived ? "survived: true" : "refuted: false")} over {entry.Field}, {exact}");
                return;
            case Verdict.Survived:
                o.WriteLine($"survived: very likely true over {entry.Field} (screening is evidence, not proof)");
                break;
            case Verdict.Refuted:
                o.WriteLine($"refuted: false over {entry.Field}");
                break;
            default:
                o.WriteLine($"undecided: {r!.Message}");
                break;
        }
        o.WriteLine($"  degree bound   {r!.DegreeBound}");
        if (r.Verdict != Verdict.Refuted && r.ErrorBoundLog2 is double e && e < 0)
            o.WriteLine($"  error bound    2^{e:F1}: a false identity passes these trials with probability at most this, if the degree bound holds");
        o.WriteLine($"  trials         {r.TrialCount}: " + string.Join(", ", r.Trials.GroupBy(t => t.Field.Bits).OrderBy(g => g.Key)
            .Select(g => $"{g.Count()} in a {g.Key}-bit field" + Undefined(g))));
        if (r.Witness is { } w)
        {
            var f = w.Field;
            o.WriteLine(f.DefiningPolynomial is null
                ? $"  witness        modulus p = {f.Modulus} ({f.Bits} bits)"
                : $"  witness        GF({f.Modulus}^{f.ExtensionDegree}) = GF({f.Modulus})[t]/({Polynomial(f.DefiningPolynomial)})");
            foreach (var v in w.Point) o.WriteLine($"                 {v.Name} = {Element(v.Coordinates, f)}");
            o.WriteLine($"                 lhs - rhs = {Element(w.Difference!, f)}" + (w.Entry is null ? "" : $" at entry {w.Entry}") + " (nonzero)");
            if (r.Certified) o.WriteLine(entry.Field.IsRationals
                ? "                 confirmed exactly over Q at this integer point"
                : "                 confirmed by an independent re-evaluation");
        }
        if (x.Details?.Counterexample is { } c)
            o.WriteLine($"  counterexample {c.Describe()}" + (c.Exhaustive ? " (the least: every smaller point was tried)" : ""));
        if (x.Details?.Difference is { } d) o.WriteLine($"  difference     {d.Describe()}");
    }

    private static string Undefined(IGrouping<int, TrialRecord> g)
    {
        var n = g.Count(t => t.Outcome == TrialOutcome.Undefined);
        return n == 0 ? "" : $" ({n} undefined, resampled)";
    }

    private static string Element(BigInteger[] c, TrialField f) =>
        f.DefiningPolynomial is null ? c[0].ToString() : Polynomial(c);

    /// <summary>A polynomial in t from coefficients lowest first: 3 + t + 2t^2.</summary>
    internal static string Polynomial(BigInteger[] c)
    {
        var terms = new List<string>();
        for (var i = 0; i < c.Length; i++)
        {
            if (c[i].IsZero) continue;
            var coefficient = c[i].IsOne && i > 0 ? "" : c[i].ToString();
            terms.Add(i switch { 0 => coefficient, 1 => $"{coefficient}t", _ => $"{coefficient}t^{i}" });
        }
        return terms.Count == 0 ? "0" : string.Join(" + ", terms);
    }
}
