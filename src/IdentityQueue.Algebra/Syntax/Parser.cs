using System.Diagnostics.CodeAnalysis;
using System.Globalization;
using System.Numerics;
using System.Runtime.CompilerServices;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Syntax;

/// <summary>
/// Recursive-descent parser with precedence climbing for one catalogue line (SPEC §3). It never throws on bad
/// input: a failing method reports the first problem in <see cref="Error"/> and returns null, and every caller
/// passes the null up. Nesting is bounded by <see cref="Limits.MaxNestingDepth"/> twice over: the recursion
/// depth (parentheses, brackets, calls, unary minus, exponents) and the height of the tree built, so that no later
/// recursive walk of the tree can run out of stack. A flat chain <c>x+x-…+x</c> or <c>x*x/…*x</c> is read in a loop
/// into one n-ary node (<see cref="SumExpr"/>, <see cref="ProductExpr"/>) and counts one level, however long.
/// </summary>
internal sealed class Parser
{
    private readonly string _text;
    private readonly int _line;
    private readonly Limits _limits;
    private readonly int _maxDepth;
    private readonly Lexer _lexer;
    private readonly Dictionary<string, string>.AlternateLookup<ReadOnlySpan<char>> _names =
        new Dictionary<string, string>(StringComparer.Ordinal).GetAlternateLookup<ReadOnlySpan<char>>();
    private Token _token;
    private Token _previous;
    private bool _hasPrevious;

    // Definitions (let lines) of the file, written out where they are used; null where none may be used.
    private readonly DefinitionScope? _definitions;
    // The variables of the bound forms around the current token, innermost last: a definition's free name must not be one of them.
    private readonly List<string> _binders = [];
    // The free names of the definitions used on this line, with where they were used: none may be a family parameter.
    private List<(string Name, string Definition, Token At)>? _freeUses;
    // The name a let line is defining (a use of it in its own body is recursion), and the nodes written out so far on this line.
    private string? _defining;
    private List<string>? _definingParameters;
    private long _expandedNodes;

    public Parser(string text, int start, int line, Limits limits, DefinitionScope? definitions = null)
    {
        _text = text;
        _line = line;
        _limits = limits;
        _definitions = definitions;
        _maxDepth = limits.MaxNestingDepth;
        _lexer = new Lexer(text, start);
        _token = _lexer.Next();
    }

    /// <summary>The first problem found, once a parse method has returned null.</summary>
    public Diagnostic? Error { get; private set; }

    public bool AtEnd => _token.Kind == TokenKind.End;

    // ---------------------------------------------------------------- the line

    /// <summary><c>LHS = RHS [over FIELD] [for NAME in A..B {, NAME in A..B}]</c>, to the end of the line.</summary>
    public IdentityEntry? ParseIdentity(string? label)
    {
        if (label is not null && AtEnd) return Fail<IdentityEntry>(_token, SyntaxMessages.NothingAfterLabel(label));
        if (_token.Kind == TokenKind.Equals) return Fail<IdentityEntry>(_token, SyntaxMessages.EmptyLeftSide);

        var leftStart = _token.Start;
        var left = ParseExpression(0, out _);
        if (left is null) return null;
        if (_token.Kind != TokenKind.Equals)
            return Fail<IdentityEntry>(_token, FollowMessage(SyntaxMessages.MissingEquals(Describe(_token))));
        var leftSpan = Span(leftStart, _token.Start);
        Advance();

        var rightStart = _token.Start;
        var right = ParseExpression(0, out _);
        if (right is null) return null;
        var rightSpan = Span(rightStart, _token.Start);

        FieldSpec? field = null;
        List<ParameterRange>? parameters = null;
        (string Variable, int Order)? series = null;
        while (!AtEnd)
        {
            if (_token.IsWord(_text, "up"))
            {
                if (parameters is not null) return Fail<IdentityEntry>(_token, SyntaxMessages.SeriesAfterFor);
                if (series is not null) return Fail<IdentityEntry>(_token, SyntaxMessages.SecondSeries);
                series = ParseSeriesClause();
                if (series is null) return null;
            }
            else if (_token.IsWord(_text, "over"))
            {
                if (parameters is not null) return Fail<IdentityEntry>(_token, SyntaxMessages.OverAfterFor);
                if (field is not null) return Fail<IdentityEntry>(_token, SyntaxMessages.SecondOver);
                Advance();
                field = ParseField();
                if (field is null) return null;
            }
            else if (_token.IsWord(_text, "for"))
            {
                if (parameters is not null) return Fail<IdentityEntry>(_token, SyntaxMessages.SecondFor);
                Advance();
                parameters = ParseRanges();
                if (parameters is null) return null;
            }
            else if (parameters is not null)
            {
                return Fail<IdentityEntry>(_token, SyntaxMessages.AfterRange(parameters[^1].Name, Describe(_token)));
            }
            else if (field is not null || series is not null)
            {
                return Fail<IdentityEntry>(_token, SyntaxMessages.AfterField(Describe(_token)));
            }
            else if (_token.Kind == TokenKind.Equals)
            {
                return Fail<IdentityEntry>(_token, SyntaxMessages.SecondEquals);
            }
            else
            {
                return Fail<IdentityEntry>(_token, FollowMessage(SyntaxMessages.AfterRightSide(Describe(_token))));
            }
        }

        if (parameters is not null && _freeUses is not null)
            foreach (var (name, definition, at) in _freeUses)
                if (parameters.Any(p => p.Name == name))
                    return Fail<IdentityEntry>(at, SyntaxMessages.DefinitionNameCaptured(definition, name, $"the family parameter '{name}' of this line"));

        if (series is { } s) field = (field ?? FieldSpec.Rationals) with { SeriesVariable = s.Variable, SeriesOrder = s.Order };
        if (field?.CharacteristicParameter is { } p && parameters?.Any(r => r.Name == p) != true)
        {
            Error ??= new Diagnostic(field.ParameterPosition, SyntaxMessages.FieldParameterNotInFamily(p));
            return null;
        }
        return new IdentityEntry(label, left, right, field ?? FieldSpec.Rationals,
            parameters is null ? [] : parameters.ToArray(), _line, _text)
        { LeftSpan = leftSpan, RightSpan = rightSpan, UsesDefinitions = _expandedNodes > 0 };
    }

