using System.Globalization;
using System.Text;
using System.Text.Json;
using IdentityQueue.Store;

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

    /// <summary><c>CASE WHEN x &lt; e0 THEN 0 WHEN x &lt; e1 THEN 1 … ELSE n END</c>, standard SQL.</summary>
    public string CaseExpression(string x)
    {
        var sql = new StringBuilder("CASE");
        for (var i = 0; i < Edges.Count; i++) sql.Append($" WHEN {x} < {Edges[i].ToString("R", CultureInfo.InvariantCulture)} THEN {i}");
        return sql.Append($" ELSE {Edges.Count} END").ToString();
    }

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
internal sealed record Instance(string Params, string State);

/// <summary>A row of the <c>families</c> view with its instances.</summary>
internal sealed record FamilyInfo(string Catalogue, string Family, long Instances, long Survived, long Refuted, long Other,
    string? FirstRefuted, IReadOnlyList<Instance> Members);

/// <summary>A row of <c>rejection</c>.</summary>
internal sealed record RejectionInfo(string Catalogue, string Source, long Line, string Raw, string Reason);

/// <summary>
/// Everything <c>idq report</c> shows, read from a store through plain SQL over the public tables and views of SPEC §4.
/// The queries are portable (standard SQL that SQLite and PostgreSQL both run: CASE, COALESCE, CAST, standard
/// aggregates, LIMIT); JSON parameters are parsed here, not in SQL. Immutable once loaded.
/// </summary>
internal sealed class ReportData
{
    /// <summary>The states in display order: the ones in flight, then the final ones.</summary>
    public static readonly string[] States = ["pending", "queued", "screening", "refuted", "survived", "undecided", "invalid", "failed"];

    /// <summary>Family instances read at most (the strips of the families table); the rest are counted only.</summary>
    public const int MaxInstances = 100_000;

    /// <summary>Rejections listed at most; the total is given.</summary>
    public const int MaxRejections = 1_000;

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

    public long Total(string state) => StateCounts.Where(s => s.State == state).Sum(s => s.Count);

    public long Candidates => StateCounts.Sum(s => s.Count);

    /// <summary><c>AND k.name IN ('a', 'b''c')</c> for a catalogue filter, else empty: standard SQL string literals.</summary>
    internal static string CatalogueCondition(IReadOnlyList<string> names, string column = "k.name") =>
        names.Count == 0 ? "" : $" AND {column} IN ({string.Join(", ", names.Select(n => "'" + n.Replace("'", "''", StringComparison.Ordinal) + "'"))})";

    internal static string CataloguesQuery(string where) =>
        $"SELECT k.name, k.source, k.imported_at, k.seed FROM catalogue k WHERE 1 = 1{where} ORDER BY k.name";

    internal static string StatesQuery(string where) => $"""
        SELECT k.name, COALESCE(r.state, 'pending') AS state, COUNT(*) AS n
        FROM candidate c JOIN catalogue k ON k.id = c.catalogue_id LEFT JOIN result r ON r.candidate_id = c.id
        WHERE 1 = 1{where}
        GROUP BY k.name, COALESCE(r.state, 'pending')
        ORDER BY k.name
        """;

    internal static string StagesQuery(string where) => $"""
        SELECT t.seq, t.field_bits, COUNT(*) AS n
        FROM result r JOIN trial t ON t.id = r.witness_trial_id
             JOIN candidate c ON c.id = r.candidate_id JOIN catalogue k ON k.id = c.catalogue_id
        WHERE r.state = 'refuted'{where}
        GROUP BY t.seq, t.field_bits
        ORDER BY t.seq, t.field_bits
        """;

    internal static string EvidenceQuery(string where) => $"""
        SELECT b.bin, COUNT(*) AS n
        FROM (SELECT {Bins.EvidenceBits.CaseExpression("(0 - r.error_bound_log2)")} AS bin
              FROM result r JOIN candidate c ON c.id = r.candidate_id JOIN catalogue k ON k.id = c.catalogue_id
              WHERE r.state = 'survived' AND r.error_bound_log2 IS NOT NULL{where}) b
        GROUP BY b.bin
        """;

    internal static string ExactSurvivorsQuery(string where) => $"""
        SELECT COUNT(*) FROM result r JOIN candidate c ON c.id = r.candidate_id JOIN catalogue k ON k.id = c.catalogue_id
        WHERE r.state = 'survived' AND r.error_bound_log2 IS NULL{where}
        """;

    internal static string TimeQuery(string where) => $"""
        SELECT b.bin, COUNT(*) AS n, SUM(b.us) AS us
        FROM (SELECT {Bins.Microseconds.CaseExpression("p.us")} AS bin, p.us AS us
              FROM (SELECT t.candidate_id, SUM(t.elapsed_us) AS us
                    FROM trial t JOIN candidate c ON c.id = t.candidate_id JOIN catalogue k ON k.id = c.catalogue_id
                    WHERE 1 = 1{where}
                    GROUP BY t.candidate_id) p) b
        GROUP BY b.bin
        """;

