namespace IdentityQueue.Algebra.Syntax;

/// <summary>
/// Parses catalogue text (SPEC §3): <c>[label:] LHS = RHS [over FIELD] [for NAME in A..B {, NAME in A..B}]</c>.
/// Stateless and thread-safe. Bad input never throws: it gives a failed <see cref="Result{T}"/> whose
/// <see cref="Diagnostic"/> has a 1-based line and column (columns count the chars of the given text) and a message
/// from <see cref="SyntaxMessages"/>. The limits of <see cref="Limits"/> are checked before the work they bound:
/// a line longer than <see cref="Limits.MaxLineLength"/> is refused before it is read, and nesting deeper than
/// <see cref="Limits.MaxNestingDepth"/> is refused when it is reached. Every tree returned has height at most
/// MaxNestingDepth, so recursive walks of it are safe.
/// </summary>
public static class CatalogueParser
{
    /// <summary>
    /// One line of a catalogue file. A blank or comment-only line gives a successful result with a null value.
    /// The entry's <see cref="IdentityEntry.Text"/> is <paramref name="text"/> and its line is <paramref name="lineNumber"/>.
    /// </summary>
    /// <remarks>
    /// With <paramref name="definitions"/> (the scope of one file, fed its lines in order) a line <c>let NAME(P1, …) = BODY</c>
    /// adds a definition and gives a successful null result, and every later line may use it: uses are written out into the
    /// entry's tree, so the entry holds no trace of them. Without a scope a <c>let</c> line is an error.
    /// </remarks>
    public static Result<IdentityEntry?> ParseLine(string text, int lineNumber, Limits? limits = null, DefinitionScope? definitions = null)
    {
        ArgumentNullException.ThrowIfNull(text);
        limits ??= Limits.Default;
        if (text.Length > limits.MaxLineLength)
            return Result<IdentityEntry?>.Fail(new SourcePosition(lineNumber, 1), SyntaxMessages.LineTooLong(text.Length, limits.MaxLineLength));

        var first = SkipSpaces(text, 0);
        if (first == text.Length || text[first] == '#') return Result<IdentityEntry?>.Ok(null);

        var (label, start, labelError) = FindLabel(text, first);
        if (labelError) return Result<IdentityEntry?>.Fail(new SourcePosition(lineNumber, first + 1), SyntaxMessages.EmptyLabel);

        if (label is null && IsDefinition(text, first))
        {
            if (definitions is null) return Result<IdentityEntry?>.Fail(new SourcePosition(lineNumber, first + 1), SyntaxMessages.DefinitionOutsideFile);
            var definer = new Parser(text, first, lineNumber, limits, definitions);
            var definition = definer.ParseDefinition();
            if (definition is null) return Result<IdentityEntry?>.Fail(definer.Error!);
            definitions.Add(definition);
            return Result<IdentityEntry?>.Ok(null);
        }

        var parser = new Parser(text, start, lineNumber, limits, definitions);
        var entry = parser.ParseIdentity(label);
        return entry is null ? Result<IdentityEntry?>.Fail(parser.Error!) : Result<IdentityEntry?>.Ok(entry);
    }

    /// <summary>One identity, as for <c>idq check "LHS = RHS"</c>: like <see cref="ParseLine"/> at line 1, but a blank text is an error.</summary>
    /// <remarks>With <paramref name="definitions"/> the identity may use them (a <c>let</c> text itself is then an error: no identity).</remarks>
    public static Result<IdentityEntry> ParseIdentity(string text, Limits? limits = null, DefinitionScope? definitions = null)
    {
        if (definitions is not null && IsDefinition(text, SkipSpaces(text, 0)))
            return Result<IdentityEntry>.Fail(new SourcePosition(1, 1), SyntaxMessages.ExpectedIdentity);
        var result = ParseLine(text, 1, limits, definitions);
        if (!result.Success) return Result<IdentityEntry>.Fail(result.Error!);
        if (result.Value is { } entry) return Result<IdentityEntry>.Ok(entry);
        return Result<IdentityEntry>.Fail(new SourcePosition(1, 1), SyntaxMessages.ExpectedIdentity);
    }

    /// <summary>A text that is exactly one expression (e.g. the <c>lhs</c> of a <c>.jsonl</c> entry); positions are on line 1.</summary>
    public static Result<Expr> ParseExpression(string text, Limits? limits = null)
    {
        ArgumentNullException.ThrowIfNull(text);
        limits ??= Limits.Default;
        if (text.Length > limits.MaxLineLength)
            return Result<Expr>.Fail(new SourcePosition(1, 1), SyntaxMessages.LineTooLong(text.Length, limits.MaxLineLength));
        var parser = new Parser(text, 0, 1, limits);
        var expr = parser.ParseStandaloneExpression();
        return expr is null ? Result<Expr>.Fail(parser.Error!) : Result<Expr>.Ok(expr);
    }

    /// <summary>A text that is exactly one field, <c>Q</c>, <c>GF(p)</c> or <c>GF(p^k)</c> (e.g. a <c>--over</c> option); positions are on line 1.</summary>
    public static Result<FieldSpec> ParseField(string text, Limits? limits = null)
    {
        ArgumentNullException.ThrowIfNull(text);
        limits ??= Limits.Default;
        if (text.Length > limits.MaxLineLength)
            return Result<FieldSpec>.Fail(new SourcePosition(1, 1), SyntaxMessages.LineTooLong(text.Length, limits.MaxLineLength));
        var parser = new Parser(text, 0, 1, limits);
        var field = parser.ParseStandaloneField();
        return field is null ? Result<FieldSpec>.Fail(parser.Error!) : Result<FieldSpec>.Ok(field);
    }

    /// <summary>
    /// A label is a run of letters, digits, '_', '-' and '.' at the start of the line, followed (after optional spaces)
    /// by ':'. Nothing else can start a line that way — the ':' of a bound form always follows a '(' — so the rule
    /// is exact. Returns the label (or null) and the index where the identity starts.
    /// </summary>
    internal static (string? Label, int Start, bool EmptyLabel) FindLabel(string text, int first)
    {
        var end = first;
        while (end < text.Length && CharClass.IsLabelChar(text[end])) end++;
        var colon = SkipSpaces(text, end);
        if (colon == text.Length || text[colon] != ':') return (null, first, false);
        if (end == first) return (null, first, true);
        return (text[first..end], colon + 1, false);
    }

    /// <summary>True when the line's first word is <c>let</c> followed by a name: a definition.</summary>
    public static bool IsDefinition(string text, int first)
    {
        const string word = Builtins.Let;
        if (string.CompareOrdinal(text, first, word, 0, word.Length) != 0) return false;
        var after = first + word.Length;
        if (after < text.Length && CharClass.IsIdentifierPart(text[after])) return false;
        var next = SkipSpaces(text, after);
        return next < text.Length && CharClass.IsIdentifierStart(text[next]);
    }

    private static int SkipSpaces(string text, int i)
    {
        while (i < text.Length && CharClass.IsSpace(text[i])) i++;
        return i;
    }
}
