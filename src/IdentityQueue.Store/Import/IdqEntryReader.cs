using IdentityQueue.Algebra;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Store.Import;

/// <summary>The <c>.idq</c> text format: one catalogue line per line (SPEC §3).</summary>
internal sealed class IdqEntryReader(Limits limits) : IEntryReader
{
    public LineResult Read(string text, int line)
    {
        var parsed = CatalogueParser.ParseLine(text, line, limits);
        if (!parsed.Success) return LineResult.Reject(parsed.Error!.ToString());
        return parsed.Value is { } entry ? new LineResult(entry, null, null) : LineResult.Skip;
    }
}
