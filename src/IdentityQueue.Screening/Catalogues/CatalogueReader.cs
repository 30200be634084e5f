using System.Globalization;
using System.Numerics;
using System.Text;
using IdentityQueue.Algebra;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Screening.Catalogues;

/// <summary>One candidate of an entry: its label, its parameters in the entry's order, and its own field (GF(p) of a family parameter p), or null.</summary>
public sealed record CatalogueInstance(string Label, IReadOnlyList<KeyValuePair<string, BigInteger>> Parameters, string? Field)
{
    public bool Equals(CatalogueInstance? other) =>
        other is not null && Label == other.Label && Field == other.Field && Parameters.SequenceEqual(other.Parameters);

    public override int GetHashCode() => HashCode.Combine(Label, Field, Parameters.Count);
}

/// <summary>
/// The sides as stored: the text as written when the line uses no definition (with the columns where each starts in an
/// <c>.idq</c> line, so a screening-time message can point there), else the printed tree with its uses written out.
/// </summary>
public readonly record struct CatalogueSides(string Lhs, string Rhs, int? LhsColumn, int? RhsColumn)
{
    public static CatalogueSides Of(IdentityEntry entry, bool idqLine) =>
        !entry.UsesDefinitions && entry.LeftSpan is { } l && entry.RightSpan is { } r
            ? new CatalogueSides(l.Of(entry.Text), r.Of(entry.Text), idqLine ? l.Column : null, idqLine ? r.Column : null)
            : new CatalogueSides(ExprPrinter.Print(entry.Left), ExprPrinter.Print(entry.Right), null, null);
}

/// <summary>
/// An open-ended family (<c>for n &gt;= A</c>): its parameter, its first value A, and the open family budget it was read
/// with; the entry's instances are its first chunk.
/// </summary>
public sealed record OpenFamily(string Parameter, BigInteger First, OpenFamilyBudget Budget);

/// <summary>
/// What one catalogue entry gives: the label written in the file (or null), the family name (the entry's own label, or
/// <c>FILE:LINE</c>) for a family, the sides as stored, the field, and one instance per candidate (for an open-ended
/// family, the first chunk: <see cref="Open"/>).
/// </summary>
public sealed record CatalogueEntry(string? Label, string? Family, CatalogueSides Sides, string Field, IReadOnlyList<CatalogueInstance> Instances)
{
    public string Lhs => Sides.Lhs;

    public string Rhs => Sides.Rhs;

    /// <summary>The open-ended family's parameter and budget; null for a closed family or a plain entry.</summary>
    public OpenFamily? Open { get; init; }

    /// <summary>The label of instance <paramref name="parameters"/> of family <paramref name="family"/>: <c>FAMILY[n=3,k=1]</c>.</summary>
    public static string InstanceLabel(string family, IReadOnlyList<KeyValuePair<string, BigInteger>> parameters)
    {
        var label = new StringBuilder(family).Append('[');
        for (var i = 0; i < parameters.Count; i++)
        {
            if (i > 0) label.Append(',');
            label.Append(parameters[i].Key).Append('=').Append(parameters[i].Value.ToString(CultureInfo.InvariantCulture));
        }
        return label.Append(']').ToString();
    }

    public bool Equals(CatalogueEntry? other) =>
        other is not null && Label == other.Label && Family == other.Family && Sides == other.Sides
        && Field == other.Field && Instances.SequenceEqual(other.Instances) && Open == other.Open;

    public override int GetHashCode() => HashCode.Combine(Label, Sides, Field, Instances.Count);
}

/// <summary>
/// One physical line of a catalogue file: its number, its text as a rejection keeps it (cut to
/// <see cref="SourceLines.RawLimit"/>), and what it gives — <c>Ok(entry)</c>, <c>Ok(null)</c> for a line without one, or
/// the reason it is rejected.
/// </summary>
public readonly record struct CatalogueLine(int Number, string Raw, Result<CatalogueEntry?> Read);

/// <summary>
/// Reads a catalogue file (<c>.idq</c>, <c>.jsonl</c>, <c>.csv</c>, SPEC §3) into entries with positions: a pure function
/// of the bytes, upstream of any store. Each line is read on its own (<see cref="SourceLines"/>), parsed by the format's
/// <see cref="IEntryReader"/>, its family expanded (<see cref="FamilyExpander"/>) and its label checked for uniqueness in
/// the file; a bad line is that line's rejection and reading goes on. One instance per file; not thread-safe.
/// </summary>
public sealed class CatalogueReader
{
    public static readonly IReadOnlyList<string> Extensions = [".idq", ".jsonl", ".csv"];

    private readonly IEntryReader _reader;
    private readonly string _fileName;
    private readonly Limits _limits;
    private readonly OpenFamilyBudget _open;
    private readonly Dictionary<string, int> _labels = new(StringComparer.Ordinal); // a label given in the file → the line it is on

