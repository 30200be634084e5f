using IdentityQueue.Store.Schema;

namespace IdentityQueue.Store.Read;

/// <summary>
/// One candidate as <c>idq export</c> writes it: the candidate, its result (null fields before it has a result row) and
/// its witness if refuted. The JSON columns (<see cref="ExportRows.JsonColumns"/>) hold JSON text. Immutable.
/// </summary>
public sealed record ExportRow(
    long Id,
    string Catalogue,
    string Label,
    string? Family,
    string? Params,
    string Lhs,
    string Rhs,
    string Field,
    ResultState? State,
    string? DegreeBound,
    double? ErrorBoundLog2,
    bool? Certified,
    string? Message,
    long Trials,
    string? WitnessModulus,
    string? WitnessPolynomial,
    string? WitnessPoint,
    string? WitnessDifference,
    string? WitnessEntry,
    double? HeightBoundLog2,
    long? TrialsZero)
{
    /// <summary>For a refuted candidate: the smallest counterexample found (a row of <c>counterexamples</c>), when one was.</summary>
    public StoredCounterexample? Counterexample { get; init; }

    /// <summary>For a refuted candidate: lhs − rhs recovered (a row of <c>differences</c>), when it was.</summary>
    public StoredDifference? Difference { get; init; }

    /// <summary>
    /// The values in the order of <see cref="ExportRows.Columns"/>: null, long, double or text (a state as its stored
    /// text, <see cref="Certified"/> as 1/0), as <c>idq sql</c> would give the same columns.
    /// </summary>
    public object?[] Values() =>
    [
        Id, Catalogue, Label, Family, Params, Lhs, Rhs, Field, State?.Text(), DegreeBound, ErrorBoundLog2,
        Certified is { } c ? (c ? 1L : 0L) : null, Message, Trials, WitnessModulus, WitnessPolynomial, WitnessPoint,
        WitnessDifference, WitnessEntry, HeightBoundLog2, TrialsZero,
        Counterexample?.Point, Counterexample?.LhsValue, Counterexample?.RhsValue, Counterexample?.Entry, Counterexample?.MaxAbs,
        Counterexample is { } x ? (x.Exhaustive ? 1L : 0L) : null, Counterexample?.Describe(),
        Difference?.Text, Difference?.Terms, Difference?.TotalDegree is { } d ? (long)d : null,
        Difference is { } e ? (e.TermsEstimated ? 1L : 0L) : null, Difference?.Describe(),
    ];
}

/// <summary>Reads the rows of <c>idq export</c>: portable SQL, the states a parameter each. Uses the connection it is given.</summary>
public sealed class ExportRows(StoreConnection store)
{
    /// <summary>The columns of an export, in order (the public names of SPEC's export formats).</summary>
    public static readonly IReadOnlyList<string> Columns =
    [
        "id", "catalogue", "label", "family", "params", "lhs", "rhs", "field", "state", "degree_bound", "error_bound_log2",
        "certified", "message", "trials", "witness_modulus", "witness_polynomial", "witness_point", "witness_difference",
        "witness_entry", "height_bound_log2", "trials_zero",
        // a refuted candidate's details (issue #15): the counterexamples and differences views' columns, and their words
        "counterexample_point", "counterexample_lhs", "counterexample_rhs", "counterexample_entry", "counterexample_max_abs",
        "counterexample_exhaustive", "counterexample_text", "difference", "difference_terms", "difference_total_degree",
        "difference_terms_estimated", "difference_text",
    ];

    /// <summary>Columns whose text is JSON (written as JSON, not as a string, in JSON lines).</summary>
    public static readonly IReadOnlySet<string> JsonColumns = new HashSet<string>(["params", "witness_polynomial", "witness_point", "counterexample_point"], StringComparer.Ordinal);

    /// <summary>One row per candidate: the candidate, its result and its witness (if refuted). Portable SQL.</summary>
    public const string Query = $"""
        SELECT c.id, k.name AS catalogue, c.label, c.family, c.params, c.lhs, c.rhs, c.field,
               r.state, r.degree_bound, r.error_bound_log2, r.certified, r.message,
               (SELECT count(*) FROM trial t WHERE t.candidate_id = c.id) AS trials,
               w.modulus AS witness_modulus, w.defining_polynomial AS witness_polynomial, w.point AS witness_point,
               w.difference AS witness_difference, w.entry AS witness_entry,
               r.height_bound_log2, r.trials_zero,
               {RefutationDetailSql.Columns}
        FROM candidate c
        JOIN catalogue k ON k.id = c.catalogue_id
        LEFT JOIN result r ON r.candidate_id = c.id
        LEFT JOIN trial w ON w.id = r.witness_trial_id
        {RefutationDetailSql.Joins}
        WHERE 1 = 1
        """;

    /// <summary>The candidates in the given states (all when none is given), by id.</summary>
    public IReadOnlyList<ExportRow> Read(IReadOnlyList<ResultState> states)
    {
        var (condition, parameters) = ReadSql.In("r.state", "s", [.. states.Select(s => s.Text())]);
        return ReadSql.Rows(store, Query + condition + " ORDER BY c.id", parameters, r => new ExportRow(
            r.Long("id"), r.Text("catalogue"), r.Text("label"), r.NullableText("family"), r.NullableText("params"), r.Text("lhs"), r.Text("rhs"),
            r.Text("field"), r.NullableText("state") is { } state ? ResultStates.Parse(state) : null, r.NullableText("degree_bound"),
            r.NullableDouble("error_bound_log2"), r.NullableLong("certified") is { } certified ? certified != 0 : null, r.NullableText("message"),
            r.Long("trials"), r.NullableText("witness_modulus"), r.NullableText("witness_polynomial"), r.NullableText("witness_point"),
            r.NullableText("witness_difference"), r.NullableText("witness_entry"), r.NullableDouble("height_bound_log2"), r.NullableLong("trials_zero"))
        {
            Counterexample = RefutationDetailSql.Counterexample(r),
            Difference = RefutationDetailSql.Difference(r),
        });
    }
}
