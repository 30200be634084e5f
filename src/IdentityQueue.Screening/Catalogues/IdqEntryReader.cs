using IdentityQueue.Algebra;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Screening.Catalogues;

/// <summary>
/// The <c>.idq</c> text format: one catalogue line per line (SPEC §3). A <c>let</c> line defines a function for the lines
/// after it in this file (<see cref="DefinitionScope"/>); entries that use it are stored written out, so the stored sides
/// stand alone (the worker, <c>idq export</c> and hand-written SQL need no definitions).
/// </summary>
public sealed class IdqEntryReader(Limits limits) : IEntryReader
{
    private readonly DefinitionScope _definitions = new();

    public Result<ReadEntry?> Read(string text, int line)
    {
        var parsed = CatalogueParser.ParseLine(text, line, limits, _definitions);
        if (!parsed.Success) return parsed.Cast<ReadEntry?>();
        return Result<ReadEntry?>.Ok(parsed.Value is { } entry ? new ReadEntry(entry, null) : null);
    }
}
