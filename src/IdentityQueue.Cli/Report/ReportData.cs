using System.Globalization;
using System.Text;
using System.Text.Json;
using IdentityQueue.Store;
using IdentityQueue.Store.Read;
using IdentityQueue.Store.Schema;

namespace IdentityQueue.Cli.Report;

/// <summary>
/// Histogram bins over a SQL expression: bin 0 is below <c>Edges[0]</c>, bin i is [Edges[i-1], Edges[i]), the last
/// bin is at or above the last edge. The store does the binning (a portable CASE expression), so that a large store
/// sends one row per bin rather than one per candidate. Immutable.
/// </summary>
internal sealed class Bins(IReadOnlyList<double> edges, Func<double, string> format)
{
    public IReadOnlyList<double> Edges { get; } = edges;

    public int Count => Edges.Count + 1;

    /// <summary><c>CASE WHEN x &lt; e0 THEN 0 WHEN x &lt; e1 THEN 1 … ELSE n END</c>, standard SQL (the store's <see cref="ReportReads.BinCase"/>).</summary>
    public string CaseExpression(string x) => ReportReads.BinCase(x, Edges);

    /// <summary>The bin of a value, as <see cref="CaseExpression"/> computes it.</summary>
    public int IndexOf(double value)
    {
        for (var i = 0; i < Edges.Count; i++) if (value < Edges[i]) return i;
        return Edges.Count;
    }

    public string Label(int bin) =>
        bin == 0 ? $"< {format(Edges[0])}"
        : bin == Edges.Count ? $"≥ {format(Edges[^1])}"
        : Range(format(Edges[bin - 1]), format(Edges[bin]));

    /// <summary><c>20–50 µs</c> when both ends have the same unit, else <c>500 µs–1 ms</c>.</summary>
    private static string Range(string from, string to)
    {
        var a = from.Split(' ', 2);
        var b = to.Split(' ', 2);
        return a.Length == 2 && b.Length == 2 && a[1] == b[1] ? $"{a[0]}–{to}" : $"{from}–{to}";
    }

    /// <summary>
    /// Bits of evidence b = −error_bound_log2 of a survivor (error bound 2^-b): fine steps around the usual targets
    /// (64, 128) and doubling beyond.
    /// </summary>
    public static readonly Bins EvidenceBits = new([16, 32, 48, 64, 80, 96, 112, 128, 160, 192, 256, 384, 512, 1024, 2048, 4096, 8192],
        b => b.ToString("0", CultureInfo.InvariantCulture));

    /// <summary>Screening time per candidate in microseconds, in 1-2-5 steps from 10 µs to 200 s.</summary>
    public static readonly Bins Microseconds = new(OneTwoFive(10, 200_000_000), Duration);

    private static List<double> OneTwoFive(double from, double to)
    {
        var edges = new List<double>();
        for (var decade = from; decade <= to; decade *= 10)
            foreach (var m in new[] { 1, 2, 5 })
                if (decade * m <= to) edges.Add(decade * m);
        return edges;
    }

    /// <summary>10 µs, 2 ms, 0.5 s, 20 s.</summary>
    public static string Duration(double us) =>
        us < 1_000 ? $"{us.ToString("0.#", CultureInfo.InvariantCulture)} µs"
        : us < 1_000_000 ? $"{(us / 1_000).ToString("0.#", CultureInfo.InvariantCulture)} ms"
        : $"{(us / 1_000_000).ToString("0.#", CultureInfo.InvariantCulture)} s";
}

/// <summary>A catalogue of the report: name, source file, import time (as the store gave it) and run seed.</summary>
internal sealed record CatalogueInfo(string Name, string? Source, string ImportedAt, string Seed);

/// <summary>How many candidates of a catalogue are in a state (a candidate without a result row counts as pending).</summary>
internal sealed record StateCount(string Catalogue, string State, long Count);

/// <summary>How many refutations had their witness at trial number <c>Seq</c>, in a field of <c>FieldBits</c> bits.</summary>
internal sealed record StageCount(int Seq, int FieldBits, long Count);

/// <summary>One family instance: its parameters (as formatted text) and state, in parameter order.</summary>
internal sealed record Instance(string Params, string State)
{
    /// <summary>The parameters' values as the params JSON gives them (text), in the order of the family's parameters.</summary>
    public IReadOnlyList<string> Values { get; init; } = [];
}

