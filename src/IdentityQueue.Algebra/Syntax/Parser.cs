namespace IdentityQueue.Algebra.Syntax;

/// <summary>
/// One catalogue line (SPEC §3): an identity line with its field and family header (<c>for NAME in A..B, …</c>), a
/// <c>let</c> line, or a whole text that is one expression or one field. The expressions are read by
/// <see cref="ExpressionParser"/>, the field clauses by <see cref="FieldParser"/>. It never throws on bad input: a failing
/// method reports the first problem in <see cref="Error"/> and returns null, and every caller passes the null up.
/// </summary>
internal sealed class Parser
{
    private readonly TokenCursor _c;
    private readonly Limits _limits;
    private readonly ExpressionParser _e;
    private readonly FieldParser _fields;

    public Parser(string text, int start, int line, Limits limits, DefinitionScope? definitions = null)
    {
        _c = new TokenCursor(text, start, line);
        _limits = limits;
        _e = new ExpressionParser(_c, limits, definitions);
        _fields = new FieldParser(_c, limits);
    }

    /// <summary>The first problem found, once a parse method has returned null.</summary>
    public Diagnostic? Error => _c.Error;

    public bool AtEnd => _c.AtEnd;

    /// <summary><c>LHS = RHS [over FIELD] [for NAME in A..B {, NAME in A..B}]</c>, to the end of the line.</summary>
    public IdentityEntry? ParseIdentity(string? label)
    {
        if (label is not null && _c.AtEnd) return _c.Fail<IdentityEntry>(_c.Current, SyntaxMessages.NothingAfterLabel(label));
        if (_c.Current.Kind == TokenKind.Equals) return _c.Fail<IdentityEntry>(_c.Current, SyntaxMessages.EmptyLeftSide);

        var leftStart = _c.Current.Start;
        var left = _e.ParseExpression(0, out _);
        if (left is null) return null;
        if (_c.Current.Kind != TokenKind.Equals)
            return _c.Fail<IdentityEntry>(_c.Current, _c.FollowMessage(SyntaxMessages.MissingEquals(_c.Describe(_c.Current))));
        var leftSpan = Span(leftStart, _c.Current.Start);
        _c.Advance();

        var rightStart = _c.Current.Start;
        var right = _e.ParseExpression(0, out _);
        if (right is null) return null;
        var rightSpan = Span(rightStart, _c.Current.Start);

        FieldSpec? field = null;
        List<ParameterRange>? parameters = null;
        (string Variable, int Order)? series = null;
        while (!_c.AtEnd)
        {
            if (_c.Current.IsWord(_c.Text, "up"))
            {
                if (parameters is not null) return _c.Fail<IdentityEntry>(_c.Current, SyntaxMessages.SeriesAfterFor);
                if (series is not null) return _c.Fail<IdentityEntry>(_c.Current, SyntaxMessages.SecondSeries);
                series = _fields.ParseSeriesClause();
                if (series is null) return null;
            }
            else if (_c.Current.IsWord(_c.Text, "over"))
            {
                if (parameters is not null) return _c.Fail<IdentityEntry>(_c.Current, SyntaxMessages.OverAfterFor);
                if (field is not null) return _c.Fail<IdentityEntry>(_c.Current, SyntaxMessages.SecondOver);
                _c.Advance();
                field = _fields.ParseField();
                if (field is null) return null;
            }
            else if (_c.Current.IsWord(_c.Text, "for"))
            {
                if (parameters is not null) return _c.Fail<IdentityEntry>(_c.Current, SyntaxMessages.SecondFor);
                _c.Advance();
                parameters = ParseRanges();
                if (parameters is null) return null;
            }
            else if (parameters is not null)
            {
                return _c.Fail<IdentityEntry>(_c.Current, SyntaxMessages.AfterRange(parameters[^1].Name, _c.Describe(_c.Current)));
            }
            else if (field is not null || series is not null)
            {
                return _c.Fail<IdentityEntry>(_c.Current, SyntaxMessages.AfterField(_c.Describe(_c.Current)));
            }
            else if (_c.Current.Kind == TokenKind.Equals)
            {
                return _c.Fail<IdentityEntry>(_c.Current, SyntaxMessages.SecondEquals);
            }
            else
            {
                return _c.Fail<IdentityEntry>(_c.Current, _c.FollowMessage(SyntaxMessages.AfterRightSide(_c.Describe(_c.Current))));
            }
        }

        if (parameters is not null && _e.FreeUses is not null)
            foreach (var (name, definition, at) in _e.FreeUses)
                if (parameters.Any(p => p.Name == name))
                    return _c.Fail<IdentityEntry>(at, SyntaxMessages.DefinitionNameCaptured(definition, name, $"the family parameter '{name}' of this line"));

        if (series is { } s) field = (field ?? FieldSpec.Rationals) with { SeriesVariable = s.Variable, SeriesOrder = s.Order };
        if (field?.CharacteristicParameter is { } p && parameters?.Any(r => r.Name == p) != true)
        {
            _c.Report(field.ParameterPosition, SyntaxMessages.FieldParameterNotInFamily(p));
            return null;
        }
        if (field?.CharacteristicParameter is { } q && parameters?.Any(r => r.Name == q && r.OpenEnded) == true)
        {
            _c.Report(field.ParameterPosition, SyntaxMessages.OpenParameterIsField(q));
            return null;
        }
        return new IdentityEntry(label, left, right, field ?? FieldSpec.Rationals,
            parameters is null ? [] : parameters.ToArray(), _c.Line, _c.Text)
        { LeftSpan = leftSpan, RightSpan = rightSpan, UsesDefinitions = _e.ExpandedNodes > 0 };
    }