    /// <summary>The text from <paramref name="start"/> up to <paramref name="end"/>, without the spaces before the end.</summary>
    private TextSpan Span(int start, int end)
    {
        while (end > start && char.IsWhiteSpace(_text[end - 1])) end--;
        return new TextSpan(start, end - start);
    }

    /// <summary>
    /// <c>let NAME = BODY</c> or <c>let NAME(P1, …, Pk) = BODY</c>, to the end of the line; the current token is the word <c>let</c>.
    /// The body may use the definitions above it (written out here), not itself.
    /// </summary>
    public Definition? ParseDefinition()
    {
        Advance(); // let
        var nameToken = _token;
        if (nameToken.Kind != TokenKind.Name) return Fail<Definition>(nameToken, SyntaxMessages.ExpectedDefinitionName(Describe(nameToken)));
        var name = TextOf(nameToken);
        if (Builtins.Reserved.Contains(name)) return Fail<Definition>(nameToken, SyntaxMessages.ReservedAsDefinition(name));
        if (_definitions!.TryGet(name, out var earlier)) return Fail<Definition>(nameToken, SyntaxMessages.DefinedTwice(name, earlier.Line));
        Advance();

        var parameters = new List<string>();
        if (_token.Kind == TokenKind.LeftParen)
        {
            var open = _token;
            Advance();
            while (true)
            {
                var p = _token;
                if (p.Kind != TokenKind.Name) return Fail<Definition>(p, SyntaxMessages.ExpectedDefinitionParameter(name, Describe(p)));
                var pName = TextOf(p);
                if (Builtins.Reserved.Contains(pName)) return Fail<Definition>(p, SyntaxMessages.ReservedAsParameter(pName));
                if (_definitions.Contains(pName)) return Fail<Definition>(p, SyntaxMessages.DefinitionAsBinder(pName, "a parameter of a definition"));
                if (parameters.Contains(pName)) return Fail<Definition>(p, SyntaxMessages.DuplicateParameter(pName));
                parameters.Add(pName);
                Advance();
                if (_token.Kind == TokenKind.Comma) { Advance(); continue; }
                if (_token.Kind == TokenKind.RightParen) { Advance(); break; }
                return Fail<Definition>(_token, SyntaxMessages.ExpectedCommaOrClose(')', open.Column, $"the parameters of {name}", Describe(_token)));
            }
        }
        if (_token.Kind != TokenKind.Equals) return Fail<Definition>(_token, SyntaxMessages.ExpectedDefinitionEquals(name, Describe(_token)));
        Advance();
        if (!StartsExpression(_token)) return Fail<Definition>(_token, SyntaxMessages.ExpectedExpression(Describe(_previous), Describe(_token)));

        _defining = name;
        _definingParameters = parameters;
        var bodyStart = _token;
        var body = ParseExpression(0, out _);
        if (body is null) return null;
        if (!AtEnd) return Fail<Definition>(_token, FollowMessage(SyntaxMessages.AfterExpression(Describe(_token))));
        if (DefinitionExpander.Measure(body, _limits.MaxExpandedNodes).Nodes > _limits.MaxExpandedNodes)
            return Fail<Definition>(bodyStart, SyntaxMessages.ExpansionTooLarge(_limits.MaxExpandedNodes));

        var free = new HashSet<string>(StringComparer.Ordinal);
        DefinitionExpander.FreeNames(body, free);
        free.ExceptWith(parameters);
        return new Definition(name, parameters.ToArray(), body, _line, free);
    }

    /// <summary>A whole text that is one expression.</summary>
    public Expr? ParseStandaloneExpression()
    {
        var expr = ParseExpression(0, out _);
        if (expr is null) return null;
        if (!AtEnd) return Fail<Expr>(_token, FollowMessage(SyntaxMessages.AfterExpression(Describe(_token))));
        return expr;
    }

    /// <summary>A whole text that is one field, possibly with a series clause (<c>Q up to q^30</c>, as stored).</summary>
    public FieldSpec? ParseStandaloneField()
    {
        var field = ParseField();
        if (field is null) return null;
        if (_token.IsWord(_text, "up"))
        {
            var series = ParseSeriesClause();
            if (series is null) return null;
            field = field with { SeriesVariable = series.Value.Variable, SeriesOrder = series.Value.Order };
        }
        if (!AtEnd) return Fail<FieldSpec>(_token, SyntaxMessages.AfterField(Describe(_token), inIdentity: false));
        return field;
    }

    private List<ParameterRange>? ParseRanges()
    {
        var ranges = new List<ParameterRange>();
        var names = new HashSet<string>(StringComparer.Ordinal);
        while (true)
        {
            var nameToken = _token;
            if (nameToken.Kind != TokenKind.Name)
                return Fail<List<ParameterRange>>(nameToken, SyntaxMessages.ExpectedParameter(Describe(_previous), Describe(nameToken)));
            var name = TextOf(nameToken);
            if (Builtins.Reserved.Contains(name)) return Fail<List<ParameterRange>>(nameToken, SyntaxMessages.ReservedAsParameter(name));
            if (!names.Add(name)) return Fail<List<ParameterRange>>(nameToken, SyntaxMessages.DuplicateParameter(name));
            if (_definitions?.Contains(name) == true) return Fail<List<ParameterRange>>(nameToken, SyntaxMessages.DefinitionAsBinder(name, "a family parameter"));
            Advance();
            var primes = _token.IsWord(_text, "prime");
            if (primes) Advance();

            if (!ParseRange(name, 0, out var from, out var to, out _)) return null;
            ranges.Add(new ParameterRange(name, from, to, At(nameToken)) { PrimesOnly = primes });

            if (_token.Kind != TokenKind.Comma) return ranges;
            Advance();
        }
    }

