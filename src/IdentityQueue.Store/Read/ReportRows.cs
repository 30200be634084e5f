using System.Globalization;
using System.Text;
using IdentityQueue.Store.Schema;

namespace IdentityQueue.Store.Read;

/// <summary>A catalogue: name, source file, import time ('YYYY-MM-DD HH:MM:SS', UTC) and run seed.</summary>
public sealed record CatalogueSummary(string Name, string? Source, string ImportedAt, long Seed);

/// <summary>How many refutations had their witness at trial number <c>Seq</c>, in a field of <c>FieldBits</c> bits.</summary>
public sealed record WitnessStage(int Seq, int FieldBits, long Count);

/// <summary>How many rows fell in histogram bin <c>Bin</c>, and the sum of the binned values (where the query gives it).</summary>
public sealed record BinCount(int Bin, long Count, long Sum);

/// <summary>A row of the <c>families</c> view.</summary>
public sealed record FamilySummary(string Catalogue, string Family, long Instances, long Survived, long Refuted, long Other, string? FirstRefuted)
{
    /// <summary>The view's <c>holds_for</c>: for a family in one parameter, the surviving values as ranges (<c>0..5</c>).</summary>
    public string? HoldsFor { get; init; }

    /// <summary>The view's <c>fails_for</c>: for a family in one parameter, the refuted values as ranges (<c>6..10</c>).</summary>
    public string? FailsFor { get; init; }
}

/// <summary>A refuted candidate with where it fails: its smallest counterexample and its difference, when found. Immutable.</summary>
public sealed record RefutationSummary(string Catalogue, long Id, string Label, string Lhs, string Rhs, string Field,
    StoredCounterexample? Counterexample, StoredDifference? Difference);

/// <summary>One family instance: its catalogue, family, parameters (JSON text) and state.</summary>
public sealed record FamilyInstance(string Catalogue, string Family, string? Params, ResultState State);

/// <summary>A row of <c>rejection</c>.</summary>
public sealed record RejectionSummary(string Catalogue, string Source, long Line, string Raw, string Reason);

/// <summary>
/// The read model of <c>idq report</c>: portable SQL only (standard SQL that SQLite and PostgreSQL both run: CASE,
/// COALESCE, standard aggregates, LIMIT; no <c>json_*</c> or <c>group_concat</c>), histograms binned in SQL so that a large
/// store sends one row per bin, and the catalogue filter as parameters. A candidate without a result row counts as
/// pending. Uses the connection it is given.
/// </summary>
public sealed class ReportReads(StoreConnection store, IReadOnlyList<string> catalogues)
{
    private readonly (string Condition, List<(string Name, object? Value)> Parameters) _filter = ReadSql.In("k.name", "c", catalogues);

    /// <summary>The names of the store's catalogues, in order.</summary>
    public static IReadOnlyList<string> CatalogueNames(StoreConnection store) =>
        ReadSql.Rows(store, "SELECT name FROM catalogue ORDER BY name", r => r.Text("name"));

    /// <summary><c>CASE WHEN x &lt; e0 THEN 0 WHEN x &lt; e1 THEN 1 … ELSE n END</c>, standard SQL: the bin of x among ascending edges.</summary>
    public static string BinCase(string x, IReadOnlyList<double> edges)
    {
        var sql = new StringBuilder("CASE");
        for (var i = 0; i < edges.Count; i++) sql.Append($" WHEN {x} < {edges[i].ToString("R", CultureInfo.InvariantCulture)} THEN {i}");
        return sql.Append($" ELSE {edges.Count} END").ToString();
    }

    /// <summary>Every query's text with no filter (a portability check reads them).</summary>
    public static IReadOnlyList<string> QueryTexts =>
    [
        CataloguesQuery(""), StatesQuery(""), StagesQuery(""), EvidenceQuery("", [1.0]), ExactSurvivorsQuery(""), TimeQuery("", [1.0]),
        FamiliesQuery(""), InstancesQuery("", 1), RejectionsQuery("", 1), RejectionsCountQuery(""),
        FirstFailuresQuery(""), RefutationsQuery("", 1), RefutationsCountQuery(""),
    ];

    private static string CataloguesQuery(string where) =>
        $"SELECT k.name, k.source, k.imported_at, k.seed FROM catalogue k WHERE 1 = 1{where} ORDER BY k.name";

