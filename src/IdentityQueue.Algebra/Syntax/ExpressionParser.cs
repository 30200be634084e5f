using System.Diagnostics.CodeAnalysis;
using System.Runtime.CompilerServices;

namespace IdentityQueue.Algebra.Syntax;

/// <summary>
/// Expressions (SPEC §3), by recursive descent in the order of <see cref="PrecedenceTable"/>: sums, products, unary signs,
/// powers, primaries (names, calls, uses of definitions, indexed names, entries), argument lists and the conditions of
/// iverson and when. Bound forms and matrix literals are read by <see cref="FormParser"/>. Nesting is bounded by
/// <see cref="Limits.MaxNestingDepth"/> twice over: the recursion depth (parentheses, brackets, calls, unary minus,
/// exponents) and the height of the tree built, so that no later recursive walk of the tree can run out of stack. A flat
/// chain <c>x+x-…+x</c> or <c>x*x/…*x</c> is read in a loop into one n-ary node (<see cref="SumExpr"/>,
/// <see cref="ProductExpr"/>) and counts one level, however long.
/// </summary>
internal sealed class ExpressionParser
{
    private readonly TokenCursor _c;
    private readonly Limits _limits;
    private readonly int _maxDepth;
    private readonly DefinitionScope? _definitions;
    private readonly FormParser _forms;
    private long _expandedNodes;

    /// <summary>Expression nodes written out from definitions so far in this line (0: the line uses none).</summary>
    public long ExpandedNodes => _expandedNodes;

    public ExpressionParser(TokenCursor cursor, Limits limits, DefinitionScope? definitions)
    {
        _c = cursor;
        _limits = limits;
        _maxDepth = limits.MaxNestingDepth;
        _definitions = definitions;
        _forms = new FormParser(cursor, limits, this);
    }

    /// <summary>Definitions (let lines) of the file, written out where they are used; null where none may be used.</summary>
    public DefinitionScope? Definitions => _definitions;

    /// <summary>The variables of the bound forms around the current token, innermost last: a definition's free name must not be one of them.</summary>
    public List<string> Binders { get; } = [];

    /// <summary>The free names of the definitions used on this line, with where they were used: none may be a family parameter.</summary>
    public List<(string Name, string Definition, Token At)>? FreeUses { get; private set; }

    /// <summary>The name a let line is defining (a use of it in its own body is recursion), and its parameters.</summary>
    public string? Defining { get; set; }

    public List<string>? DefiningParameters { get; set; }

    /// <summary><c>in A..B</c>, after the name has been read.</summary>
    public bool ParseRange(string name, int depth, [NotNullWhen(true)] out Expr? from, [NotNullWhen(true)] out Expr? to, out int height)
    {
        to = null;
        height = 0;
        from = null;
        if (!_c.Current.IsWord(_c.Text, "in")) return _c.Report(_c.Current, SyntaxMessages.ExpectedIn(name, _c.Describe(_c.Current)));
        _c.Advance();
        from = ParseExpression(depth, out var fromHeight);
        if (from is null) return false;
        if (_c.Current.Kind != TokenKind.DotDot) return _c.Report(_c.Current, SyntaxMessages.ExpectedRangeDots(_c.Describe(_c.Current)));
        _c.Advance();
        to = ParseExpression(depth, out var toHeight);
        height = Math.Max(fromHeight, toHeight);
        return to is not null;
    }

    /// <summary>
    /// expr := term {('+'|'-') term}; a chain of two or more terms is one <see cref="SumExpr"/>, read in a loop, and counts
    /// one level of nesting whatever its length.
    /// </summary>
    public Expr? ParseExpression(int depth, out int height)
    {
        var first = ParseTerm(depth, out height);
        if (first is null) return null;
        if (PrecedenceTable.OfToken(_c.Current.Kind) != Precedence.Additive) return first;
        var terms = new List<SumTerm> { new(first, false, first.Position) };
        var firstOperator = _c.Current;
        while (PrecedenceTable.OfToken(_c.Current.Kind) == Precedence.Additive)
        {
            var op = _c.Current;
            _c.Advance();
            var term = ParseTerm(depth, out var termHeight);
            if (term is null) return null;
            height = Math.Max(height, termHeight);
            terms.Add(new SumTerm(term, op.Kind == TokenKind.Minus, _c.At(op)));
        }
        if (++height > _maxDepth) return _c.Fail<Expr>(firstOperator, SyntaxMessages.NestingTooDeep(_maxDepth));
        return new SumExpr(terms.ToArray(), first.Position);
    }

