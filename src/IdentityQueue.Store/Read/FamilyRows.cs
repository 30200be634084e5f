using System.Globalization;
using System.Text.Json;
using IdentityQueue.Store.Schema;

namespace IdentityQueue.Store.Read;

/// <summary>One instance of a family: its candidate, label, parameters (JSON text as stored) and state. Immutable.</summary>
public sealed record FamilyMember(long Id, string Label, string? Params, ResultState State);

/// <summary>
/// The first failing instance of a family (the refuted instance that comes first in parameter order, as the
/// <c>families</c> view's <c>first_refuted</c>) with its refutation details when they were found. Immutable.
/// </summary>
public sealed record FirstFailure(long Id, string Label, string? Params, StoredCounterexample? Counterexample, StoredDifference? Difference)
{
    /// <summary>"at n=6: fails: lhs = 31, rhs = 32", or "at n=6 (no counterexample found)": the shared wording.</summary>
    public string Describe() => FamilyWords.FirstFailure(Params, Counterexample);
}

/// <summary>
/// A family as <c>idq show FAMILY</c> gives it: the <c>families</c> view's row (counts, <c>holds_for</c>,
/// <c>fails_for</c>), its instances in parameter order and its first failing instance. Immutable.
/// </summary>
public sealed record FamilyDetail(
    string Catalogue,
    string Family,
    long Instances,
    long Survived,
    long Refuted,
    long Other,
    string? HoldsFor,
    string? FailsFor,
    IReadOnlyList<FamilyMember> Members,
    FirstFailure? FirstFailing)
{
    /// <summary>The family's parameter names, from its first instance's parameters, in their order.</summary>
    public IReadOnlyList<string> Parameters => FamilyWords.ParameterNames(Members.Count == 0 ? null : Members[0].Params);

    /// <summary>"holds for n = 0..5, fails for n = 6..10" (see <see cref="FamilyWords.Describe"/>).</summary>
    public string Words => FamilyWords.Describe(Parameters, HoldsFor, FailsFor, Instances, Survived, Refuted, Other,
        [.. Members.Select(m => (FamilyWords.ParameterValues(m.Params), m.State == ResultState.Refuted))]);
}

/// <summary>
/// Where a family holds and where it fails, in words: the one wording that <c>idq show FAMILY</c> and the report share.
/// Pure functions of their arguments.
/// </summary>
public static class FamilyWords
{
    /// <summary>
    /// For a family in one parameter: "holds for n = 0..5, fails for n = 6..10" from the <c>families</c> view's
    /// <c>holds_for</c> and <c>fails_for</c> (clauses joined by "; " when a list has several runs), and how many instances
    /// are neither. For a family in several parameters (whose ranges the view leaves null): "holds for 6 of 16 instances,
    /// fails for 10", and for a family in two integer parameters whose <paramref name="members"/> are given, the failing
    /// instances row by row: "fails for 10 (m = 0 with r = 0; m = 1 with r = 0..1)". "no instance decided yet" when none
    /// was refuted or survived.
    /// </summary>
    public static string Describe(IReadOnlyList<string> parameters, string? holdsFor, string? failsFor, long instances, long survived, long refuted, long other,
        IReadOnlyList<(IReadOnlyList<string> Values, bool Refuted)>? members = null)
    {
        ArgumentNullException.ThrowIfNull(parameters);
        var clauses = new List<string>();
        if (parameters.Count == 1 && (holdsFor is not null || failsFor is not null))
        {
            var name = parameters[0];
            if (holdsFor is not null) clauses.Add($"holds for {name} = {holdsFor}");
            if (failsFor is not null) clauses.Add($"fails for {name} = {failsFor}");
        }
        else if (survived + refuted > 0)
        {
            if (survived > 0) clauses.Add($"holds for {Count(survived)} of {Count(instances)} instance{Plural(instances)}");
            var rows = members is null ? null : FailingByRow(parameters, members);
            if (refuted > 0)
                clauses.Add((survived > 0 ? $"fails for {Count(refuted)}" : $"fails for {Count(refuted)} of {Count(instances)} instance{Plural(instances)}") +
                    (rows is null ? "" : $" ({rows})"));
        }
        var separator = clauses.Any(c => c.Contains(',', StringComparison.Ordinal)) ? "; " : ", ";
        if (other > 0) clauses.Add($"{Count(other)} other{Plural(other)} (undecided, invalid, failed or not yet screened)");
        if (clauses.Count == 0) return "no instance decided yet";
        return string.Join(separator, clauses);
    }