    /// <summary><c>in A..B</c>, after the name has been read.</summary>
    private bool ParseRange(string name, int depth, [NotNullWhen(true)] out Expr? from, [NotNullWhen(true)] out Expr? to, out int height)
    {
        to = null;
        height = 0;
        from = null;
        if (!_token.IsWord(_text, "in")) return Report(_token, SyntaxMessages.ExpectedIn(name, Describe(_token)));
        Advance();
        from = ParseExpression(depth, out var fromHeight);
        if (from is null) return false;
        if (_token.Kind != TokenKind.DotDot) return Report(_token, SyntaxMessages.ExpectedRangeDots(Describe(_token)));
        Advance();
        to = ParseExpression(depth, out var toHeight);
        height = Math.Max(fromHeight, toHeight);
        return to is not null;
    }

    // ---------------------------------------------------------------- fields

    /// <summary><c>up to NAME^N</c>: a truncated power series identity in NAME, compared up to NAME^N (N a non-negative integer).</summary>
    private (string Variable, int Order)? ParseSeriesClause()
    {
        Advance(); // 'up'
        if (!_token.IsWord(_text, "to")) return FailValue(_token, SyntaxMessages.ExpectedSeriesClause(Describe(_token)));
        Advance();
        var nameToken = _token;
        if (nameToken.Kind != TokenKind.Name || Builtins.Reserved.Contains(TextOf(nameToken)))
            return FailValue(nameToken, SyntaxMessages.ExpectedSeriesClause(Describe(nameToken)));
        Advance();
        if (_token.Kind != TokenKind.Caret) return FailValue(_token, SyntaxMessages.ExpectedSeriesClause(Describe(_token)));
        Advance();
        var orderToken = _token;
        if (orderToken.Kind != TokenKind.Integer) return FailValue(orderToken, SyntaxMessages.ExpectedSeriesClause(Describe(orderToken)));
        Advance();
        var order = ParseInteger(orderToken);
        if (order > _limits.MaxSeriesOrder) return FailValue(orderToken, SyntaxMessages.SeriesTooLong(order, _limits.MaxSeriesOrder));
        return (TextOf(nameToken), (int)order);
    }

    private (string, int)? FailValue(Token at, string message)
    {
        Report(at, message);
        return null;
    }

    /// <summary><c>Q</c> | <c>GF(p)</c> | <c>GF(p^k)</c>; p must be prime, k ≥ 1, and the field within MaxFieldBits.</summary>
    private FieldSpec? ParseField()
    {
        var nameToken = _token;
        if (nameToken.Kind != TokenKind.Name)
            return Fail<FieldSpec>(nameToken, SyntaxMessages.ExpectedField(_hasPrevious ? Describe(_previous) : null, Describe(nameToken)));
        if (nameToken.IsWord(_text, "Q"))
        {
            Advance();
            return FieldSpec.Rationals;
        }
        if (!nameToken.IsWord(_text, "GF")) return Fail<FieldSpec>(nameToken, SyntaxMessages.UnknownField(TextOf(nameToken)));
        Advance();

        var open = _token;
        if (open.Kind != TokenKind.LeftParen) return Fail<FieldSpec>(open, SyntaxMessages.ExpectedFieldParenthesis(Describe(open)));
        Advance();
        var pToken = _token;
        if (pToken.Kind is not (TokenKind.Integer or TokenKind.Name)) return Fail<FieldSpec>(pToken, SyntaxMessages.ExpectedCharacteristic(Describe(pToken)));
        Advance();
        Token? kToken = null;
        if (_token.Kind == TokenKind.Caret)
        {
            Advance();
            if (_token.Kind != TokenKind.Integer) return Fail<FieldSpec>(_token, SyntaxMessages.ExpectedFieldExponent(Describe(_token)));
            kToken = _token;
            Advance();
        }
        if (_token.Kind != TokenKind.RightParen)
            return Fail<FieldSpec>(_token, SyntaxMessages.UnclosedParenthesis(open.Column, Describe(_token)));
        var close = _token;
        Advance();

        var fieldText = ShortText(nameToken.Start, close.End);
        var maxBits = _limits.MaxFieldBits;
        if (pToken.Kind == TokenKind.Name)
        {
            // GF(p) with p a family parameter: checked per instance (FieldSpec.Bind), and against the ranges after the line.
            var degree = 1;
            if (kToken is { } degreeToken && (degreeToken.Length > 4
                    || (degree = int.Parse(_text.AsSpan(degreeToken.Start, degreeToken.Length), NumberStyles.None, CultureInfo.InvariantCulture)) < 1))
                return Fail<FieldSpec>(degreeToken, SyntaxMessages.ZeroFieldExponent(fieldText));
            return FieldSpec.FiniteOfParameter(TextOf(pToken), degree, At(pToken));
        }
        // Check the size from the digit count before converting, so a huge p costs nothing: 10^(d-1) ≥ 2^(3.32(d-1)).
        if ((pToken.Length - 1) * 3.3219 > maxBits) return Fail<FieldSpec>(pToken, SyntaxMessages.FieldTooLarge(fieldText, maxBits));
        var p = ParseInteger(pToken);
        if (p.GetBitLength() > maxBits) return Fail<FieldSpec>(pToken, SyntaxMessages.FieldTooLarge(fieldText, maxBits));
        if (!Primality.IsPrime(p))
        {
            var (q, e) = AsPrimePower(p);
            return Fail<FieldSpec>(pToken, SyntaxMessages.NotPrime(fieldText, p, q, e));
        }
        var k = 1;
        if (kToken is { } kt)
        {
            if (kt.Length > 9) return Fail<FieldSpec>(kt, SyntaxMessages.FieldTooLarge(fieldText, maxBits));
            k = int.Parse(_text.AsSpan(kt.Start, kt.Length), NumberStyles.None, CultureInfo.InvariantCulture);
            if (k < 1) return Fail<FieldSpec>(kt, SyntaxMessages.ZeroFieldExponent(fieldText));
            if (BigInteger.Log(p, 2) * k > maxBits) return Fail<FieldSpec>(kt, SyntaxMessages.FieldTooLarge(fieldText, maxBits));
        }
        return FieldSpec.Finite(p, k);
    }

