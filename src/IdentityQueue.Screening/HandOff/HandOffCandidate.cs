using System.Globalization;
using System.Text.Json;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Screening.HandOff;

/// <summary>
/// A screened candidate as handed off for proof: where it came from and its screening evidence, as the store holds them
/// (decimal text for the degree bound, the params JSON as stored). Immutable.
/// </summary>
public sealed record HandOffCandidate(
    long Id,
    string Label,
    string? Family,
    string? Params,
    string Lhs,
    string Rhs,
    string Field,
    string? State,
    string? DegreeBound,
    double? ErrorBoundLog2,
    long Trials)
{
    /// <summary>For a refuted candidate: where it fails, in words ("fails at a = 1, b = 0: lhs = 4, rhs = 2"), when a counterexample was found.</summary>
    public string? CounterexampleText { get; init; }

    /// <summary>For a refuted candidate: "lhs - rhs = 2*x*y (1 term, total degree 2)", when the difference was recovered (or estimated).</summary>
    public string? DifferenceText { get; init; }

    /// <summary>True when the candidate carries either refutation detail.</summary>
    public bool HasRefutationDetails => CounterexampleText is not null || DifferenceText is not null;

    /// <summary>
    /// The identity as one line of catalogue text in the printer's spelling, whatever the spacing it was written with
    /// (parameters fixed by <see cref="Params"/>).
    /// </summary>
    public string Identity => ExprPrinter.Line(ExprPrinter.Canonical(Lhs), ExprPrinter.Canonical(Rhs), Field);

    /// <summary>The error bound as the exponent of 2, rounded up to one decimal (never stronger than stored); null when none.</summary>
    public string? ErrorBoundExponent => ErrorBoundLog2 is { } e && double.IsFinite(e)
        ? (Math.Ceiling(e * 10) / 10).ToString("0.0", CultureInfo.InvariantCulture)
        : null;

    /// <summary>The params JSON as <c>n=3, k=1</c>; the text itself when it is not a JSON object.</summary>
    public string ParamsText => FormatParams(Params);

    /// <summary><c>{"n":3,"k":1}</c> → <c>n=3, k=1</c>, in the object's order; other text as it is; null → empty.</summary>
    public static string FormatParams(string? json)
    {
        if (string.IsNullOrWhiteSpace(json)) return "";
        try
        {
            using var document = JsonDocument.Parse(json);
            if (document.RootElement.ValueKind != JsonValueKind.Object) return json;
            return string.Join(", ", document.RootElement.EnumerateObject().Select(p =>
                $"{p.Name}={(p.Value.ValueKind == JsonValueKind.String ? p.Value.GetString() : p.Value.GetRawText())}"));
        }
        catch (JsonException)
        {
            return json;
        }
    }
}