    /// <summary>Failing rows listed at most by <see cref="FailingByRow"/>.</summary>
    public const int MaxFailingRows = 12;

    /// <summary>
    /// For a family in two integer parameters: its refuted instances row by row, as runs of the second parameter's values
    /// per value of the first, "m = 0 with r = 0; m = 1 with r = 0..1, 3" (at most <see cref="MaxFailingRows"/> rows, then
    /// "…"); null for other families or when none is refuted.
    /// </summary>
    public static string? FailingByRow(IReadOnlyList<string> parameters, IReadOnlyList<(IReadOnlyList<string> Values, bool Refuted)> members)
    {
        ArgumentNullException.ThrowIfNull(parameters);
        ArgumentNullException.ThrowIfNull(members);
        if (parameters.Count != 2) return null;
        var points = new List<(long Row, long Column)>();
        foreach (var (values, refuted) in members)
        {
            if (values.Count != 2 || !long.TryParse(values[0], NumberStyles.AllowLeadingSign, CultureInfo.InvariantCulture, out var row)
                || !long.TryParse(values[1], NumberStyles.AllowLeadingSign, CultureInfo.InvariantCulture, out var column))
                return null;
            if (refuted) points.Add((row, column));
        }
        if (points.Count == 0) return null;
        var rows = points.GroupBy(p => p.Row).OrderBy(g => g.Key)
            .Select(g => $"{parameters[0]} = {g.Key.ToString(CultureInfo.InvariantCulture)} with {parameters[1]} = {Runs([.. g.Select(p => p.Column)])}")
            .ToList();
        return rows.Count <= MaxFailingRows ? string.Join("; ", rows) : string.Join("; ", rows.Take(MaxFailingRows)) + "; …";
    }

    /// <summary>Integers as runs, the way the <c>families</c> view writes its ranges: <c>0..2, 4, 6..7</c>.</summary>
    public static string Runs(IReadOnlyList<long> values)
    {
        ArgumentNullException.ThrowIfNull(values);
        var sorted = values.Distinct().Order().ToList();
        var runs = new List<string>();
        for (var i = 0; i < sorted.Count;)
        {
            var j = i;
            while (j + 1 < sorted.Count && sorted[j + 1] == sorted[j] + 1) j++;
            runs.Add(j == i ? sorted[i].ToString(CultureInfo.InvariantCulture)
                : $"{sorted[i].ToString(CultureInfo.InvariantCulture)}..{sorted[j].ToString(CultureInfo.InvariantCulture)}");
            i = j + 1;
        }
        return string.Join(", ", runs);
    }

    /// <summary>The values of a params JSON object as text, in order (<c>{"m":2,"r":3}</c> → 2, 3); empty for anything else.</summary>
    public static IReadOnlyList<string> ParameterValues(string? json)
    {
        if (string.IsNullOrWhiteSpace(json)) return [];
        try
        {
            using var document = JsonDocument.Parse(json);
            if (document.RootElement.ValueKind != JsonValueKind.Object) return [];
            return [.. document.RootElement.EnumerateObject().Select(p => p.Value.ValueKind == JsonValueKind.String ? p.Value.GetString() ?? "" : p.Value.GetRawText())];
        }
        catch (JsonException)
        {
            return [];
        }
    }

    /// <summary>"at n=6: fails: lhs = 31, rhs = 32" (the counterexample in <see cref="StoredCounterexample.Describe"/>'s words), or "at n=6 (no counterexample found)".</summary>
    public static string FirstFailure(string? parameters, StoredCounterexample? counterexample)
    {
        var at = Screening.HandOff.HandOffCandidate.FormatParams(parameters);
        var where = at.Length == 0 ? "" : $"at {at}";
        if (counterexample is null) return where.Length == 0 ? "no counterexample found" : $"{where} (no counterexample found)";
        return where.Length == 0 ? counterexample.Describe() : $"{where}: {counterexample.Describe()}";
    }

    /// <summary>The keys of a params JSON object, in order; empty for anything else.</summary>
    public static IReadOnlyList<string> ParameterNames(string? json)
    {
        if (string.IsNullOrWhiteSpace(json)) return [];
        try
        {
            using var document = JsonDocument.Parse(json);
            return document.RootElement.ValueKind == JsonValueKind.Object ? [.. document.RootElement.EnumerateObject().Select(p => p.Name)] : [];
        }
        catch (JsonException)
        {
            return [];
        }
    }