    /// <summary>The text from <paramref name="start"/> up to <paramref name="end"/>, without the spaces before the end.</summary>
    private TextSpan Span(int start, int end)
    {
        while (end > start && char.IsWhiteSpace(_c.Text[end - 1])) end--;
        return new TextSpan(start, end - start);
    }

    /// <summary>
    /// <c>let NAME = BODY</c> or <c>let NAME(P1, …, Pk) = BODY</c>, to the end of the line; the current token is the word <c>let</c>.
    /// The body may use the definitions above it (written out here), not itself.
    /// </summary>
    public Definition? ParseDefinition()
    {
        _c.Advance(); // let
        var nameToken = _c.Current;
        if (nameToken.Kind != TokenKind.Name) return _c.Fail<Definition>(nameToken, SyntaxMessages.ExpectedDefinitionName(_c.Describe(nameToken)));
        var name = _c.TextOf(nameToken);
        if (Builtins.Reserved.Contains(name)) return _c.Fail<Definition>(nameToken, SyntaxMessages.ReservedAsDefinition(name));
        if (_e.Definitions!.TryGet(name, out var earlier)) return _c.Fail<Definition>(nameToken, SyntaxMessages.DefinedTwice(name, earlier.Line));
        _c.Advance();

        var parameters = new List<string>();
        if (_c.Current.Kind == TokenKind.LeftParen)
        {
            var open = _c.Current;
            _c.Advance();
            while (true)
            {
                var p = _c.Current;
                if (p.Kind != TokenKind.Name) return _c.Fail<Definition>(p, SyntaxMessages.ExpectedDefinitionParameter(name, _c.Describe(p)));
                var pName = _c.TextOf(p);
                if (Builtins.Reserved.Contains(pName)) return _c.Fail<Definition>(p, SyntaxMessages.ReservedAsParameter(pName));
                if (_e.Definitions.Contains(pName)) return _c.Fail<Definition>(p, SyntaxMessages.DefinitionAsBinder(pName, "a parameter of a definition"));
                if (parameters.Contains(pName)) return _c.Fail<Definition>(p, SyntaxMessages.DuplicateParameter(pName));
                parameters.Add(pName);
                _c.Advance();
                if (_c.Current.Kind == TokenKind.Comma) { _c.Advance(); continue; }
                if (_c.Current.Kind == TokenKind.RightParen) { _c.Advance(); break; }
                return _c.Fail<Definition>(_c.Current, SyntaxMessages.ExpectedCommaOrClose(')', open.Column, $"the parameters of {name}", _c.Describe(_c.Current)));
            }
        }
        if (_c.Current.Kind != TokenKind.Equals) return _c.Fail<Definition>(_c.Current, SyntaxMessages.ExpectedDefinitionEquals(name, _c.Describe(_c.Current)));
        _c.Advance();
        if (!TokenCursor.StartsExpression(_c.Current)) return _c.Fail<Definition>(_c.Current, SyntaxMessages.ExpectedExpression(_c.Describe(_c.Previous), _c.Describe(_c.Current)));

        _e.Defining = name;
        _e.DefiningParameters = parameters;
        var bodyStart = _c.Current;
        var body = _e.ParseExpression(0, out _);
        if (body is null) return null;
        if (!_c.AtEnd) return _c.Fail<Definition>(_c.Current, _c.FollowMessage(SyntaxMessages.AfterExpression(_c.Describe(_c.Current))));
        if (DefinitionExpander.Measure(body, _limits.MaxExpandedNodes).Nodes > _limits.MaxExpandedNodes)
            return _c.Fail<Definition>(bodyStart, SyntaxMessages.ExpansionTooLarge(_limits.MaxExpandedNodes));

        var free = new HashSet<string>(StringComparer.Ordinal);
        DefinitionExpander.FreeNames(body, free);
        free.ExceptWith(parameters);
        return new Definition(name, parameters.ToArray(), body, _c.Line, free);
    }