    /// <summary>(q, e) with n = q^e, q a prime below 2^16 and e ≥ 2; (null, 0) otherwise. Only used to word a message.</summary>
    private static (BigInteger?, int) AsPrimePower(BigInteger n)
    {
        if (n < 4) return (null, 0);
        for (var q = 2; q < 1 << 16; q++)
        {
            if (!(n % q).IsZero) continue;
            var e = 0;
            var rest = n;
            while ((rest % q).IsZero)
            {
                rest /= q;
                e++;
            }
            return rest.IsOne && e >= 2 ? (q, e) : (null, 0);
        }
        return (null, 0);
    }

    // ---------------------------------------------------------------- expressions

    /// <summary>
    /// expr := term {('+'|'-') term}; a chain of two or more terms is one <see cref="SumExpr"/>, read in a loop, and counts
    /// one level of nesting whatever its length.
    /// </summary>
    private Expr? ParseExpression(int depth, out int height)
    {
        var first = ParseTerm(depth, out height);
        if (first is null) return null;
        if (_token.Kind is not (TokenKind.Plus or TokenKind.Minus)) return first;
        var terms = new List<SumTerm> { new(first, false, first.Position) };
        var firstOperator = _token;
        while (_token.Kind is TokenKind.Plus or TokenKind.Minus)
        {
            var op = _token;
            Advance();
            var term = ParseTerm(depth, out var termHeight);
            if (term is null) return null;
            height = Math.Max(height, termHeight);
            terms.Add(new SumTerm(term, op.Kind == TokenKind.Minus, At(op)));
        }
        if (++height > _maxDepth) return Fail<Expr>(firstOperator, SyntaxMessages.NestingTooDeep(_maxDepth));
        return new SumExpr(terms.ToArray(), first.Position);
    }

    /// <summary>term := unary {('*'|'/') unary}; a chain of two or more factors is one <see cref="ProductExpr"/>, one level of nesting.</summary>
    private Expr? ParseTerm(int depth, out int height)
    {
        var first = ParseUnary(depth, out height);
        if (first is null) return null;
        if (_token.Kind is not (TokenKind.Star or TokenKind.Slash)) return first;
        var factors = new List<ProductFactor> { new(first, false, first.Position) };
        var firstOperator = _token;
        while (_token.Kind is TokenKind.Star or TokenKind.Slash)
        {
            var op = _token;
            Advance();
            var factor = ParseUnary(depth, out var factorHeight);
            if (factor is null) return null;
            height = Math.Max(height, factorHeight);
            factors.Add(new ProductFactor(factor, op.Kind == TokenKind.Slash, At(op)));
        }
        if (++height > _maxDepth) return Fail<Expr>(firstOperator, SyntaxMessages.NestingTooDeep(_maxDepth));
        return new ProductExpr(factors.ToArray(), first.Position);
    }

    /// <summary>unary := ('-'|'+') unary | power. Unary minus binds looser than '^': <c>-x^2</c> is <c>-(x^2)</c>.</summary>
    private Expr? ParseUnary(int depth, out int height)
    {
        height = 0;
        if (!RuntimeHelpers.TryEnsureSufficientExecutionStack()) return Fail<Expr>(_token, SyntaxMessages.StackExhausted(_maxDepth));
        var op = _token;
        if (op.Kind is not (TokenKind.Minus or TokenKind.Plus)) return ParsePower(depth, out height);

        if (depth + 1 > _maxDepth) return Fail<Expr>(op, SyntaxMessages.NestingTooDeep(_maxDepth));
        Advance();
        var operand = ParseUnary(depth + 1, out height);
        if (operand is null) return null;
        if (op.Kind == TokenKind.Plus) return operand;
        height++;
        if (height > _maxDepth) return Fail<Expr>(op, SyntaxMessages.NestingTooDeep(_maxDepth));
        return new UnaryExpr(UnaryOperator.Negate, operand, At(op));
    }

    /// <summary>power := primary ['^' unary] — right-associative, and the exponent may start with a sign (<c>2^-1</c>).</summary>
    private Expr? ParsePower(int depth, out int height)
    {
        var baseExpr = ParsePrimary(depth, out height);
        if (baseExpr is null) return null;
        if (_token.Kind != TokenKind.Caret) return baseExpr;

        var caret = _token;
        if (depth + 1 > _maxDepth) return Fail<Expr>(caret, SyntaxMessages.NestingTooDeep(_maxDepth));
        Advance();
        if (!StartsExpression(_token)) return Fail<Expr>(_token, SyntaxMessages.EmptyExponent(Describe(_token)));
        var exponent = ParseUnary(depth + 1, out var exponentHeight);
        if (exponent is null) return null;
        height = Math.Max(height, exponentHeight) + 1;
        if (height > _maxDepth) return Fail<Expr>(caret, SyntaxMessages.NestingTooDeep(_maxDepth));
        return new BinaryExpr(BinaryOperator.Power, baseExpr, exponent, baseExpr.Position, At(caret));
    }

    /// <summary>
    /// primary ['[' i ',' j ']']: an entry of a matrix expression, <c>(A*B)[i, j]</c>, after a parenthesis, a call or a
    /// matrix literal (after a plain name the brackets make an indexed variable, <c>x[i]</c>).
    /// </summary>
    private Expr? ParsePrimary(int depth, out int height)
    {
        var start = _token;
        var primary = ParseAtom(depth, out height);
        if (primary is null || _token.Kind != TokenKind.LeftBracket || primary is NameRef or IndexedName || start.Kind == TokenKind.Integer)
            return primary;
        var indices = new List<Expr>(2);
        if (!ParseList(TokenKind.RightBracket, "the entry's index list", depth, indices, out var indexHeight,
                static (after, found) => SyntaxMessages.ExpectedIndex(after, found), allowEmpty: false))
            return null;
        if (indices.Count != 2) return Fail<Expr>(start, SyntaxMessages.WrongArity("an entry [i, j] of a matrix", 2, indices.Count) .Replace("takes", "needs").Replace("argument", "index"));
        height = Math.Max(height, indexHeight) + 1;
        if (height > _maxDepth) return Fail<Expr>(start, SyntaxMessages.NestingTooDeep(_maxDepth));
        return new CallExpr(Builtins.Entry, [primary, indices[0], indices[1]], primary.Position);
    }

