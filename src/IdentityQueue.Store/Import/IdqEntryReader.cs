using IdentityQueue.Algebra;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Store.Import;

/// <summary>
/// The <c>.idq</c> text format: one catalogue line per line (SPEC §3). A <c>let</c> line defines a function for the lines
/// after it in this file (<see cref="DefinitionScope"/>); entries that use it are stored written out, so the stored sides
/// stand alone (the worker, <c>idq export</c> and hand-written SQL need no definitions).
/// </summary>
internal sealed class IdqEntryReader(Limits limits) : IEntryReader
{
    private readonly DefinitionScope _definitions = new();

    public LineResult Read(string text, int line)
    {
        var parsed = CatalogueParser.ParseLine(text, line, limits, _definitions);
        if (!parsed.Success) return LineResult.Reject(parsed.Error!.ToString());
        return parsed.Value is { } entry ? new LineResult(entry, null, null) : LineResult.Skip;
    }
}
