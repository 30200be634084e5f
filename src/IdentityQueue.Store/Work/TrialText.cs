using System.Globalization;
using System.Numerics;
using System.Text;
using System.Text.Json;
using IdentityQueue.Screening;
using IdentityQueue.Store.Schema;

namespace IdentityQueue.Store.Work;

/// <summary>
/// The text forms of a trial's values in the <c>trial</c> table, and back: residues as decimal text, a coordinate list
/// (over an extension field) as a JSON array of decimal strings, the point as a JSON object in variable order. Stateless.
/// </summary>
internal static class TrialText
{
    public static string Outcome(TrialOutcome outcome) => outcome switch
    {
        TrialOutcome.Zero => TrialOutcomes.Zero,
        TrialOutcome.Nonzero => TrialOutcomes.Nonzero,
        _ => TrialOutcomes.Undefined,
    };

    public static TrialOutcome Outcome(string text) => text switch
    {
        TrialOutcomes.Zero => TrialOutcome.Zero,
        TrialOutcomes.Nonzero => TrialOutcome.Nonzero,
        TrialOutcomes.Undefined => TrialOutcome.Undefined,
        _ => throw new FormatException($"unknown trial outcome '{text}'"),
    };

    /// <summary>A prime-field residue (one coordinate) as decimal text; an extension-field element as a JSON array.</summary>
    public static string Residue(BigInteger[] coordinates, bool extension) =>
        !extension && coordinates.Length == 1 ? Decimal(coordinates[0]) : Array(coordinates);

    public static BigInteger[] Residue(string text) =>
        text.StartsWith('[') ? Array(text) : [BigInteger.Parse(text, NumberStyles.AllowLeadingSign, CultureInfo.InvariantCulture)];

    public static string Array(BigInteger[] values)
    {
        var text = new StringBuilder("[");
        for (var i = 0; i < values.Length; i++)
        {
            if (i > 0) text.Append(',');
            text.Append('"').Append(Decimal(values[i])).Append('"');
        }
        return text.Append(']').ToString();
    }

    public static BigInteger[] Array(string json)
    {
        using var document = JsonDocument.Parse(json);
        return document.RootElement.EnumerateArray().Select(Integer).ToArray();
    }

    public static string Point(IReadOnlyList<PointValue> point, bool extension)
    {
        using var stream = new MemoryStream();
        using (var w = new Utf8JsonWriter(stream))
        {
            w.WriteStartObject();
            foreach (var v in point)
            {
                if (!extension && v.Coordinates.Length == 1) w.WriteString(v.Name, Decimal(v.Coordinates[0]));
                else
                {
                    w.WriteStartArray(v.Name);
                    foreach (var c in v.Coordinates) w.WriteStringValue(Decimal(c));
                    w.WriteEndArray();
                }
            }
            w.WriteEndObject();
        }
        return Encoding.UTF8.GetString(stream.ToArray());
    }

    public static IReadOnlyList<PointValue> Point(string json)
    {
        using var document = JsonDocument.Parse(json);
        var values = new List<PointValue>();
        foreach (var property in document.RootElement.EnumerateObject())
        {
            var coordinates = property.Value.ValueKind == JsonValueKind.Array
                ? property.Value.EnumerateArray().Select(Integer).ToArray()
                : [Integer(property.Value)];
            values.Add(new PointValue(property.Name, coordinates));
        }
        return values;
    }

    public static string Decimal(BigInteger value) => value.ToString(CultureInfo.InvariantCulture);

    /// <summary>A JSON string of decimal digits or a JSON number, read exactly.</summary>
    public static BigInteger Integer(JsonElement element) =>
        BigInteger.Parse(element.ValueKind == JsonValueKind.String ? element.GetString()! : element.GetRawText(),
            NumberStyles.AllowLeadingSign, CultureInfo.InvariantCulture);
}