/// <summary>A row of the <c>families</c> view with its instances.</summary>
internal sealed record FamilyInfo(string Catalogue, string Family, long Instances, long Survived, long Refuted, long Other,
    string? FirstRefuted, IReadOnlyList<Instance> Members)
{
    /// <summary>The family's parameter names, in order (from its first instance).</summary>
    public IReadOnlyList<string> Parameters { get; init; } = [];

    /// <summary>The view's <c>holds_for</c> (one parameter only).</summary>
    public string? HoldsFor { get; init; }

    /// <summary>The view's <c>fails_for</c> (one parameter only).</summary>
    public string? FailsFor { get; init; }

    /// <summary>The first failing instance in words, with its counterexample (<see cref="IdentityQueue.Store.Read.FirstFailure.Describe"/>).</summary>
    public string? FirstFailure { get; init; }

    /// <summary>Where the family holds and fails, in the words <c>idq show FAMILY</c> uses (<see cref="FamilyWords.Describe"/>).</summary>
    public string Words => FamilyWords.Describe(Parameters, HoldsFor, FailsFor, Instances, Survived, Refuted, Other,
        Members.Count == Instances ? [.. Members.Select(m => (m.Values, m.State == ResultStates.Refuted))] : null);
}

/// <summary>A refuted candidate with where it fails, in words (null when not found).</summary>
internal sealed record RefutationInfo(string Catalogue, long Id, string Label, string Identity, string? Counterexample, string? Smallness, string? Difference);

/// <summary>A row of <c>rejection</c>.</summary>
internal sealed record RejectionInfo(string Catalogue, string Source, long Line, string Raw, string Reason);

/// <summary>
/// Everything <c>idq report</c> shows, read from a store through its read model (<see cref="ReportReads"/>: portable SQL
/// over the public tables and views of SPEC §4); JSON parameters are parsed here, not in SQL. Immutable once loaded.
/// </summary>
internal sealed class ReportData
{
    /// <summary>The states in display order: the ones in flight, then the final ones.</summary>
    public static readonly IReadOnlyList<string> States = ResultStates.All;

    /// <summary>Family instances read at most (the strips of the families table); the rest are counted only.</summary>
    public const int MaxInstances = 100_000;

    /// <summary>Rejections listed at most; the total is given.</summary>
    public const int MaxRejections = 1_000;

    /// <summary>Refuted candidates listed with where they fail, at most; the total is given.</summary>
    public const int MaxRefutations = 500;

    public required IReadOnlyList<string> Filter { get; init; }
    public required IReadOnlyList<CatalogueInfo> Catalogues { get; init; }
    public required IReadOnlyList<StateCount> StateCounts { get; init; }
    public required IReadOnlyList<StageCount> Stages { get; init; }
    /// <summary>Survivors per bin of <see cref="Bins.EvidenceBits"/>.</summary>
    public required IReadOnlyList<long> EvidenceBins { get; init; }
    /// <summary>Survivors decided exactly (no variables, or a power series in q alone): no error bound, not in the bins.</summary>
    public required long ExactSurvivors { get; init; }
    /// <summary>Candidates with at least one trial, per bin of <see cref="Bins.Microseconds"/> of their summed trial times.</summary>
    public required IReadOnlyList<long> TimeBins { get; init; }
    public required long TimedCandidates { get; init; }
    public required long TotalMicroseconds { get; init; }
    public required IReadOnlyList<FamilyInfo> Families { get; init; }
    public required bool InstancesTruncated { get; init; }
    public required IReadOnlyList<RejectionInfo> Rejections { get; init; }
    public required long RejectionsTotal { get; init; }
    /// <summary>Refuted candidates with their counterexample and difference in words, in catalogue order, at most <see cref="MaxRefutations"/>.</summary>
    public IReadOnlyList<RefutationInfo> Refutations { get; init; } = [];
    public long RefutationsTotal { get; init; }

    /// <summary>Equivalence groups (#15 point 4, <see cref="EquivalenceSection"/>); none unless loaded.</summary>
    public EquivalenceInfo Equivalence { get; init; } = EquivalenceInfo.None;

    public long Total(string state) => StateCounts.Where(s => s.State == state).Sum(s => s.Count);

    public long Total(ResultState state) => Total(state.Text());

    public long Candidates => StateCounts.Sum(s => s.Count);