    private static string StatesQuery(string where) => $"""
        SELECT k.name, COALESCE(r.state, '{ResultStates.Pending}') AS state, COUNT(*) AS n
        FROM candidate c JOIN catalogue k ON k.id = c.catalogue_id LEFT JOIN result r ON r.candidate_id = c.id
        WHERE 1 = 1{where}
        GROUP BY k.name, COALESCE(r.state, '{ResultStates.Pending}')
        ORDER BY k.name
        """;

    private static string StagesQuery(string where) => $"""
        SELECT t.seq, t.field_bits, COUNT(*) AS n
        FROM result r JOIN trial t ON t.id = r.witness_trial_id
             JOIN candidate c ON c.id = r.candidate_id JOIN catalogue k ON k.id = c.catalogue_id
        WHERE r.state = '{ResultStates.Refuted}'{where}
        GROUP BY t.seq, t.field_bits
        ORDER BY t.seq, t.field_bits
        """;

    private static string EvidenceQuery(string where, IReadOnlyList<double> edges) => $"""
        SELECT b.bin, COUNT(*) AS n
        FROM (SELECT {BinCase("(0 - r.error_bound_log2)", edges)} AS bin
              FROM result r JOIN candidate c ON c.id = r.candidate_id JOIN catalogue k ON k.id = c.catalogue_id
              WHERE r.state = '{ResultStates.Survived}' AND r.error_bound_log2 IS NOT NULL{where}) b
        GROUP BY b.bin
        """;

    private static string ExactSurvivorsQuery(string where) => $"""
        SELECT COUNT(*) AS n FROM result r JOIN candidate c ON c.id = r.candidate_id JOIN catalogue k ON k.id = c.catalogue_id
        WHERE r.state = '{ResultStates.Survived}' AND r.error_bound_log2 IS NULL{where}
        """;

    private static string TimeQuery(string where, IReadOnlyList<double> edges) => $"""
        SELECT b.bin, COUNT(*) AS n, SUM(b.us) AS us
        FROM (SELECT {BinCase("p.us", edges)} AS bin, p.us AS us
              FROM (SELECT t.candidate_id, SUM(t.elapsed_us) AS us
                    FROM trial t JOIN candidate c ON c.id = t.candidate_id JOIN catalogue k ON k.id = c.catalogue_id
                    WHERE 1 = 1{where}
                    GROUP BY t.candidate_id) p) b
        GROUP BY b.bin
        """;

    private static string FamiliesQuery(string where) => $"""
        SELECT f.catalogue, f.family, f.instances, f.survived, f.refuted, f.other, f.first_refuted, f.holds_for, f.fails_for
        FROM families f
        WHERE 1 = 1{where}
        ORDER BY f.catalogue, f.family
        """;

    private static string InstancesQuery(string where, int limit) => $"""
        SELECT k.name, c.family, c.params, COALESCE(r.state, '{ResultStates.Pending}') AS state
        FROM candidate c JOIN catalogue k ON k.id = c.catalogue_id LEFT JOIN result r ON r.candidate_id = c.id
        WHERE c.family IS NOT NULL{where}
        ORDER BY k.name, c.family, c.position, c.id
        LIMIT {limit.ToString(CultureInfo.InvariantCulture)}
        """;

    private static string RejectionsQuery(string where, int limit) => $"""
        SELECT k.name, j.source, j.line, j.raw, j.reason
        FROM rejection j JOIN catalogue k ON k.id = j.catalogue_id
        WHERE 1 = 1{where}
        ORDER BY k.name, j.source, j.line, j.id
        LIMIT {limit.ToString(CultureInfo.InvariantCulture)}
        """;

    private static string FirstFailuresQuery(string where) => FamilyReads.FirstFailuresQuery + where + " ORDER BY k.name, c.family, c.id";

    private static string RefutationsQuery(string where, int limit) => $"""
        SELECT k.name, c.id, c.label, c.lhs, c.rhs, c.field,
               {RefutationDetailSql.Columns}
        FROM candidate c JOIN catalogue k ON k.id = c.catalogue_id JOIN result r ON r.candidate_id = c.id
             {RefutationDetailSql.Joins}
        WHERE r.state = '{ResultStates.Refuted}'{where}
        ORDER BY k.name, c.position, c.id
        LIMIT {limit.ToString(CultureInfo.InvariantCulture)}
        """;

    private static string RefutationsCountQuery(string where) => $"""
        SELECT COUNT(*) AS n FROM candidate c JOIN catalogue k ON k.id = c.catalogue_id JOIN result r ON r.candidate_id = c.id
        WHERE r.state = '{ResultStates.Refuted}'{where}
        """;