    private Expr? ParseAtom(int depth, out int height)
    {
        height = 0;
        var token = _token;
        switch (token.Kind)
        {
            case TokenKind.Integer:
                Advance();
                return new IntegerLiteral(ParseInteger(token), At(token));
            case TokenKind.Name:
                return ParseName(depth, out height);
            case TokenKind.LeftParen:
            {
                if (depth + 1 > _maxDepth) return Fail<Expr>(token, SyntaxMessages.NestingTooDeep(_maxDepth));
                Advance();
                if (_token.Kind == TokenKind.RightParen) return Fail<Expr>(_token, SyntaxMessages.EmptyParentheses);
                var inner = ParseExpression(depth + 1, out height);
                if (inner is null) return null;
                if (_token.Kind != TokenKind.RightParen)
                    return Fail<Expr>(_token, FollowMessage(SyntaxMessages.UnclosedParenthesis(token.Column, Describe(_token))));
                Advance();
                return inner;
            }
            case TokenKind.LeftBracket:
                return ParseMatrixLiteral(depth, out height);
            default:
                return Fail<Expr>(token, SyntaxMessages.ExpectedExpression(_hasPrevious ? Describe(_previous) : null, Describe(token)));
        }
    }

    /// <summary>A name, an indexed name, a call of a built-in function, or a bound form.</summary>
    private Expr? ParseName(int depth, out int height)
    {
        height = 0;
        var nameToken = _token;
        var name = TextOf(nameToken);
        if (Builtins.Reserved.Contains(name) && !Builtins.Arity.ContainsKey(name)
            && name is not (Builtins.Sum or Builtins.Prod or Builtins.Matrix))
        {
            // 'over', 'for', 'in' where an operand should be.
            return Fail<Expr>(nameToken, SyntaxMessages.ExpectedExpression(_hasPrevious ? Describe(_previous) : null, Describe(nameToken)));
        }
        Advance();
        var isCall = _token.Kind == TokenKind.LeftParen;

        switch (name)
        {
            case Builtins.Sum:
            case Builtins.Prod:
                return isCall
                    ? ParseBound(name == Builtins.Sum ? BoundKind.Sum : BoundKind.Product, nameToken, depth, out height)
                    : Fail<Expr>(nameToken, SyntaxMessages.BoundFormAsVariable(name));
            case Builtins.Matrix:
                return isCall
                    ? ParseMatrixComprehension(nameToken, depth, out height)
                    : Fail<Expr>(nameToken, SyntaxMessages.BoundFormAsVariable(name));
        }
        if (Builtins.Arity.TryGetValue(name, out var arity))
        {
            return isCall
                ? ParseCall(name, arity, nameToken, depth, out height)
                : Fail<Expr>(nameToken, SyntaxMessages.FunctionAsVariable(name));
        }
        if (_definitions is not null && _definitions.TryGet(name, out var definition))
            return ParseUse(definition, nameToken, isCall, depth, out height);
        if (name == _defining && isCall) return Fail<Expr>(nameToken, SyntaxMessages.RecursiveDefinition(name));
        if (isCall) return Fail<Expr>(nameToken, SyntaxMessages.UnknownFunction(name));
        if (_token.Kind == TokenKind.LeftBracket) return ParseIndexed(name, nameToken, depth, out height);
        return new NameRef(name, At(nameToken));
    }

    /// <summary>
    /// A use of a definition, written out: <c>NAME</c> for one without parameters, <c>NAME(A1, …, Ak)</c> otherwise. Its free names
    /// (the identity's variables) must not be captured by a bound form around the use or by a family parameter of the line.
    /// </summary>
    private Expr? ParseUse(Definition definition, Token nameToken, bool isCall, int depth, out int height)
    {
        height = 0;
        var name = definition.Name;
        var arguments = new List<Expr>();
        if (definition.Parameters.Count == 0)
        {
            if (isCall) return Fail<Expr>(nameToken, SyntaxMessages.DefinitionArity(name, 0, definition.Line, -1));
            if (_token.Kind == TokenKind.LeftBracket) return Fail<Expr>(_token, SyntaxMessages.DefinitionIndexed(name, definition.Line));
        }
        else
        {
            if (!isCall) return Fail<Expr>(nameToken, SyntaxMessages.DefinitionArity(name, definition.Parameters.Count, definition.Line, -1));
            if (!ParseList(TokenKind.RightParen, $"the argument list of {name}(...)", depth, arguments, out _,
                    static (after, found) => SyntaxMessages.ExpectedArgument(after, found), allowEmpty: true))
                return null;
            if (arguments.Count != definition.Parameters.Count)
                return Fail<Expr>(nameToken, SyntaxMessages.DefinitionArity(name, definition.Parameters.Count, definition.Line, arguments.Count));
        }
        foreach (var free in definition.FreeNames)
        {
            if (_binders.Contains(free))
                return Fail<Expr>(nameToken, SyntaxMessages.DefinitionNameCaptured(name, free, $"the bound variable '{free}' of a sum, prod or matrix around this use"));
            if (_definingParameters?.Contains(free) == true)
                return Fail<Expr>(nameToken, SyntaxMessages.DefinitionNameCaptured(name, free, $"the parameter '{free}' of the definition of '{_defining}'"));
            (_freeUses ??= []).Add((free, name, nameToken));
        }
        var expanded = DefinitionExpander.Expand(definition, arguments, out var error);
        if (expanded is null) return Fail<Expr>(nameToken, error!);
        var limit = _limits.MaxExpandedNodes;
        var (nodes, treeHeight) = DefinitionExpander.Measure(expanded, limit - _expandedNodes);
        _expandedNodes += nodes;
        if (_expandedNodes > limit) return Fail<Expr>(nameToken, SyntaxMessages.ExpansionTooLarge(limit));
        if (depth + treeHeight > _maxDepth) return Fail<Expr>(nameToken, SyntaxMessages.NestingTooDeep(_maxDepth));
        height = treeHeight;
        return expanded;
    }

