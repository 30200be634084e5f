using System.Globalization;
using System.Numerics;
using System.Text;
using System.Text.Json;
using IdentityQueue.Algebra;

namespace IdentityQueue.Store.Work;

/// <summary><c>candidate.params</c>: a family instance's parameters as a JSON object of integers, <c>{"n":3,"k":1}</c>. Stateless.</summary>
public static class ParamsText
{
    /// <summary>The JSON object, with the parameters in the order given (the family line's order).</summary>
    public static string Write(IEnumerable<KeyValuePair<string, BigInteger>> parameters)
    {
        var text = new StringBuilder("{");
        var first = true;
        foreach (var (name, value) in parameters)
        {
            if (!first) text.Append(',');
            first = false;
            text.Append(JsonSerializer.Serialize(name)).Append(':').Append(value.ToString(CultureInfo.InvariantCulture));
        }
        return text.Append('}').ToString();
    }

    /// <summary>
    /// Reads a params object; each value an integer (a JSON number, or a string of decimal digits for hand-written rows),
    /// or says why the text is not such an object.
    /// </summary>
    public static Result<IReadOnlyDictionary<string, BigInteger>> Read(string json)
    {
        static Result<IReadOnlyDictionary<string, BigInteger>> Fail(string message) => Result<IReadOnlyDictionary<string, BigInteger>>.Fail(message);
        var result = new Dictionary<string, BigInteger>(StringComparer.Ordinal);
        try
        {
            using var document = JsonDocument.Parse(json);
            if (document.RootElement.ValueKind != JsonValueKind.Object) return Fail("params must be a JSON object such as {\"n\": 3}");
            foreach (var property in document.RootElement.EnumerateObject())
            {
                var value = property.Value;
                var digits = value.ValueKind switch
                {
                    JsonValueKind.Number => value.GetRawText(),
                    JsonValueKind.String => value.GetString()!,
                    _ => null,
                };
                if (digits is null || !BigInteger.TryParse(digits, NumberStyles.AllowLeadingSign, CultureInfo.InvariantCulture, out var integer))
                    return Fail($"the parameter '{property.Name}' in params must be an integer, not {value.GetRawText()}");
                if (!result.TryAdd(property.Name, integer)) return Fail($"the parameter '{property.Name}' is given twice in params");
            }
        }
        catch (JsonException e)
        {
            return Fail($"params is not valid JSON: {e.Message}");
        }
        return Result<IReadOnlyDictionary<string, BigInteger>>.Ok(result);
    }
}