    /// <summary>term := unary {('*'|'/') unary}; a chain of two or more factors is one <see cref="ProductExpr"/>, one level of nesting.</summary>
    private Expr? ParseTerm(int depth, out int height)
    {
        var first = ParseUnary(depth, out height);
        if (first is null) return null;
        if (PrecedenceTable.OfToken(_c.Current.Kind) != Precedence.Multiplicative) return first;
        var factors = new List<ProductFactor> { new(first, false, first.Position) };
        var firstOperator = _c.Current;
        while (PrecedenceTable.OfToken(_c.Current.Kind) == Precedence.Multiplicative)
        {
            var op = _c.Current;
            _c.Advance();
            var factor = ParseUnary(depth, out var factorHeight);
            if (factor is null) return null;
            height = Math.Max(height, factorHeight);
            factors.Add(new ProductFactor(factor, op.Kind == TokenKind.Slash, _c.At(op)));
        }
        if (++height > _maxDepth) return _c.Fail<Expr>(firstOperator, SyntaxMessages.NestingTooDeep(_maxDepth));
        return new ProductExpr(factors.ToArray(), first.Position);
    }

    /// <summary>unary := ('-'|'+') unary | power. Unary minus binds looser than '^': <c>-x^2</c> is <c>-(x^2)</c>.</summary>
    private Expr? ParseUnary(int depth, out int height)
    {
        height = 0;
        if (!RuntimeHelpers.TryEnsureSufficientExecutionStack()) return _c.Fail<Expr>(_c.Current, SyntaxMessages.StackExhausted(_maxDepth));
        var op = _c.Current;
        if (op.Kind is not (TokenKind.Minus or TokenKind.Plus)) return ParsePower(depth, out height);

        if (depth + 1 > _maxDepth) return _c.Fail<Expr>(op, SyntaxMessages.NestingTooDeep(_maxDepth));
        _c.Advance();
        var operand = ParseUnary(depth + 1, out height);
        if (operand is null) return null;
        if (op.Kind == TokenKind.Plus) return operand;
        height++;
        if (height > _maxDepth) return _c.Fail<Expr>(op, SyntaxMessages.NestingTooDeep(_maxDepth));
        return new UnaryExpr(UnaryOperator.Negate, operand, _c.At(op));
    }

    /// <summary>power := primary ['^' unary] — right-associative, and the exponent may start with a sign (<c>2^-1</c>).</summary>
    private Expr? ParsePower(int depth, out int height)
    {
        var baseExpr = ParsePrimary(depth, out height);
        if (baseExpr is null) return null;
        if (PrecedenceTable.OfToken(_c.Current.Kind) != Precedence.Power) return baseExpr;

        var caret = _c.Current;
        if (depth + 1 > _maxDepth) return _c.Fail<Expr>(caret, SyntaxMessages.NestingTooDeep(_maxDepth));
        _c.Advance();
        if (!TokenCursor.StartsExpression(_c.Current)) return _c.Fail<Expr>(_c.Current, SyntaxMessages.EmptyExponent(_c.Describe(_c.Current)));
        var exponent = ParseUnary(depth + 1, out var exponentHeight);
        if (exponent is null) return null;
        height = Math.Max(height, exponentHeight) + 1;
        if (height > _maxDepth) return _c.Fail<Expr>(caret, SyntaxMessages.NestingTooDeep(_maxDepth));
        return new BinaryExpr(BinaryOperator.Power, baseExpr, exponent, baseExpr.Position, _c.At(caret));
    }