    private Expr? ParseCall(string name, (int Min, int Max) arity, Token nameToken, int depth, out int height)
    {
        var arguments = new List<Expr>(Math.Min(arity.Min, 8));
        if (!ParseList(TokenKind.RightParen, $"the argument list of {name}(...)", depth, arguments, out height,
                static (after, found) => SyntaxMessages.ExpectedArgument(after, found), allowEmpty: true,
                firstIsCondition: Builtins.TakesCondition(name), function: name))
            return null;
        if (arguments.Count < arity.Min || arguments.Count > arity.Max)
            return Fail<Expr>(nameToken, SyntaxMessages.WrongArity(name, arity.Min, arity.Max, arguments.Count));
        height++;
        if (height > _maxDepth) return Fail<Expr>(nameToken, SyntaxMessages.NestingTooDeep(_maxDepth));
        return new CallExpr(name, arguments.ToArray(), At(nameToken));
    }

    private Expr? ParseIndexed(string name, Token nameToken, int depth, out int height)
    {
        var indices = new List<Expr>(2);
        if (!ParseList(TokenKind.RightBracket, $"the index list of '{name}'", depth, indices, out height,
                static (after, found) => SyntaxMessages.ExpectedIndex(after, found), allowEmpty: false))
            return null;
        height++;
        if (height > _maxDepth) return Fail<Expr>(nameToken, SyntaxMessages.NestingTooDeep(_maxDepth));
        return new IndexedName(name, indices.ToArray(), At(nameToken));
    }

    /// <summary>
    /// The current token opens a list; reads <c>item {',' item}</c> and the closing token into <paramref name="items"/>;
    /// <paramref name="height"/> is the largest item height.
    /// </summary>
    private bool ParseList(TokenKind close, string what, int depth, List<Expr> items, out int height,
        Func<string, string, string> expectedItem, bool allowEmpty, bool firstIsCondition = false, string? function = null)
    {
        height = 0;
        var open = _token;
        if (depth + 1 > _maxDepth) return Report(open, SyntaxMessages.NestingTooDeep(_maxDepth));
        Advance();
        if (allowEmpty && _token.Kind == close)
        {
            Advance();
            return true;
        }
        while (true)
        {
            Expr? item;
            int itemHeight;
            if (function is not null && Builtins.TakesIndexList(function, items.Count))
                item = ParseIndexList(function, items.Count + 1, depth + 1, out itemHeight);
            else
            {
                if (!StartsExpression(_token)) return Report(_token, expectedItem(Describe(_previous), Describe(_token)));
                item = firstIsCondition && items.Count == 0
                    ? ParseCondition(depth + 1, out itemHeight)
                    : ParseExpression(depth + 1, out itemHeight);
            }
            if (item is null) return false;
            items.Add(item);
            height = Math.Max(height, itemHeight);
            if (_token.Kind == TokenKind.Comma)
            {
                Advance();
                continue;
            }
            if (_token.Kind == close)
            {
                Advance();
                return true;
            }
            return Report(_token, FollowMessage(SyntaxMessages.ExpectedCommaOrClose(close == TokenKind.RightParen ? ')' : ']',
                open.Column, what, Describe(_token))));
        }
    }

    /// <summary>
    /// A condition (the first argument of iverson and when): comparisons <c>A op B</c>, op one of <c>&lt; &lt;= &gt; &gt;= = !=</c>,
    /// joined by <c>and</c> and <c>or</c>, <c>and</c> binding tighter (so every condition has a form without parentheses).
    /// </summary>
    private Expr? ParseCondition(int depth, out int height) => ParseConnective(Builtins.Or, depth, out height);

    private Expr? ParseConnective(string word, int depth, out int height)
    {
        var left = word == Builtins.Or ? ParseConnective(Builtins.And, depth, out height) : ParseComparison(depth, out height);
        if (left is null) return null;
        while (_token.IsWord(_text, word))
        {
            var opToken = _token;
            Advance();
            var right = word == Builtins.Or ? ParseConnective(Builtins.And, depth, out var rightHeight) : ParseComparison(depth, out rightHeight);
            if (right is null) return null;
            height = Math.Max(height, rightHeight) + 1;
            if (height > _maxDepth) return Fail<Expr>(opToken, SyntaxMessages.NestingTooDeep(_maxDepth));
            left = new BinaryExpr(word == Builtins.Or ? BinaryOperator.Or : BinaryOperator.And, left, right, left.Position, At(opToken));
        }
        return left;
    }

    private Expr? ParseComparison(int depth, out int height)
    {
        height = 0;
        if (!StartsExpression(_token)) return Fail<Expr>(_token, SyntaxMessages.ExpectedExpression(Describe(_previous), Describe(_token)));
        var left = ParseExpression(depth, out height);
        if (left is null) return null;
        var opToken = _token;
        BinaryOperator? op = opToken.Kind switch
        {
            TokenKind.Less => BinaryOperator.Less,
            TokenKind.LessEqual => BinaryOperator.LessOrEqual,
            TokenKind.Greater => BinaryOperator.Greater,
            TokenKind.GreaterEqual => BinaryOperator.GreaterOrEqual,
            TokenKind.Equals => BinaryOperator.Equal,
            TokenKind.NotEqual => BinaryOperator.NotEqual,
            _ => null,
        };
        if (op is null) return Fail<Expr>(opToken, SyntaxMessages.ExpectedComparison(Describe(opToken)));
        Advance();
        if (!StartsExpression(_token)) return Fail<Expr>(_token, SyntaxMessages.ExpectedExpression(Describe(opToken), Describe(_token)));
        var right = ParseExpression(depth, out var rightHeight);
        if (right is null) return null;
        height = Math.Max(height, rightHeight) + 1;
        if (height > _maxDepth) return Fail<Expr>(opToken, SyntaxMessages.NestingTooDeep(_maxDepth));
        return new BinaryExpr(op.Value, left, right, left.Position, At(opToken));
    }

