namespace IdentityQueue.Algebra.Syntax;

/// <summary>
/// The forms that bind or enclose: <c>sum</c>/<c>prod(k in A..B: E)</c>, <c>matrix(i in A..B, j in C..D: E)</c>, matrix
/// literals <c>[[a, b], [c, d]]</c> and the index lists <c>[1, 3..n]</c> of submatrix and minor. Their items are
/// expressions, read by <see cref="ExpressionParser"/>.
/// </summary>
internal sealed class FormParser(TokenCursor cursor, Limits limits, ExpressionParser expressions)
{
    private readonly TokenCursor _c = cursor;
    private readonly Limits _limits = limits;
    private readonly int _maxDepth = limits.MaxNestingDepth;
    private readonly ExpressionParser _e = expressions;


    /// <summary>
    /// <c>[item {, item}]</c> or <c>[]</c>, item := EXPR ['..' EXPR]: the rows or columns of submatrix and minor, in the
    /// order given. A range A..B with B &lt; A is empty.
    /// </summary>
    public Expr? ParseIndexList(string function, int argument, int depth, out int height)
    {
        height = 0;
        var open = _c.Current;
        if (open.Kind != TokenKind.LeftBracket) return _c.Fail<Expr>(open, SyntaxMessages.ExpectedIndexList(function, argument, _c.Describe(open)));
        if (depth + 1 > _maxDepth) return _c.Fail<Expr>(open, SyntaxMessages.NestingTooDeep(_maxDepth));
        _c.Advance();
        var items = new List<Expr>();
        if (_c.Current.Kind == TokenKind.RightBracket)
        {
            _c.Advance();
            return new CallExpr(Builtins.IndexList, [], _c.At(open));
        }
        while (true)
        {
            if (!TokenCursor.StartsExpression(_c.Current)) return _c.Fail<Expr>(_c.Current, SyntaxMessages.ExpectedIndexListItem(_c.Describe(_c.Previous), _c.Describe(_c.Current)));
            var from = _e.ParseExpression(depth + 1, out var fromHeight);
            if (from is null) return null;
            height = Math.Max(height, fromHeight);
            if (_c.Current.Kind == TokenKind.DotDot)
            {
                _c.Advance();
                if (!TokenCursor.StartsExpression(_c.Current)) return _c.Fail<Expr>(_c.Current, SyntaxMessages.ExpectedIndexListItem(_c.Describe(_c.Previous), _c.Describe(_c.Current)));
                var to = _e.ParseExpression(depth + 1, out var toHeight);
                if (to is null) return null;
                height = Math.Max(height, toHeight);
                items.Add(new CallExpr(Builtins.Range, [from, to], from.Position));
            }
            else items.Add(from);
            if (_c.Current.Kind == TokenKind.Comma) { _c.Advance(); continue; }
            if (_c.Current.Kind == TokenKind.RightBracket) { _c.Advance(); break; }
            return _c.Fail<Expr>(_c.Current, _c.FollowMessage(SyntaxMessages.ExpectedCommaOrClose(']', open.Column, $"the index list of {function}", _c.Describe(_c.Current))));
        }
        height += 2;
        return new CallExpr(Builtins.IndexList, items.ToArray(), _c.At(open));
    }

    /// <summary><c>sum(k in A..B: E)</c> or <c>prod(k in A..B: E)</c>; the current token is the '('.</summary>
    public Expr? ParseBound(BoundKind kind, Token formToken, int depth, out int height)
    {
        height = 0;
        var form = _c.TextOf(formToken);
        var open = _c.Current;
        if (depth + 1 > _maxDepth) return _c.Fail<Expr>(open, SyntaxMessages.NestingTooDeep(_maxDepth));
        _c.Advance();
        var variable = ParseBoundVariable(form);
        if (variable is null) return null;
        if (!_e.ParseRange(variable, depth + 1, out var from, out var to, out var rangeHeight)) return null;
        if (_c.Current.Kind != TokenKind.Colon) return _c.Fail<Expr>(_c.Current, SyntaxMessages.ExpectedBodyColon(form, _c.Describe(_c.Current)));
        _c.Advance();
        _e.Binders.Add(variable);
        var body = ParseBody(form, open, depth, out var bodyHeight);
        _e.Binders.RemoveAt(_e.Binders.Count - 1);
        if (body is null) return null;

        height = Math.Max(rangeHeight, bodyHeight) + 1;
        if (height > _maxDepth) return _c.Fail<Expr>(formToken, SyntaxMessages.NestingTooDeep(_maxDepth));
        return new BoundExpr(kind, variable, from, to, body, _c.At(formToken));
    }