    private static string RejectionsCountQuery(string where) =>
        $"SELECT COUNT(*) AS n FROM rejection j JOIN catalogue k ON k.id = j.catalogue_id WHERE 1 = 1{where}";

    private List<T> Rows<T>(string sql, Func<ReadRow, T> map) => ReadSql.Rows(store, sql, _filter.Parameters, map);

    public IReadOnlyList<CatalogueSummary> Catalogues() =>
        Rows(CataloguesQuery(_filter.Condition), r => new CatalogueSummary(r.Text("name"), r.NullableText("source"), r.Text("imported_at"), r.Long("seed")));

    /// <summary>Candidates per catalogue and state.</summary>
    public IReadOnlyList<(string Catalogue, ResultState State, long Count)> StateCounts() =>
        Rows(StatesQuery(_filter.Condition), r => (r.Text("name"), ResultStates.Parse(r.Text("state")), r.Long("n")));

    /// <summary>Refutations per trial number and field size of their witness.</summary>
    public IReadOnlyList<WitnessStage> Stages() =>
        Rows(StagesQuery(_filter.Condition), r => new WitnessStage((int)r.Long("seq"), (int)r.Long("field_bits"), r.Long("n")));

    /// <summary>Survivors with an error bound 2^-b, per bin of b among <paramref name="edges"/>.</summary>
    public IReadOnlyList<BinCount> EvidenceBins(IReadOnlyList<double> edges) =>
        Rows(EvidenceQuery(_filter.Condition, edges), r => new BinCount((int)r.Long("bin"), r.Long("n"), 0));

    /// <summary>Survivors decided exactly (no error bound).</summary>
    public long ExactSurvivors() => Rows(ExactSurvivorsQuery(_filter.Condition), r => r.Long("n"))[0];

    /// <summary>Candidates with trials, per bin of their summed trial microseconds among <paramref name="edges"/>, with the sum.</summary>
    public IReadOnlyList<BinCount> TimeBins(IReadOnlyList<double> edges) =>
        Rows(TimeQuery(_filter.Condition, edges), r => new BinCount((int)r.Long("bin"), r.Long("n"), r.Long("us")));

    public IReadOnlyList<FamilySummary> Families()
    {
        var (condition, parameters) = ReadSql.In("f.catalogue", "c", catalogues);
        return ReadSql.Rows(store, FamiliesQuery(condition), parameters, r => new FamilySummary(r.Text("catalogue"), r.Text("family"),
            r.Long("instances"), r.Long("survived"), r.Long("refuted"), r.Long("other"), r.NullableText("first_refuted"))
        {
            HoldsFor = r.NullableText("holds_for"),
            FailsFor = r.NullableText("fails_for"),
        });
    }

    /// <summary>Each family's first failing instances (first in parameter order; the first of these by id is the one) with their counterexample and difference.</summary>
    public IReadOnlyList<(string Catalogue, string Family, FirstFailure Failure)> FirstFailures() =>
        Rows(FirstFailuresQuery(_filter.Condition), FamilyReads.ReadFirstFailure);

    /// <summary>Refuted candidates in catalogue order with where they fail, at most <paramref name="limit"/>.</summary>
    public IReadOnlyList<RefutationSummary> Refutations(int limit) =>
        Rows(RefutationsQuery(_filter.Condition, limit), r => new RefutationSummary(r.Text("name"), r.Long("id"), r.Text("label"), r.Text("lhs"),
            r.Text("rhs"), r.Text("field"),
            RefutationDetailSql.Counterexample(r),
            RefutationDetailSql.Difference(r)));

    public long RefutationsTotal() => Rows(RefutationsCountQuery(_filter.Condition), r => r.Long("n"))[0];

    /// <summary>Family instances in parameter order, at most <paramref name="limit"/>.</summary>
    public IReadOnlyList<FamilyInstance> Instances(int limit) =>
        Rows(InstancesQuery(_filter.Condition, limit), r => new FamilyInstance(r.Text("name"), r.Text("family"), r.NullableText("params"), ResultStates.Parse(r.Text("state"))));

    /// <summary>Rejections in file order, at most <paramref name="limit"/>.</summary>
    public IReadOnlyList<RejectionSummary> Rejections(int limit) =>
        Rows(RejectionsQuery(_filter.Condition, limit), r => new RejectionSummary(r.Text("name"), r.Text("source"), r.Long("line"), r.Text("raw"), r.Text("reason")));

    public long RejectionsTotal() => Rows(RejectionsCountQuery(_filter.Condition), r => r.Long("n"))[0];
}