    /// <summary>A whole text that is one expression.</summary>
    public Expr? ParseStandaloneExpression()
    {
        var expr = _e.ParseExpression(0, out _);
        if (expr is null) return null;
        if (!_c.AtEnd) return _c.Fail<Expr>(_c.Current, _c.FollowMessage(SyntaxMessages.AfterExpression(_c.Describe(_c.Current))));
        return expr;
    }

    /// <summary>A whole text that is one field, possibly with a series clause (<c>Q up to q^30</c>, as stored).</summary>
    public FieldSpec? ParseStandaloneField()
    {
        var field = _fields.ParseField();
        if (field is null) return null;
        if (_c.Current.IsWord(_c.Text, "up"))
        {
            var series = _fields.ParseSeriesClause();
            if (series is null) return null;
            field = field with { SeriesVariable = series.Value.Variable, SeriesOrder = series.Value.Order };
        }
        if (!_c.AtEnd) return _c.Fail<FieldSpec>(_c.Current, SyntaxMessages.AfterField(_c.Describe(_c.Current), inIdentity: false));
        return field;
    }

    private List<ParameterRange>? ParseRanges()
    {
        var ranges = new List<ParameterRange>();
        var names = new HashSet<string>(StringComparer.Ordinal);
        while (true)
        {
            var nameToken = _c.Current;
            if (nameToken.Kind != TokenKind.Name)
                return _c.Fail<List<ParameterRange>>(nameToken, SyntaxMessages.ExpectedParameter(_c.Describe(_c.Previous), _c.Describe(nameToken)));
            var name = _c.TextOf(nameToken);
            if (Builtins.Reserved.Contains(name)) return _c.Fail<List<ParameterRange>>(nameToken, SyntaxMessages.ReservedAsParameter(name));
            if (!names.Add(name)) return _c.Fail<List<ParameterRange>>(nameToken, SyntaxMessages.DuplicateParameter(name));
            if (_e.Definitions?.Contains(name) == true) return _c.Fail<List<ParameterRange>>(nameToken, SyntaxMessages.DefinitionAsBinder(name, "a family parameter"));
            _c.Advance();
            var primes = _c.Current.IsWord(_c.Text, "prime");
            if (primes) _c.Advance();

            if (_c.Current.Kind == TokenKind.GreaterEqual)
            {
                // An open-ended parameter, 'n >= A': alone in its line, and not a prime-only one.
                var atLeast = _c.Current;
                if (primes) return _c.Fail<List<ParameterRange>>(atLeast, SyntaxMessages.OpenParameterPrime(name));
                if (ranges.Count > 0) return _c.Fail<List<ParameterRange>>(nameToken, SyntaxMessages.OpenParameterNotAlone(name));
                _c.Advance();
                var start = _e.ParseExpression(0, out _);
                if (start is null) return null;
                ranges.Add(new ParameterRange(name, start, start, _c.At(nameToken)) { OpenEnded = true });
                if (_c.Current.Kind == TokenKind.Comma) return _c.Fail<List<ParameterRange>>(_c.Current, SyntaxMessages.OpenParameterNotAlone(name));
                return ranges;
            }
            if (ranges.Count > 0 && ranges[0].OpenEnded) return _c.Fail<List<ParameterRange>>(nameToken, SyntaxMessages.OpenParameterNotAlone(ranges[0].Name));
            if (!_e.ParseRange(name, 0, out var from, out var to, out _)) return null;
            ranges.Add(new ParameterRange(name, from, to, _c.At(nameToken)) { PrimesOnly = primes });

            if (_c.Current.Kind != TokenKind.Comma) return ranges;
            _c.Advance();
        }
    }
}
