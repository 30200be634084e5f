using IdentityQueue.Algebra;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Screening.Catalogues;

/// <summary>
/// The fields of a structured entry (a <c>.jsonl</c> object or a <c>.csv</c> row), before they become a catalogue line; a
/// range with no end (<c>"n": [1, null]</c>) is the open-ended <c>n &gt;= 1</c>.
/// </summary>
public sealed record FieldEntry(string? Label, string? Lhs, string? Rhs, string? Identity, string? Over, IReadOnlyList<(string Name, string From, string? To)>? Ranges, string? For)
{
    /// <summary>
    /// Builds the catalogue line and parses it. A field may not carry what belongs to another (a '#' that would comment
    /// out the rest, a label that is not one, an 'over' or a range hidden inside a side), so each is checked against
    /// what the parser made of it.
    /// </summary>
    public Result<ReadEntry?> Parse(int line, Limits limits)
    {
        if (Identity is not null && (Lhs is not null || Rhs is not null))
            return Reject($"line {line}: give either \"identity\" or \"lhs\" and \"rhs\", not both");
        if (Identity is null && (Lhs is null || Rhs is null))
            return Reject($"line {line}: \"{(Lhs is null ? "lhs" : "rhs")}\" is missing (or give \"identity\": \"LHS = RHS\")");
        foreach (var (name, value) in Fields())
            if (value.Contains('#'))
                return Reject($"line {line}, column {value.IndexOf('#') + 1} of \"{name}\": '#' is not allowed here (it starts a comment)");
        var label = string.IsNullOrWhiteSpace(Label) ? null : Label.Trim();
        if (label is not null && !Identifiers.IsLabel(label))
            return Reject($"line {line}: the label \"{label}\" may contain only letters, digits, '_', '-' and '.'");

        var built = new EntryLine();
        if (label is not null) built.Field("label", label).Literal(": ");
        if (Identity is not null) built.Field("identity", Identity);
        else built.Field("lhs", Lhs!).Literal(" = ").Field("rhs", Rhs!);
        var over = string.IsNullOrWhiteSpace(Over) ? null : Over;
        if (over is not null) built.Literal(" over ").Field("over", over);
        if (Ranges is { Count: > 0 })
        {
            for (var i = 0; i < Ranges.Count; i++)
            {
                var (name, from, to) = Ranges[i];
                if (!Identifiers.IsIdentifier(name))
                    return Reject($"line {line}: \"{name}\" in \"for\" is not a parameter name");
                built.Literal(i == 0 ? " for " : ", ").Literal(name);
                if (to is null) built.Literal(" >= ").Field($"for.{name}", from);
                else built.Literal(" in ").Field($"for.{name}", from).Literal("..").Field($"for.{name}", to);
            }
        }
        else if (!string.IsNullOrWhiteSpace(For)) built.Literal(" for ").Field("for", For);

        var parsed = CatalogueParser.ParseLine(built.Text, line, limits);
        if (!parsed.Success) return Reject(SideError(line, limits) ?? built.Describe(parsed.Error));
        if (parsed.Value is not { } entry) return Reject($"line {line}: the entry is empty");
        if (entry.Label != label)
            return Reject($"line {line}: the {(Identity is null ? "\"lhs\"" : "\"identity\"")} field must not start with a label; use \"label\"");
        if (over is null && Identity is null && !entry.Field.IsRationals)
            return Reject($"line {line}: the field goes in \"over\", not inside \"rhs\"");
        if (Identity is null && Ranges is not { Count: > 0 } && string.IsNullOrWhiteSpace(For) && entry.IsFamily)
            return Reject($"line {line}: the ranges go in \"for\", not inside \"rhs\"");
        if (Ranges is { Count: > 0 } && (entry.Parameters.Count != Ranges.Count || entry.Parameters.Select(p => p.Name).Where((n, i) => n != Ranges[i].Name).Any()))
            return Reject($"line {line}: a range end in \"for\" must be one expression (it added or changed parameters)");
        return Result<ReadEntry?>.Ok(new ReadEntry(entry, built));
    }

    /// <summary>
    /// When the line does not parse and a side alone does not either, that side's own diagnostic: its columns (also those
    /// inside the message, "to close '(' at column 1") count in the field, not in the line built from the fields.
    /// </summary>
    private string? SideError(int line, Limits limits)
    {
        foreach (var (name, value) in new[] { ("lhs", Lhs), ("rhs", Rhs) })
        {
            if (value is null) continue;
            var side = CatalogueParser.ParseExpression(value, limits);
            if (!side.Success) return $"line {line}, column {side.Error!.Position.Column} of \"{name}\": {side.Error.Message}";
        }
        return null;
    }

    private IEnumerable<(string, string)> Fields()
    {
        if (Label is not null) yield return ("label", Label);
        if (Lhs is not null) yield return ("lhs", Lhs);
        if (Rhs is not null) yield return ("rhs", Rhs);
        if (Identity is not null) yield return ("identity", Identity);
        if (Over is not null) yield return ("over", Over);
        if (For is not null) yield return ("for", For);
        if (Ranges is not null)
            foreach (var (name, from, to) in Ranges)
            {
                yield return ($"for.{name}", from);
                if (to is not null) yield return ($"for.{name}", to);
            }
    }

    private static Result<ReadEntry?> Reject(string reason) => Result<ReadEntry?>.Fail(reason);
}