    internal static string FamiliesQuery(IReadOnlyList<string> names) => $"""
        SELECT f.catalogue, f.family, f.instances, f.survived, f.refuted, f.other, f.first_refuted
        FROM families f
        WHERE 1 = 1{CatalogueCondition(names, "f.catalogue")}
        ORDER BY f.catalogue, f.family
        """;

    internal static string InstancesQuery(string where) => $"""
        SELECT k.name, c.family, c.params, COALESCE(r.state, 'pending') AS state
        FROM candidate c JOIN catalogue k ON k.id = c.catalogue_id LEFT JOIN result r ON r.candidate_id = c.id
        WHERE c.family IS NOT NULL{where}
        ORDER BY k.name, c.family, c.position, c.id
        LIMIT {MaxInstances + 1}
        """;

    internal static string RejectionsQuery(string where) => $"""
        SELECT k.name, j.source, j.line, j.raw, j.reason
        FROM rejection j JOIN catalogue k ON k.id = j.catalogue_id
        WHERE 1 = 1{where}
        ORDER BY k.name, j.source, j.line, j.id
        LIMIT {MaxRejections}
        """;

    internal static string RejectionsCountQuery(string where) =>
        $"SELECT COUNT(*) FROM rejection j JOIN catalogue k ON k.id = j.catalogue_id WHERE 1 = 1{where}";

    /// <summary>Reads the report's data with <paramref name="query"/> (one SQL statement → its rows), for the named catalogues or all.</summary>
    public static ReportData Load(Func<string, QueryResult> query, IReadOnlyList<string> catalogues)
    {
        var where = CatalogueCondition(catalogues);
        var evidence = new long[Bins.EvidenceBits.Count];
        foreach (var row in query(EvidenceQuery(where)).Rows) evidence[Int(row[0])] += Long(row[1]);
        var time = new long[Bins.Microseconds.Count];
        long timed = 0, totalUs = 0;
        foreach (var row in query(TimeQuery(where)).Rows)
        {
            time[Int(row[0])] += Long(row[1]);
            timed += Long(row[1]);
            totalUs += Long(row[2]);
        }
        var instanceRows = query(InstancesQuery(where)).Rows;
        var members = instanceRows.Take(MaxInstances)
            .GroupBy(r => (Text(r[0]), Text(r[1])))
            .ToDictionary(g => g.Key, g => (IReadOnlyList<Instance>)[.. g.Select(r => new Instance(FormatParams(r[2] as string), Text(r[3])))]);
        return new ReportData
        {
            Filter = catalogues,
            Catalogues = [.. query(CataloguesQuery(where)).Rows.Select(r => new CatalogueInfo(Text(r[0]), r[1] as string, Text(r[2]), Text(r[3])))],
            StateCounts = [.. query(StatesQuery(where)).Rows.Select(r => new StateCount(Text(r[0]), Text(r[1]), Long(r[2])))],
            Stages = [.. query(StagesQuery(where)).Rows.Select(r => new StageCount(Int(r[0]), Int(r[1]), Long(r[2])))],
            EvidenceBins = evidence,
            ExactSurvivors = Long(query(ExactSurvivorsQuery(where)).Rows[0][0]),
            TimeBins = time,
            TimedCandidates = timed,
            TotalMicroseconds = totalUs,
            Families = [.. query(FamiliesQuery(catalogues)).Rows.Select(r =>
            {
                var key = (Text(r[0]), Text(r[1]));
                return new FamilyInfo(key.Item1, key.Item2, Long(r[2]), Long(r[3]), Long(r[4]), Long(r[5]),
                    r[6] is string first ? FormatParams(first) : null, members.TryGetValue(key, out var m) ? m : []);
            })],
            InstancesTruncated = instanceRows.Count > MaxInstances,
            Rejections = [.. query(RejectionsQuery(where)).Rows.Select(r => new RejectionInfo(Text(r[0]), Text(r[1]), Long(r[2]), Text(r[3]), Text(r[4])))],
            RejectionsTotal = Long(query(RejectionsCountQuery(where)).Rows[0][0]),
        };
    }

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

    private static string Limit(IReadOnlyList<string> items, int max) =>
        items.Count <= max ? string.Join(", ", items) : string.Join(", ", items.Take(max)) + $", … ({items.Count - max} more)";

    private static string Text(object? value) => QueryCommands.Text(value);

    private static long Long(object? value) => value is null ? 0 : Convert.ToInt64(value, CultureInfo.InvariantCulture);

    private static int Int(object? value) => (int)Long(value);
}
