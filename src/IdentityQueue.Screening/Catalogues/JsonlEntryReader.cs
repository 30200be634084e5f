using System.Text.Json;
using IdentityQueue.Algebra;

namespace IdentityQueue.Screening.Catalogues;

/// <summary>
/// The <c>.jsonl</c> format (SPEC §3): one JSON object per line, <c>{"label": …, "lhs": …, "rhs": …, "over": "Q",
/// "for": {"n": [2, 12]}}</c>, or <c>"identity": "LHS = RHS"</c> instead of lhs and rhs. A range end is a JSON integer or a
/// string holding an expression in earlier parameters, and a null end makes the open-ended family <c>n &gt;= FROM</c>
/// (<c>"for": {"n": [1, null]}</c>); <c>"for"</c> may also be a string, <c>"n in 2..12"</c> or <c>"n &gt;= 1"</c>.
/// Blank lines are skipped; unknown keys are rejected, so a misspelt key is not silently ignored.
/// </summary>
public sealed class JsonlEntryReader(Limits limits) : IEntryReader
{
    private static readonly string[] Keys = ["label", "lhs", "rhs", "identity", "over", "for"];

    // Deep enough for any entry; deeper input is rejected by the JSON reader, not by the stack.
    private static readonly JsonDocumentOptions Options = new() { MaxDepth = 16 };

    public Result<ReadEntry?> Read(string text, int line)
    {
        if (string.IsNullOrWhiteSpace(text)) return Skip;
        JsonDocument document;
        try
        {
            document = JsonDocument.Parse(text, Options);
        }
        catch (JsonException e)
        {
            var message = e.Message;
            var cut = message.IndexOf(" LineNumber:", StringComparison.Ordinal);
            if (cut > 0) message = message[..cut];
            return Reject($"line {line}, byte {(e.BytePositionInLine ?? 0) + 1}: not valid JSON: {message}");
        }
        using (document)
        {
            var root = document.RootElement;
            if (root.ValueKind != JsonValueKind.Object)
                return Reject($"line {line}: expected a JSON object {{\"label\": …, \"lhs\": …, \"rhs\": …}}, found {Kind(root)}");
            var values = new Dictionary<string, JsonElement>(StringComparer.Ordinal);
            foreach (var property in root.EnumerateObject())
            {
                if (!Keys.Contains(property.Name))
                    return Reject($"line {line}: unknown key \"{property.Name}\" (the keys are {string.Join(", ", Keys)})");
                if (!values.TryAdd(property.Name, property.Value))
                    return Reject($"line {line}: the key \"{property.Name}\" is given twice");
            }
            string? error = null;
            var label = String(values, "label", line, ref error);
            var lhs = String(values, "lhs", line, ref error);
            var rhs = String(values, "rhs", line, ref error);
            var identity = String(values, "identity", line, ref error);
            var over = String(values, "over", line, ref error);
            if (error is not null) return Reject(error);
            List<(string, string, string?)>? ranges = null;
            string? forText = null;
            if (values.TryGetValue("for", out var @for))
            {
                switch (@for.ValueKind)
                {
                    case JsonValueKind.Null: break;
                    case JsonValueKind.String: forText = @for.GetString(); break;
                    case JsonValueKind.Object:
                        ranges = [];
                        foreach (var range in @for.EnumerateObject())
                        {
                            if (range.Value.ValueKind != JsonValueKind.Array || range.Value.GetArrayLength() != 2)
                                return Reject($"line {line}: \"for\": \"{range.Name}\" must be a range [FROM, TO], found {Kind(range.Value)}");
                            var from = End(range.Value[0]);
                            var open = range.Value[1].ValueKind == JsonValueKind.Null; // [FROM, null]: the open-ended NAME >= FROM
                            var to = open ? null : End(range.Value[1]);
                            if (from is null || (to is null && !open))
                                return Reject($"line {line}: \"for\": the ends of \"{range.Name}\" must be integers or expression strings (or null for no end: [1, null] is {range.Name} >= 1)");
                            ranges.Add((range.Name, from, to));
                        }
                        break;
                    default:
                        return Reject($"line {line}: \"for\" must be an object such as {{\"n\": [2, 12]}} or a string \"n in 2..12\", found {Kind(@for)}");
                }
            }
            return new FieldEntry(label, lhs, rhs, identity, over, ranges, forText).Parse(line, limits);
        }
    }

    private static string? String(Dictionary<string, JsonElement> values, string key, int line, ref string? error)
    {
        if (!values.TryGetValue(key, out var value) || value.ValueKind == JsonValueKind.Null) return null;
        if (value.ValueKind == JsonValueKind.String) return value.GetString();
        error ??= $"line {line}: \"{key}\" must be a string, found {Kind(value)}";
        return null;
    }

    private static string? End(JsonElement value) => value.ValueKind switch
    {
        JsonValueKind.Number => value.GetRawText(),
        JsonValueKind.String => value.GetString(),
        _ => null,
    };

    private static string Kind(JsonElement value) => value.ValueKind switch
    {
        JsonValueKind.Object => "an object",
        JsonValueKind.Array => "an array",
        JsonValueKind.String => "a string",
        JsonValueKind.Number => "a number",
        JsonValueKind.True or JsonValueKind.False => "a boolean",
        _ => "null",
    };

    private static readonly Result<ReadEntry?> Skip = Result<ReadEntry?>.Ok(null);

    private static Result<ReadEntry?> Reject(string reason) => Result<ReadEntry?>.Fail(reason);
}