    /// <summary>
    /// <c>[item {, item}]</c> or <c>[]</c>, item := EXPR ['..' EXPR]: the rows or columns of submatrix and minor, in the
    /// order given. A range A..B with B &lt; A is empty.
    /// </summary>
    private Expr? ParseIndexList(string function, int argument, int depth, out int height)
    {
        height = 0;
        var open = _token;
        if (open.Kind != TokenKind.LeftBracket) return Fail<Expr>(open, SyntaxMessages.ExpectedIndexList(function, argument, Describe(open)));
        if (depth + 1 > _maxDepth) return Fail<Expr>(open, SyntaxMessages.NestingTooDeep(_maxDepth));
        Advance();
        var items = new List<Expr>();
        if (_token.Kind == TokenKind.RightBracket)
        {
            Advance();
            return new CallExpr(Builtins.IndexList, [], At(open));
        }
        while (true)
        {
            if (!StartsExpression(_token)) return Fail<Expr>(_token, SyntaxMessages.ExpectedIndexListItem(Describe(_previous), Describe(_token)));
            var from = ParseExpression(depth + 1, out var fromHeight);
            if (from is null) return null;
            height = Math.Max(height, fromHeight);
            if (_token.Kind == TokenKind.DotDot)
            {
                Advance();
                if (!StartsExpression(_token)) return Fail<Expr>(_token, SyntaxMessages.ExpectedIndexListItem(Describe(_previous), Describe(_token)));
                var to = ParseExpression(depth + 1, out var toHeight);
                if (to is null) return null;
                height = Math.Max(height, toHeight);
                items.Add(new CallExpr(Builtins.Range, [from, to], from.Position));
            }
            else items.Add(from);
            if (_token.Kind == TokenKind.Comma) { Advance(); continue; }
            if (_token.Kind == TokenKind.RightBracket) { Advance(); break; }
            return Fail<Expr>(_token, FollowMessage(SyntaxMessages.ExpectedCommaOrClose(']', open.Column, $"the index list of {function}", Describe(_token))));
        }
        height += 2;
        return new CallExpr(Builtins.IndexList, items.ToArray(), At(open));
    }

    /// <summary><c>sum(k in A..B: E)</c> or <c>prod(k in A..B: E)</c>; the current token is the '('.</summary>
    private Expr? ParseBound(BoundKind kind, Token formToken, int depth, out int height)
    {
        height = 0;
        var form = TextOf(formToken);
        var open = _token;
        if (depth + 1 > _maxDepth) return Fail<Expr>(open, SyntaxMessages.NestingTooDeep(_maxDepth));
        Advance();
        var variable = ParseBoundVariable(form);
        if (variable is null) return null;
        if (!ParseRange(variable, depth + 1, out var from, out var to, out var rangeHeight)) return null;
        if (_token.Kind != TokenKind.Colon) return Fail<Expr>(_token, SyntaxMessages.ExpectedBodyColon(form, Describe(_token)));
        Advance();
        _binders.Add(variable);
        var body = ParseBody(form, open, depth, out var bodyHeight);
        _binders.RemoveAt(_binders.Count - 1);
        if (body is null) return null;

        height = Math.Max(rangeHeight, bodyHeight) + 1;
        if (height > _maxDepth) return Fail<Expr>(formToken, SyntaxMessages.NestingTooDeep(_maxDepth));
        return new BoundExpr(kind, variable, from, to, body, At(formToken));
    }

    /// <summary><c>matrix(i in A..B, j in C..D: E)</c>; the current token is the '('.</summary>
    private Expr? ParseMatrixComprehension(Token formToken, int depth, out int height)
    {
        height = 0;
        const string form = Builtins.Matrix;
        var open = _token;
        if (depth + 1 > _maxDepth) return Fail<Expr>(open, SyntaxMessages.NestingTooDeep(_maxDepth));
        Advance();
        var rowVariable = ParseBoundVariable(form);
        if (rowVariable is null) return null;
        if (!ParseRange(rowVariable, depth + 1, out var rowFrom, out var rowTo, out var rowHeight)) return null;
        if (_token.Kind != TokenKind.Comma) return Fail<Expr>(_token, SyntaxMessages.ExpectedColumnRange(Describe(_token)));
        Advance();
        var columnToken = _token;
        var columnVariable = ParseBoundVariable(form);
        if (columnVariable is null) return null;
        if (columnVariable == rowVariable) return Fail<Expr>(columnToken, SyntaxMessages.SameMatrixVariables(columnVariable));
        if (!ParseRange(columnVariable, depth + 1, out var columnFrom, out var columnTo, out var columnHeight)) return null;
        if (_token.Kind != TokenKind.Colon) return Fail<Expr>(_token, SyntaxMessages.ExpectedBodyColon(form, Describe(_token)));
        Advance();
        _binders.Add(rowVariable);
        _binders.Add(columnVariable);
        var body = ParseBody(form, open, depth, out var bodyHeight);
        _binders.RemoveRange(_binders.Count - 2, 2);
        if (body is null) return null;

        height = Math.Max(Math.Max(rowHeight, columnHeight), bodyHeight) + 1;
        if (height > _maxDepth) return Fail<Expr>(formToken, SyntaxMessages.NestingTooDeep(_maxDepth));
        return new MatrixComprehension(rowVariable, rowFrom, rowTo, columnVariable, columnFrom, columnTo, body, At(formToken));
    }

    private string? ParseBoundVariable(string form)
    {
        var token = _token;
        if (token.Kind != TokenKind.Name) return Fail<string>(token, SyntaxMessages.ExpectedBoundVariable(form, Describe(token)));
        var name = TextOf(token);
        if (Builtins.Reserved.Contains(name)) return Fail<string>(token, SyntaxMessages.ReservedAsBoundVariable(name));
        if (_definitions?.Contains(name) == true) return Fail<string>(token, SyntaxMessages.DefinitionAsBinder(name, "a bound variable"));
        Advance();
        return name;
    }