    /// <summary>
    /// primary ['[' i ',' j ']']: an entry of a matrix expression, <c>(A*B)[i, j]</c>, after a parenthesis, a call or a
    /// matrix literal (after a plain name the brackets make an indexed variable, <c>x[i]</c>).
    /// </summary>
    private Expr? ParsePrimary(int depth, out int height)
    {
        var start = _c.Current;
        var primary = ParseAtom(depth, out height);
        if (primary is null || _c.Current.Kind != TokenKind.LeftBracket || primary is NameRef or IndexedName || start.Kind == TokenKind.Integer)
            return primary;
        var indices = new List<Expr>(2);
        if (!ParseList(TokenKind.RightBracket, "the entry's index list", depth, indices, out var indexHeight,
                static (after, found) => SyntaxMessages.ExpectedIndex(after, found), allowEmpty: false))
            return null;
        if (indices.Count != 2) return _c.Fail<Expr>(start, SyntaxMessages.WrongArity("an entry [i, j] of a matrix", 2, indices.Count).Replace("takes", "needs").Replace("argument", "index"));
        height = Math.Max(height, indexHeight) + 1;
        if (height > _maxDepth) return _c.Fail<Expr>(start, SyntaxMessages.NestingTooDeep(_maxDepth));
        return new CallExpr(Builtins.Entry, [primary, indices[0], indices[1]], primary.Position);
    }

    private Expr? ParseAtom(int depth, out int height)
    {
        height = 0;
        var token = _c.Current;
        switch (token.Kind)
        {
            case TokenKind.Integer:
                _c.Advance();
                return new IntegerLiteral(_c.ParseInteger(token), _c.At(token));
            case TokenKind.Name:
                return ParseName(depth, out height);
            case TokenKind.LeftParen:
            {
                if (depth + 1 > _maxDepth) return _c.Fail<Expr>(token, SyntaxMessages.NestingTooDeep(_maxDepth));
                _c.Advance();
                if (_c.Current.Kind == TokenKind.RightParen) return _c.Fail<Expr>(_c.Current, SyntaxMessages.EmptyParentheses);
                var inner = ParseExpression(depth + 1, out height);
                if (inner is null) return null;
                if (_c.Current.Kind != TokenKind.RightParen)
                    return _c.Fail<Expr>(_c.Current, _c.FollowMessage(SyntaxMessages.UnclosedParenthesis(token.Column, _c.Describe(_c.Current))));
                _c.Advance();
                return inner;
            }
            case TokenKind.LeftBracket:
                return _forms.ParseMatrixLiteral(depth, out height);
            default:
                return _c.Fail<Expr>(token, SyntaxMessages.ExpectedExpression(_c.HasPrevious ? _c.Describe(_c.Previous) : null, _c.Describe(token)));
        }
    }