    private static string Count(long n) => n.ToString("N0", CultureInfo.InvariantCulture);

    private static string Plural(long n) => n == 1 ? "" : "s";
}

/// <summary>Reads families by label for <c>idq show</c>, every value a parameter. Uses the connection it is given.</summary>
public sealed class FamilyReads(StoreConnection store)
{
    /// <summary>
    /// The refuted instances of each family at its least position (the first in parameter order, as the <c>families</c>
    /// view's <c>first_refuted</c>; one pass over the refuted instances, grouped), with their counterexample and
    /// difference; several only when positions tie, so the caller orders by <c>c.id</c> and keeps the first per family.
    /// Portable SQL; the caller adds a condition on <c>k</c> (the catalogue) or <c>c</c> (the candidate) and its parameters.
    /// </summary>
    public const string FirstFailuresQuery = $"""
        SELECT k.name AS catalogue, c.family, c.id, c.label, c.params,
               {RefutationDetailSql.Columns}
        FROM candidate c
        JOIN catalogue k ON k.id = c.catalogue_id
        JOIN result r ON r.candidate_id = c.id
        JOIN (SELECT f.catalogue_id, f.family, MIN(COALESCE(f.position, -1)) AS first_position
              FROM candidate f JOIN result fr ON fr.candidate_id = f.id
              WHERE f.family IS NOT NULL AND fr.state = '{ResultStates.Refuted}'
              GROUP BY f.catalogue_id, f.family) m
          ON m.catalogue_id = c.catalogue_id AND m.family = c.family AND m.first_position = COALESCE(c.position, -1)
        {RefutationDetailSql.Joins}
        WHERE c.family IS NOT NULL AND r.state = '{ResultStates.Refuted}'
        """;

    /// <summary>A row of <see cref="FirstFailuresQuery"/> as the catalogue, the family and its first failure.</summary>
    internal static (string Catalogue, string Family, FirstFailure Failure) ReadFirstFailure(ReadRow r) =>
        (r.Text("catalogue"), r.Text("family"), new FirstFailure(r.Long("id"), r.Text("label"), r.NullableText("params"),
            RefutationDetailSql.Counterexample(r),
            RefutationDetailSql.Difference(r)));

    /// <summary>Every family with this label (one per catalogue that has it), by catalogue name; empty when none.</summary>
    public IReadOnlyList<FamilyDetail> Find(string family)
    {
        var rows = ReadSql.Rows(store, """
            SELECT f.catalogue, f.catalogue_id, f.family, f.instances, f.survived, f.refuted, f.other, f.holds_for, f.fails_for
            FROM families f WHERE f.family = @family ORDER BY f.catalogue
            """, [("@family", family)], r => (Catalogue: r.Text("catalogue"), CatalogueId: r.Long("catalogue_id"), Family: r.Text("family"),
            Instances: r.Long("instances"), Survived: r.Long("survived"), Refuted: r.Long("refuted"), Other: r.Long("other"),
            HoldsFor: r.NullableText("holds_for"), FailsFor: r.NullableText("fails_for")));
        var details = new List<FamilyDetail>();
        foreach (var f in rows)
        {
            var members = ReadSql.Rows(store, $"""
                SELECT c.id, c.label, c.params, COALESCE(r.state, '{ResultStates.Pending}') AS state
                FROM candidate c LEFT JOIN result r ON r.candidate_id = c.id
                WHERE c.catalogue_id = @catalogue AND c.family = @family
                ORDER BY c.position, c.id
                """, [("@catalogue", f.CatalogueId), ("@family", f.Family)],
                r => new FamilyMember(r.Long("id"), r.Text("label"), r.NullableText("params"), ResultStates.Parse(r.Text("state"))));
            var first = ReadSql.Rows(store, FirstFailuresQuery + " AND c.catalogue_id = @catalogue AND c.family = @family ORDER BY c.id",
                [("@catalogue", f.CatalogueId), ("@family", f.Family)], ReadFirstFailure).Select(x => x.Failure).FirstOrDefault();
            details.Add(new FamilyDetail(f.Catalogue, f.Family, f.Instances, f.Survived, f.Refuted, f.Other, f.HoldsFor, f.FailsFor, members, first));
        }
        return details;
    }
}