    /// <summary>The body after ':' and the closing ')' of a bound form.</summary>
    private Expr? ParseBody(string form, Token open, int depth, out int height)
    {
        height = 0;
        if (!StartsExpression(_token)) return Fail<Expr>(_token, SyntaxMessages.ExpectedBody(form, Describe(_token)));
        var body = ParseExpression(depth + 1, out height);
        if (body is null) return null;
        if (_token.Kind != TokenKind.RightParen)
            return Fail<Expr>(_token, FollowMessage(SyntaxMessages.UnclosedParenthesis(open.Column, Describe(_token))));
        Advance();
        return body;
    }

    /// <summary><c>[[a, b], [c, d]]</c>: one or more rows of equal length, each of one or more entries.</summary>
    private Expr? ParseMatrixLiteral(int depth, out int height)
    {
        height = 0;
        var open = _token;
        if (depth + 1 > _maxDepth) return Fail<Expr>(open, SyntaxMessages.NestingTooDeep(_maxDepth));
        Advance();
        if (_token.Kind == TokenKind.RightBracket) return Fail<Expr>(open, SyntaxMessages.EmptyMatrix);

        var maxOrder = _limits.MaxMatrixOrder;
        var rows = new List<IReadOnlyList<Expr>>();
        while (true)
        {
            var rowOpen = _token;
            if (rowOpen.Kind != TokenKind.LeftBracket) return Fail<Expr>(rowOpen, SyntaxMessages.ExpectedRow(rows.Count + 1, Describe(rowOpen)));
            if (rows.Count == maxOrder) return Fail<Expr>(rowOpen, SyntaxMessages.MatrixTooLarge("rows", maxOrder));
            var entries = new List<Expr>(rows.Count == 0 ? 4 : rows[0].Count);
            if (!ParseList(TokenKind.RightBracket, $"row {rows.Count + 1} of the matrix literal", depth + 1, entries, out var rowHeight,
                    static (after, found) => SyntaxMessages.ExpectedEntry(after, found), allowEmpty: false))
                return null;
            if (entries.Count > maxOrder) return Fail<Expr>(rowOpen, SyntaxMessages.MatrixTooLarge("columns", maxOrder));
            if (rows.Count > 0 && entries.Count != rows[0].Count)
                return Fail<Expr>(rowOpen, SyntaxMessages.RaggedRow(rows.Count + 1, entries.Count, rows[0].Count));
            rows.Add(entries.ToArray());
            height = Math.Max(height, rowHeight);

            if (_token.Kind == TokenKind.Comma)
            {
                Advance();
                continue;
            }
            if (_token.Kind == TokenKind.RightBracket)
            {
                Advance();
                break;
            }
            return Fail<Expr>(_token, _token.Kind == TokenKind.LeftBracket
                ? SyntaxMessages.MissingRowComma(rows.Count, Describe(_token))
                : SyntaxMessages.UnclosedBracket(open.Column, Describe(_token)));
        }

        height++;
        if (height > _maxDepth) return Fail<Expr>(open, SyntaxMessages.NestingTooDeep(_maxDepth));
        return new MatrixLiteral(rows.ToArray(), At(open));
    }

    // ---------------------------------------------------------------- helpers

    private void Advance()
    {
        _previous = _token;
        _hasPrevious = true;
        _token = _lexer.Next();
    }

    private static bool StartsExpression(Token token) => token.Kind is TokenKind.Integer or TokenKind.Name
        or TokenKind.LeftParen or TokenKind.LeftBracket or TokenKind.Minus or TokenKind.Plus;

    /// <summary>
    /// The message for a token that cannot follow a complete operand: two operands side by side are a missing operator,
    /// a stray closing bracket is unmatched, anything else gets <paramref name="otherwise"/>.
    /// </summary>
    private string FollowMessage(string otherwise)
    {
        if (_hasPrevious && _token.StartsOperand(_text)) return SyntaxMessages.MissingOperator(Describe(_previous), Describe(_token));
        return _token.Kind switch
        {
            TokenKind.Less or TokenKind.LessEqual or TokenKind.Greater or TokenKind.GreaterEqual or TokenKind.NotEqual =>
                SyntaxMessages.ComparisonOutsideCondition(Describe(_token)),
            TokenKind.RightParen => SyntaxMessages.UnmatchedParenthesis,
            TokenKind.RightBracket => SyntaxMessages.UnmatchedBracket,
            _ => otherwise,
        };
    }

    /// <summary>Records the first problem; a problem at an invalid token is always the lexer's own message.</summary>
    private bool Report(Token at, string message)
    {
        Error ??= new Diagnostic(At(at), at.Kind == TokenKind.Invalid && at.Message is not null ? at.Message : message);
        return false;
    }

    private T? Fail<T>(Token at, string message) where T : class
    {
        Report(at, message);
        return null;
    }

    private SourcePosition At(Token token) => new(_line, token.Column);

    /// <summary>
    /// The token's text, one string per distinct text in the line: an expanded polynomial names the same few variables
    /// hundreds of thousands of times, and a string per occurrence would be a fifth of its tree.
    /// </summary>
    private string TextOf(Token token)
    {
        var span = _text.AsSpan(token.Start, token.Length);
        if (_names.TryGetValue(span, out var name)) return name;
        name = span.ToString();
        _names[name] = name;
        return name;
    }

    private string Describe(Token token) =>
        token.Kind == TokenKind.End ? SyntaxMessages.EndOfLine : SyntaxMessages.Quote(_text.AsSpan(token.Start, token.Length));

    private string ShortText(int start, int end) =>
        end - start <= 60 ? _text[start..end] : string.Concat(_text.AsSpan(start, 50), "…", _text.AsSpan(end - 1, 1));

    private BigInteger ParseInteger(Token token)
    {
        var digits = _text.AsSpan(token.Start, token.Length);
        if (digits.Length <= 18)
        {
            ulong value = 0;
            foreach (var c in digits) value = value * 10 + (ulong)(c - '0');
            return value;
        }
        return BigInteger.Parse(digits, NumberStyles.None, CultureInfo.InvariantCulture);
    }
}
