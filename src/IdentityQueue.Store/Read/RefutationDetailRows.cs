using System.Globalization;
using System.Text.Json;

namespace IdentityQueue.Store.Read;

/// <summary>A stored smallest counterexample (a row of the <c>counterexamples</c> view). Immutable.</summary>
/// <param name="Point">A JSON object, variable → integer as text, in the variables' order.</param>
/// <param name="LhsValue">The left side's exact value there.</param>
/// <param name="RhsValue">The right side's exact value there.</param>
/// <param name="Entry">The differing entry of a matrix identity, or null.</param>
/// <param name="MaxAbs">The point's max-norm.</param>
/// <param name="Exhaustive">True when every point before it in the search order was tried.</param>
public sealed record StoredCounterexample(string Point, string LhsValue, string RhsValue, string? Entry, long MaxAbs, bool Exhaustive)
{
    /// <summary>The point as (variable, value) pairs in the stored order; empty when the text is not a JSON object.</summary>
    public IReadOnlyList<(string Variable, string Value)> Coordinates()
    {
        try
        {
            using var json = JsonDocument.Parse(Point);
            if (json.RootElement.ValueKind != JsonValueKind.Object) return [];
            return json.RootElement.EnumerateObject().Select(p => (p.Name, p.Value.ToString())).ToList();
        }
        catch (JsonException)
        {
            return [];
        }
    }

    /// <summary>"fails at a = 1, b = 0: lhs = 4, rhs = 2", with "at entry [2,1]" for a matrix identity.</summary>
    public string Describe() => Screening.Counterexamples.Counterexample.Describe(Coordinates(), LhsValue, RhsValue, Entry);

    /// <summary>How sure the smallness is: "the smallest (every point of smaller norm was tried)" or "small, not proved smallest".</summary>
    public string Smallness => Exhaustive
        ? "the least counterexample (every point before it, by max-norm then sum of absolute values, was tried)"
        : $"a small counterexample (max-norm {MaxAbs.ToString(CultureInfo.InvariantCulture)}; not every smaller point was tried)";
}

/// <summary>A stored recovered difference (a row of the <c>differences</c> view). Immutable.</summary>
public sealed record StoredDifference(string? Text, long? Terms, int? TotalDegree, bool TermsEstimated)
{
    /// <summary>"lhs - rhs = 2*x*y (1 term, total degree 2)", or what is known when it was too large to write out.</summary>
    public string Describe()
    {
        var degree = TotalDegree is { } d ? $"total degree {d.ToString(CultureInfo.InvariantCulture)}" : "total degree unknown";
        var terms = Terms is { } t ? $"{(TermsEstimated ? "at least " : "")}{t.ToString(CultureInfo.InvariantCulture)} term{(t == 1 ? "" : "s")}" : "terms unknown";
        return Text is null ? $"lhs - rhs: {terms}, {degree} (too large to write out)" : $"lhs - rhs = {Text} ({terms}, {degree})";
    }
}

/// <summary>Reads a refuted candidate's details, every value a parameter.</summary>
public static class RefutationDetailReads
{
    public static StoredCounterexample? Counterexample(StoreConnection store, long candidateId) =>
        ReadSql.Rows(store, """
            SELECT point, lhs_value, rhs_value, entry, max_abs, exhaustive FROM counterexamples WHERE candidate_id = @id
            """, [("@id", candidateId)], r => new StoredCounterexample(r.Text("point"), r.Text("lhs_value"), r.Text("rhs_value"),
            r.NullableText("entry"), r.Long("max_abs"), r.Long("exhaustive") != 0)).FirstOrDefault();

    public static StoredDifference? Difference(StoreConnection store, long candidateId) =>
        ReadSql.Rows(store, """
            SELECT difference, terms, total_degree, terms_estimated FROM differences WHERE candidate_id = @id
            """, [("@id", candidateId)], r => new StoredDifference(r.NullableText("difference"), r.NullableLong("terms"),
            r.NullableLong("total_degree") is { } d ? (int)d : null, r.Long("terms_estimated") != 0)).FirstOrDefault();
}

/// <summary>
/// The one way a read model brings a candidate's refutation details: the select columns (<c>x_*</c>, <c>d_*</c>), the
/// joins (the query must alias <c>candidate c</c> and <c>result r</c>) and the readers of a row. A member of an
/// equivalence group whose result is shared from its representative (<c>result.shared_from</c>) shows the
/// representative's details, unless its sides are swapped (then the values would read the other way round, and it shows none).
/// </summary>
internal static class RefutationDetailSql
{
    public const string Columns = """
        x.point AS x_point, x.lhs_value AS x_lhs, x.rhs_value AS x_rhs, x.entry AS x_entry, x.max_abs AS x_max_abs,
               x.exhaustive AS x_exhaustive,
               d.candidate_id AS d_id, d.difference AS d_difference, d.terms AS d_terms, d.total_degree AS d_total_degree,
               d.terms_estimated AS d_terms_estimated
        """;

    public const string Joins = """
        LEFT JOIN equivalence se ON se.candidate_id = c.id AND se.group_candidate_id = r.shared_from
        LEFT JOIN counterexamples x ON x.candidate_id = CASE WHEN se.swapped THEN c.id ELSE COALESCE(r.shared_from, c.id) END
        LEFT JOIN differences d ON d.candidate_id = CASE WHEN se.swapped THEN c.id ELSE COALESCE(r.shared_from, c.id) END
        """;

    public static StoredCounterexample? Counterexample(ReadRow r) =>
        r.NullableText("x_point") is { } point
            ? new StoredCounterexample(point, r.Text("x_lhs"), r.Text("x_rhs"), r.NullableText("x_entry"), r.Long("x_max_abs"), r.Long("x_exhaustive") != 0)
            : null;

    public static StoredDifference? Difference(ReadRow r) =>
        r.NullableLong("d_id") is null ? null
            : new StoredDifference(r.NullableText("d_difference"), r.NullableLong("d_terms"),
                r.NullableLong("d_total_degree") is { } degree ? (int)degree : null, r.Long("d_terms_estimated") != 0);
}