    /// <summary>A name, an indexed name, a call of a built-in function, or a bound form.</summary>
    private Expr? ParseName(int depth, out int height)
    {
        height = 0;
        var nameToken = _c.Current;
        var name = _c.TextOf(nameToken);
        if (Builtins.Reserved.Contains(name) && !Builtins.Arity.ContainsKey(name)
            && name is not (Builtins.Sum or Builtins.Prod or Builtins.Matrix))
        {
            // 'over', 'for', 'in' where an operand should be.
            return _c.Fail<Expr>(nameToken, SyntaxMessages.ExpectedExpression(_c.HasPrevious ? _c.Describe(_c.Previous) : null, _c.Describe(nameToken)));
        }
        _c.Advance();
        var isCall = _c.Current.Kind == TokenKind.LeftParen;

        switch (name)
        {
            case Builtins.Sum:
            case Builtins.Prod:
                return isCall
                    ? _forms.ParseBound(name == Builtins.Sum ? BoundKind.Sum : BoundKind.Product, nameToken, depth, out height)
                    : _c.Fail<Expr>(nameToken, SyntaxMessages.BoundFormAsVariable(name));
            case Builtins.Matrix:
                return isCall
                    ? _forms.ParseMatrixComprehension(nameToken, depth, out height)
                    : _c.Fail<Expr>(nameToken, SyntaxMessages.BoundFormAsVariable(name));
        }
        if (Builtins.Arity.TryGetValue(name, out var arity))
        {
            return isCall
                ? ParseCall(name, arity, nameToken, depth, out height)
                : _c.Fail<Expr>(nameToken, SyntaxMessages.FunctionAsVariable(name));
        }
        if (_definitions is not null && _definitions.TryGet(name, out var definition))
            return ParseUse(definition, nameToken, isCall, depth, out height);
        if (name == Defining && isCall) return _c.Fail<Expr>(nameToken, SyntaxMessages.RecursiveDefinition(name));
        if (isCall) return _c.Fail<Expr>(nameToken, SyntaxMessages.UnknownFunction(name));
        if (_c.Current.Kind == TokenKind.LeftBracket) return ParseIndexed(name, nameToken, depth, out height);
        return new NameRef(name, _c.At(nameToken));
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
            if (isCall) return _c.Fail<Expr>(nameToken, SyntaxMessages.DefinitionArity(name, 0, definition.Line, -1));
            if (_c.Current.Kind == TokenKind.LeftBracket) return _c.Fail<Expr>(_c.Current, SyntaxMessages.DefinitionIndexed(name, definition.Line));
        }
        else
        {
            if (!isCall) return _c.Fail<Expr>(nameToken, SyntaxMessages.DefinitionArity(name, definition.Parameters.Count, definition.Line, -1));
            if (!ParseList(TokenKind.RightParen, $"the argument list of {name}(...)", depth, arguments, out _,
                    static (after, found) => SyntaxMessages.ExpectedArgument(after, found), allowEmpty: true))
                return null;
            if (arguments.Count != definition.Parameters.Count)
                return _c.Fail<Expr>(nameToken, SyntaxMessages.DefinitionArity(name, definition.Parameters.Count, definition.Line, arguments.Count));
        }
        foreach (var free in definition.FreeNames)
        {
            if (Binders.Contains(free))
                return _c.Fail<Expr>(nameToken, SyntaxMessages.DefinitionNameCaptured(name, free, $"the bound variable '{free}' of a sum, prod or matrix around this use"));
            if (DefiningParameters?.Contains(free) == true)
                return _c.Fail<Expr>(nameToken, SyntaxMessages.DefinitionNameCaptured(name, free, $"the parameter '{free}' of the definition of '{Defining}'"));
            (FreeUses ??= []).Add((free, name, nameToken));
        }
        var expansion = DefinitionExpander.Expand(definition, arguments);
        if (!expansion.Success) return _c.Fail<Expr>(nameToken, expansion.Error.Message);
        var expanded = expansion.Value;
        var limit = _limits.MaxExpandedNodes;
        var (nodes, treeHeight) = DefinitionExpander.Measure(expanded, limit - _expandedNodes);
        _expandedNodes += nodes;
        if (_expandedNodes > limit) return _c.Fail<Expr>(nameToken, SyntaxMessages.ExpansionTooLarge(limit));
        if (depth + treeHeight > _maxDepth) return _c.Fail<Expr>(nameToken, SyntaxMessages.NestingTooDeep(_maxDepth));
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
            return _c.Fail<Expr>(nameToken, SyntaxMessages.WrongArity(name, arity.Min, arity.Max, arguments.Count));
        height++;
        if (height > _maxDepth) return _c.Fail<Expr>(nameToken, SyntaxMessages.NestingTooDeep(_maxDepth));
        return new CallExpr(name, arguments.ToArray(), _c.At(nameToken));
    }

    private Expr? ParseIndexed(string name, Token nameToken, int depth, out int height)
    {
        var indices = new List<Expr>(2);
        if (!ParseList(TokenKind.RightBracket, $"the index list of '{name}'", depth, indices, out height,
                static (after, found) => SyntaxMessages.ExpectedIndex(after, found), allowEmpty: false))
            return null;
        height++;
        if (height > _maxDepth) return _c.Fail<Expr>(nameToken, SyntaxMessages.NestingTooDeep(_maxDepth));
        return new IndexedName(name, indices.ToArray(), _c.At(nameToken));
    }

    /// <summary>
    /// The current token opens a list; reads <c>item {',' item}</c> and the closing token into <paramref name="items"/>;
    /// <paramref name="height"/> is the largest item height.
    /// </summary>
    public bool ParseList(TokenKind close, string what, int depth, List<Expr> items, out int height,
        Func<string, string, string> expectedItem, bool allowEmpty, bool firstIsCondition = false, string? function = null)
    {
        height = 0;
        var open = _c.Current;
        if (depth + 1 > _maxDepth) return _c.Report(open, SyntaxMessages.NestingTooDeep(_maxDepth));
        _c.Advance();
        if (allowEmpty && _c.Current.Kind == close)
        {
            _c.Advance();
            return true;
        }
        while (true)
        {
            Expr? item;
            int itemHeight;
            if (function is not null && Builtins.TakesIndexList(function, items.Count))
                item = _forms.ParseIndexList(function, items.Count + 1, depth + 1, out itemHeight);
            else
            {
                if (!TokenCursor.StartsExpression(_c.Current)) return _c.Report(_c.Current, expectedItem(_c.Describe(_c.Previous), _c.Describe(_c.Current)));
                item = firstIsCondition && items.Count == 0
                    ? ParseCondition(depth + 1, out itemHeight)
                    : ParseExpression(depth + 1, out itemHeight);
            }
            if (item is null) return false;
            items.Add(item);
            height = Math.Max(height, itemHeight);
            if (_c.Current.Kind == TokenKind.Comma)
            {
                _c.Advance();
                continue;
            }
            if (_c.Current.Kind == close)
            {
                _c.Advance();
                return true;
            }
            return _c.Report(_c.Current, _c.FollowMessage(SyntaxMessages.ExpectedCommaOrClose(close == TokenKind.RightParen ? ')' : ']',
                open.Column, what, _c.Describe(_c.Current))));
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
        while (_c.Current.IsWord(_c.Text, word))
        {
            var opToken = _c.Current;
            _c.Advance();
            var right = word == Builtins.Or ? ParseConnective(Builtins.And, depth, out var rightHeight) : ParseComparison(depth, out rightHeight);
            if (right is null) return null;
            height = Math.Max(height, rightHeight) + 1;
            if (height > _maxDepth) return _c.Fail<Expr>(opToken, SyntaxMessages.NestingTooDeep(_maxDepth));
            left = new BinaryExpr(word == Builtins.Or ? BinaryOperator.Or : BinaryOperator.And, left, right, left.Position, _c.At(opToken));
        }
        return left;
    }

    private Expr? ParseComparison(int depth, out int height)
    {
        height = 0;
        if (!TokenCursor.StartsExpression(_c.Current)) return _c.Fail<Expr>(_c.Current, SyntaxMessages.ExpectedExpression(_c.Describe(_c.Previous), _c.Describe(_c.Current)));
        var left = ParseExpression(depth, out height);
        if (left is null) return null;
        var opToken = _c.Current;
        var op = PrecedenceTable.ComparisonOf(opToken.Kind);
        if (op is null) return _c.Fail<Expr>(opToken, SyntaxMessages.ExpectedComparison(_c.Describe(opToken)));
        _c.Advance();
        if (!TokenCursor.StartsExpression(_c.Current)) return _c.Fail<Expr>(_c.Current, SyntaxMessages.ExpectedExpression(_c.Describe(opToken), _c.Describe(_c.Current)));
        var right = ParseExpression(depth, out var rightHeight);
        if (right is null) return null;
        height = Math.Max(height, rightHeight) + 1;
        if (height > _maxDepth) return _c.Fail<Expr>(opToken, SyntaxMessages.NestingTooDeep(_maxDepth));
        return new BinaryExpr(op.Value, left, right, left.Position, _c.At(opToken));
    }
}