    /// <summary>Reads the report's data through the store's read model, for the named catalogues or all.</summary>
    public static ReportData Load(StoreConnection store, IReadOnlyList<string> catalogues)
    {
        var reads = new ReportReads(store, catalogues);
        var evidence = new long[Bins.EvidenceBits.Count];
        foreach (var bin in reads.EvidenceBins(Bins.EvidenceBits.Edges)) evidence[bin.Bin] += bin.Count;
        var time = new long[Bins.Microseconds.Count];
        long timed = 0, totalUs = 0;
        foreach (var bin in reads.TimeBins(Bins.Microseconds.Edges))
        {
            time[bin.Bin] += bin.Count;
            timed += bin.Count;
            totalUs += bin.Sum;
        }
        var instances = reads.Instances(MaxInstances + 1);
        var members = instances.Take(MaxInstances)
            .GroupBy(i => (i.Catalogue, i.Family))
            .ToDictionary(g => g.Key, g => (IReadOnlyList<Instance>)[.. g.Select(i => new Instance(FormatParams(i.Params), i.State.Text()) { Values = ParamValues(i.Params) })]);
        var names = instances.GroupBy(i => (i.Catalogue, i.Family)).ToDictionary(g => g.Key, g => FamilyWords.ParameterNames(g.First().Params));
        var firstFailures = new Dictionary<(string, string), string>();
        foreach (var (catalogue, family, failure) in reads.FirstFailures()) firstFailures.TryAdd((catalogue, family), failure.Describe());
        return new ReportData
        {
            Filter = catalogues,
            Catalogues = [.. reads.Catalogues().Select(c => new CatalogueInfo(c.Name, c.Source, c.ImportedAt, c.Seed.ToString(CultureInfo.InvariantCulture)))],
            StateCounts = [.. reads.StateCounts().Select(c => new StateCount(c.Catalogue, c.State.Text(), c.Count))],
            Stages = [.. reads.Stages().Select(s => new StageCount(s.Seq, s.FieldBits, s.Count))],
            EvidenceBins = evidence,
            ExactSurvivors = reads.ExactSurvivors(),
            TimeBins = time,
            TimedCandidates = timed,
            TotalMicroseconds = totalUs,
            Families = [.. reads.Families().Select(f => new FamilyInfo(f.Catalogue, f.Family, f.Instances, f.Survived, f.Refuted, f.Other,
                f.FirstRefuted is { } first ? FormatParams(first) : null, members.TryGetValue((f.Catalogue, f.Family), out var m) ? m : [])
            {
                Parameters = names.TryGetValue((f.Catalogue, f.Family), out var n) ? n : FamilyWords.ParameterNames(f.FirstRefuted),
                HoldsFor = f.HoldsFor,
                FailsFor = f.FailsFor,
                FirstFailure = firstFailures.GetValueOrDefault((f.Catalogue, f.Family)),
            })],
            InstancesTruncated = instances.Count > MaxInstances,
            Rejections = [.. reads.Rejections(MaxRejections).Select(r => new RejectionInfo(r.Catalogue, r.Source, r.Line, r.Raw, r.Reason))],
            RejectionsTotal = reads.RejectionsTotal(),
            Refutations = [.. reads.Refutations(MaxRefutations).Select(r => new RefutationInfo(r.Catalogue, r.Id, r.Label,
                Algebra.Syntax.ExprPrinter.Line(Algebra.Syntax.ExprPrinter.Canonical(r.Lhs), Algebra.Syntax.ExprPrinter.Canonical(r.Rhs), r.Field), r.Counterexample?.Describe(), r.Counterexample?.Smallness,
                r.Difference?.Describe()))],
            RefutationsTotal = reads.RefutationsTotal(),
            Equivalence = EquivalenceInfo.Load(store, catalogues),
        };
    }

    /// <summary>The values of a params JSON object as text, in order: the store's <see cref="FamilyWords.ParameterValues"/>.</summary>
    internal static IReadOnlyList<string> ParamValues(string? json) => FamilyWords.ParameterValues(json);

    /// <summary><c>{"n":3,"k":1}</c> → <c>n=3, k=1</c>: the hand-off tables' formatting, so report and tables agree.</summary>
    internal static string FormatParams(string? json) => Screening.HandOff.HandOffCandidate.FormatParams(json);

    /// <summary>
    /// The parameter values of the given instances, short: for one integer parameter, runs as ranges
    /// (<c>n = 2–3, 6, 9–11</c>); otherwise each instance's values in parentheses. At most <paramref name="max"/> items.
    /// </summary>
    internal static string Compress(IReadOnlyList<string> formatted, int max = 24)
    {
        if (formatted.Count == 0) return "";
        var single = formatted.Select(f => f.Split('=', 2)).ToList();
        var name = single[0][0];
        if (single.All(p => p.Length == 2 && p[0] == name && !p[1].Contains(',', StringComparison.Ordinal) && long.TryParse(p[1], NumberStyles.AllowLeadingSign, CultureInfo.InvariantCulture, out _)))
        {
            var values = single.Select(p => long.Parse(p[1], CultureInfo.InvariantCulture)).Distinct().Order().ToList();
            var runs = new List<string>();
            for (var i = 0; i < values.Count;)
            {
                var j = i;
                while (j + 1 < values.Count && values[j + 1] == values[j] + 1) j++;
                runs.Add(j == i ? $"{values[i]}" : j == i + 1 ? $"{values[i]}, {values[j]}" : $"{values[i]}–{values[j]}");
                i = j + 1;
            }
            return $"{name} = {Limit(runs, max)}";
        }
        return Limit([.. formatted.Select(f => $"({f})")], max);
    }

    private static string Limit(List<string> items, int max) =>
        items.Count <= max ? string.Join(", ", items) : string.Join(", ", items.Take(max)) + $", … ({items.Count - max} more)";
}
