using System.Text;
using IdentityQueue.Algebra;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Screening.Catalogues;

/// <summary>
/// The catalogue line built from the fields of a <c>.jsonl</c> object or a <c>.csv</c> row, so that one parser checks
/// every format. It remembers where each field went, so a diagnostic can name the field and the column inside it.
/// </summary>
public sealed class EntryLine
{
    private readonly StringBuilder _text = new();
    private readonly List<(string Field, int Start, int Length)> _fields = [];

    public string Text => _text.ToString();

    public EntryLine Literal(string text)
    {
        _text.Append(text);
        return this;
    }

    public EntryLine Field(string field, string value)
    {
        _fields.Add((field, _text.Length, value.Length));
        _text.Append(value);
        return this;
    }

    /// <summary>
    /// "line 3, column 5 of "lhs": …": the column counted inside the field where the problem is. A position between fields
    /// (in the " = " or " over " this class wrote) is reported at the end of the field before it, where the text broke off.
    /// </summary>
    public string Describe(Diagnostic diagnostic)
    {
        var index = diagnostic.Position.Column - 1;
        (string Field, int Start, int Length)? owner = null;
        foreach (var f in _fields)
            if (f.Start <= index) owner = f;
        if (owner is not { } o) return diagnostic.ToString();
        var column = Math.Min(index - o.Start, o.Length) + 1;
        return $"line {diagnostic.Position.Line}, column {column} of \"{o.Field}\": {diagnostic.Message}";
    }
}

/// <summary>
/// An entry read from one line of a catalogue file, with the line built from a structured entry's fields (null for
/// <c>.idq</c>), so that a later diagnostic (a family's range, a field) names the field. Immutable.
/// </summary>
public sealed record ReadEntry(IdentityEntry Entry, EntryLine? Built)
{
    public string Describe(Diagnostic diagnostic) => Built?.Describe(diagnostic) ?? diagnostic.ToString();
}

/// <summary>
/// Turns the lines of one file, in order, into entries: <c>Ok(entry)</c>, <c>Ok(null)</c> for a line with none (blank,
/// comment, header, definition), or the line's rejection. One instance per file, as a format may keep state (a CSV
/// header, <c>let</c> definitions).
/// </summary>
public interface IEntryReader
{
    Result<ReadEntry?> Read(string text, int line);

    /// <summary>What the format accepted but the user should hear about, each once (an ignored CSV column).</summary>
    IReadOnlyList<string> Warnings => [];
}