    /// <param name="limits">The limits every line is checked against.</param>
    /// <param name="path">The file's name decides the format (by extension) and the labels of unlabelled entries (<c>FILE:LINE</c>).</param>
    /// <param name="open">The open family budget of the file's open-ended families (default <see cref="OpenFamilyBudget.Default"/>).</param>
    public CatalogueReader(string path, Limits limits, OpenFamilyBudget? open = null)
    {
        _limits = limits;
        _open = open ?? OpenFamilyBudget.Default;
        _fileName = Path.GetFileName(path);
        _reader = Path.GetExtension(path).ToLowerInvariant() switch
        {
            ".jsonl" => new JsonlEntryReader(limits),
            ".csv" => new CsvEntryReader(limits),
            _ => new IdqEntryReader(limits),
        };
    }

    /// <summary>What the format accepted but the user should hear about, each once (an ignored CSV column); complete after reading.</summary>
    public IReadOnlyList<string> Warnings => _reader.Warnings;

    /// <summary>The file's lines in order, streamed: one line in memory at a time.</summary>
    public IEnumerable<CatalogueLine> Read(Stream stream)
    {
        foreach (var line in SourceLines.Read(stream, _limits.MaxLineLength))
        {
            if (line.Text is null)
            {
                yield return new CatalogueLine(line.Number, line.Raw, Result<CatalogueEntry?>.Fail($"line {line.Number}: {line.Problem}"));
                continue;
            }
            var read = Interpret(line);
            if (read.Success && read.Value?.Label is { } label && !_labels.TryAdd(label, line.Number))
                read = Result<CatalogueEntry?>.Fail(
                    $"line {line.Number}: the label '{label}' is already used on line {_labels[label]}; labels must be unique in a catalogue");
            yield return new CatalogueLine(line.Number, read.Success ? line.Text : SourceLines.Truncate(line.Text), read);
        }
    }

    private static readonly BigInteger OpenFamilyLimit = BigInteger.One << 62;

    /// <summary>An instance whose field GF(p) has a p that is not prime (or too large): the entry's rejection.</summary>
    private sealed class FieldBindingException(string message) : Exception(message);

    /// <summary>
    /// One line to its candidates, or the reason it is rejected; Ok(null) for a line with no entry. A failure in reading
    /// one line is that line's rejection (fatal errors such as running out of memory are not caught).
    /// </summary>
    private Result<CatalogueEntry?> Interpret(SourceLine line)
    {
        try
        {
            var read = _reader.Read(line.Text!, line.Number);
            if (!read.Success) return Result<CatalogueEntry?>.Fail(read.Error.ToString());
            if (read.Value is not { Entry: var entry } made) return Result<CatalogueEntry?>.Ok(null);
            var expansion = FamilyExpander.Expand(entry, _limits, _open.NextChunk(0));
            if (!expansion.Success) return Result<CatalogueEntry?>.Fail(made.Describe(expansion.Error!));
            var sides = CatalogueSides.Of(entry, made.Built is null);
            var field = entry.Field.ToString();
            var ownLabel = entry.Label ?? $"{_fileName}:{line.Number}";
            if (!entry.IsFamily)
                return Result<CatalogueEntry?>.Ok(new CatalogueEntry(entry.Label, null, sides, field, [new CatalogueInstance(ownLabel, [], null)]));
            var names = entry.Parameters.Select(p => p.Name).ToList();
            var instances = new List<CatalogueInstance>(expansion.Instances.Count);
            OpenFamily? open = null;
            if (entry.OpenParameter is { } parameter)
            {
                // Later chunks count on from here in the store's 64-bit integers.
                var first = expansion.Instances[0][parameter.Name];
                if (BigInteger.Abs(first) > OpenFamilyLimit)
                    return Result<CatalogueEntry?>.Fail(made.Describe(new Diagnostic(parameter.Position,
                        $"an open-ended family starts at most 2^62 away from 0; '{parameter.Name}' starts at {first}")));
                open = new OpenFamily(parameter.Name, first, _open);
            }
            foreach (var assignment in expansion.Instances)
            {
                var ordered = names.Select(n => new KeyValuePair<string, BigInteger>(n, assignment[n])).ToList();
                // GF(p) of a family parameter: each instance stores its own field; one that is not prime is refused here.
                string? own = null;
                if (entry.Field.CharacteristicParameter is not null)
                {
                    var bound = entry.Field.Bind(assignment, _limits.MaxFieldBits);
                    own = bound.Success ? bound.Value.ToString() : throw new FieldBindingException(made.Describe(bound.Error));
                }
                instances.Add(new CatalogueInstance(CatalogueEntry.InstanceLabel(ownLabel, ordered), ordered, own));
            }
            return Result<CatalogueEntry?>.Ok(new CatalogueEntry(entry.Label, ownLabel, sides, field, instances) { Open = open });
        }
        catch (FieldBindingException e)
        {
            return Result<CatalogueEntry?>.Fail(e.Message);
        }
        catch (Exception e) when (e is not OutOfMemoryException)
        {
            return Result<CatalogueEntry?>.Fail($"line {line.Number}: could not be imported: {e.GetType().Name}: {e.Message}");
        }
    }
}
