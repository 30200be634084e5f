using CsvHelper;
using IdentityQueue.Algebra;

namespace IdentityQueue.Screening.Catalogues;

/// <summary>
/// The <c>.csv</c> format (SPEC §3): a header naming the columns — <c>label,lhs,rhs,over,for</c>, in any order, with
/// <c>identity</c> allowed instead of lhs and rhs; label, over and for may be left out — then one entry per row, with
/// <c>for</c> written like <c>n in 2..12</c>. Fields follow RFC 4180 (CsvHelper parses them), but a record must stay on
/// one line, so that a bad row is one rejection at a known line. Missing trailing fields count as empty. A column the
/// format does not know (a note, a source) is ignored, with one warning naming it, instead of failing every row.
/// </summary>
public sealed class CsvEntryReader(Limits limits) : IEntryReader
{
    private static readonly string[] Columns = ["label", "lhs", "rhs", "identity", "over", "for"];

    private static readonly CsvReaderOptions Options = new()
    {
        Separator = ',',
        HasHeader = false,
        TrimWhitespace = true,
        AllowLineBreaksInQuotes = false,
        MalformedData = CsvMalformedDataHandling.Throw,
    };

    private Dictionary<string, int>? _header;
    private int _headerColumns;
    private int _headerLine;
    private readonly List<string> _warnings = [];

    public IReadOnlyList<string> Warnings => _warnings;
    private string? _headerProblem;

    public Result<ReadEntry?> Read(string text, int line)
    {
        if (string.IsNullOrWhiteSpace(text)) return Skip;
        if (text.Count(c => c == '"') % 2 != 0)
            return _header is null && _headerProblem is null
                ? HeaderFailed(line, $"line {line}: the header has an unterminated quoted field")
                : Reject($"line {line}: an unterminated quoted field (a record must be on one line)");
        string[] fields;
        try
        {
            fields = Split(text);
        }
        catch (CsvFormatException e)
        {
            var reason = $"line {line}: not a valid CSV record: {e.Message.Split('\n')[0].Trim()}";
            return _header is null && _headerProblem is null ? HeaderFailed(line, reason) : Reject(reason);
        }
        if (_headerProblem is not null)
            return Reject($"line {line}: not read, because the header on line {_headerLine} is not valid: {_headerProblem}");
        if (_header is null) return ReadHeader(fields, line);
        if (fields.Length > _headerColumns)
            return Reject($"line {line}: {fields.Length} fields, but the header on line {_headerLine} names {_headerColumns}");
        string? Get(string column) =>
            _header.TryGetValue(column, out var i) && i < fields.Length && fields[i].Length > 0 ? fields[i] : null;
        return new FieldEntry(Get("label"), Get("lhs"), Get("rhs"), Get("identity"), Get("over"), null, Get("for")).Parse(line, limits);
    }

    private Result<ReadEntry?> ReadHeader(string[] fields, int line)
    {
        var header = new Dictionary<string, int>(StringComparer.Ordinal);
        var ignored = new List<string>();
        for (var i = 0; i < fields.Length; i++)
        {
            var name = fields[i].Trim().ToLowerInvariant();
            if (!Columns.Contains(name))
            {
                ignored.Add($"\"{fields[i]}\"");
                continue;
            }
            if (!header.TryAdd(name, i)) return HeaderFailed(line, $"line {line}: the column \"{name}\" is named twice in the header");
        }
        if (!header.ContainsKey("identity") && !(header.ContainsKey("lhs") && header.ContainsKey("rhs")))
            return HeaderFailed(line, $"line {line}: the header must name the columns lhs and rhs (or identity): label,lhs,rhs,over,for");
        if (ignored.Count > 0)
            _warnings.Add($"line {line}: the header's column{(ignored.Count == 1 ? "" : "s")} {string.Join(", ", ignored)} " +
                $"{(ignored.Count == 1 ? "is" : "are")} not one of {string.Join(", ", Columns)} and {(ignored.Count == 1 ? "is" : "are")} ignored in every row");
        _header = header;
        _headerColumns = fields.Length;
        _headerLine = line;
        return Skip;
    }

    private Result<ReadEntry?> HeaderFailed(int line, string reason)
    {
        _headerProblem = reason;
        _headerLine = line;
        return Reject(reason);
    }

    private static string[] Split(string text)
    {
        using var csv = CsvReader.FromText(text, Options);
        return csv.Read() ? csv.Current.ToArray() : [];
    }

    private static readonly Result<ReadEntry?> Skip = Result<ReadEntry?>.Ok(null);

    private static Result<ReadEntry?> Reject(string reason) => Result<ReadEntry?>.Fail(reason);
}