    /// <summary><c>matrix(i in A..B, j in C..D: E)</c>; the current token is the '('.</summary>
    public Expr? ParseMatrixComprehension(Token formToken, int depth, out int height)
    {
        height = 0;
        const string form = Builtins.Matrix;
        var open = _c.Current;
        if (depth + 1 > _maxDepth) return _c.Fail<Expr>(open, SyntaxMessages.NestingTooDeep(_maxDepth));
        _c.Advance();
        var rowVariable = ParseBoundVariable(form);
        if (rowVariable is null) return null;
        if (!_e.ParseRange(rowVariable, depth + 1, out var rowFrom, out var rowTo, out var rowHeight)) return null;
        if (_c.Current.Kind != TokenKind.Comma) return _c.Fail<Expr>(_c.Current, SyntaxMessages.ExpectedColumnRange(_c.Describe(_c.Current)));
        _c.Advance();
        var columnToken = _c.Current;
        var columnVariable = ParseBoundVariable(form);
        if (columnVariable is null) return null;
        if (columnVariable == rowVariable) return _c.Fail<Expr>(columnToken, SyntaxMessages.SameMatrixVariables(columnVariable));
        if (!_e.ParseRange(columnVariable, depth + 1, out var columnFrom, out var columnTo, out var columnHeight)) return null;
        if (_c.Current.Kind != TokenKind.Colon) return _c.Fail<Expr>(_c.Current, SyntaxMessages.ExpectedBodyColon(form, _c.Describe(_c.Current)));
        _c.Advance();
        _e.Binders.Add(rowVariable);
        _e.Binders.Add(columnVariable);
        var body = ParseBody(form, open, depth, out var bodyHeight);
        _e.Binders.RemoveRange(_e.Binders.Count - 2, 2);
        if (body is null) return null;

        height = Math.Max(Math.Max(rowHeight, columnHeight), bodyHeight) + 1;
        if (height > _maxDepth) return _c.Fail<Expr>(formToken, SyntaxMessages.NestingTooDeep(_maxDepth));
        return new MatrixComprehension(rowVariable, rowFrom, rowTo, columnVariable, columnFrom, columnTo, body, _c.At(formToken));
    }

    private string? ParseBoundVariable(string form)
    {
        var token = _c.Current;
        if (token.Kind != TokenKind.Name) return _c.Fail<string>(token, SyntaxMessages.ExpectedBoundVariable(form, _c.Describe(token)));
        var name = _c.TextOf(token);
        if (Builtins.Reserved.Contains(name)) return _c.Fail<string>(token, SyntaxMessages.ReservedAsBoundVariable(name));
        if (_e.Definitions?.Contains(name) == true) return _c.Fail<string>(token, SyntaxMessages.DefinitionAsBinder(name, "a bound variable"));
        _c.Advance();
        return name;
    }

    /// <summary>The body after ':' and the closing ')' of a bound form.</summary>
    private Expr? ParseBody(string form, Token open, int depth, out int height)
    {
        height = 0;
        if (!TokenCursor.StartsExpression(_c.Current)) return _c.Fail<Expr>(_c.Current, SyntaxMessages.ExpectedBody(form, _c.Describe(_c.Current)));
        var body = _e.ParseExpression(depth + 1, out height);
        if (body is null) return null;
        if (_c.Current.Kind != TokenKind.RightParen)
            return _c.Fail<Expr>(_c.Current, _c.FollowMessage(SyntaxMessages.UnclosedParenthesis(open.Column, _c.Describe(_c.Current))));
        _c.Advance();
        return body;
    }

    /// <summary><c>[[a, b], [c, d]]</c>: one or more rows of equal length, each of one or more entries.</summary>
    public Expr? ParseMatrixLiteral(int depth, out int height)
    {
        height = 0;
        var open = _c.Current;
        if (depth + 1 > _maxDepth) return _c.Fail<Expr>(open, SyntaxMessages.NestingTooDeep(_maxDepth));
        _c.Advance();
        if (_c.Current.Kind == TokenKind.RightBracket) return _c.Fail<Expr>(open, SyntaxMessages.EmptyMatrix);

        var maxOrder = _limits.MaxMatrixOrder;
        var rows = new List<IReadOnlyList<Expr>>();
        while (true)
        {
            var rowOpen = _c.Current;
            if (rowOpen.Kind != TokenKind.LeftBracket) return _c.Fail<Expr>(rowOpen, SyntaxMessages.ExpectedRow(rows.Count + 1, _c.Describe(rowOpen)));
            if (rows.Count == maxOrder) return _c.Fail<Expr>(rowOpen, SyntaxMessages.MatrixTooLarge("rows", maxOrder));
            var entries = new List<Expr>(rows.Count == 0 ? 4 : rows[0].Count);
            if (!_e.ParseList(TokenKind.RightBracket, $"row {rows.Count + 1} of the matrix literal", depth + 1, entries, out var rowHeight,
                    static (after, found) => SyntaxMessages.ExpectedEntry(after, found), allowEmpty: false))
                return null;
            if (entries.Count > maxOrder) return _c.Fail<Expr>(rowOpen, SyntaxMessages.MatrixTooLarge("columns", maxOrder));
            if (rows.Count > 0 && entries.Count != rows[0].Count)
                return _c.Fail<Expr>(rowOpen, SyntaxMessages.RaggedRow(rows.Count + 1, entries.Count, rows[0].Count));
            rows.Add(entries.ToArray());
            height = Math.Max(height, rowHeight);

            if (_c.Current.Kind == TokenKind.Comma)
            {
                _c.Advance();
                continue;
            }
            if (_c.Current.Kind == TokenKind.RightBracket)
            {
                _c.Advance();
                break;
            }
            return _c.Fail<Expr>(_c.Current, _c.Current.Kind == TokenKind.LeftBracket
                ? SyntaxMessages.MissingRowComma(rows.Count, _c.Describe(_c.Current))
                : SyntaxMessages.UnclosedBracket(open.Column, _c.Describe(_c.Current)));
        }

        height++;
        if (height > _maxDepth) return _c.Fail<Expr>(open, SyntaxMessages.NestingTooDeep(_maxDepth));
        return new MatrixLiteral(rows.ToArray(), _c.At(open));
    }
}
