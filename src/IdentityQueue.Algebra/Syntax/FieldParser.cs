using System.Globalization;
using System.Numerics;

namespace IdentityQueue.Algebra.Syntax;

/// <summary>The field clauses of a line: <c>over Q</c>, <c>over GF(p)</c>, <c>over GF(p^k)</c>, and <c>up to q^N</c>.</summary>
internal sealed class FieldParser(TokenCursor cursor, Limits limits)
{
    private readonly TokenCursor _c = cursor;
    private readonly Limits _limits = limits;

    /// <summary><c>up to NAME^N</c>: a truncated power series identity in NAME, compared up to NAME^N (N a non-negative integer).</summary>
    public (string Variable, int Order)? ParseSeriesClause()
    {
        _c.Advance(); // 'up'
        if (!_c.Current.IsWord(_c.Text, "to")) return FailValue(_c.Current, SyntaxMessages.ExpectedSeriesClause(_c.Describe(_c.Current)));
        _c.Advance();
        var nameToken = _c.Current;
        if (nameToken.Kind != TokenKind.Name || Builtins.Reserved.Contains(_c.TextOf(nameToken)))
            return FailValue(nameToken, SyntaxMessages.ExpectedSeriesClause(_c.Describe(nameToken)));
        _c.Advance();
        if (_c.Current.Kind != TokenKind.Caret) return FailValue(_c.Current, SyntaxMessages.ExpectedSeriesClause(_c.Describe(_c.Current)));
        _c.Advance();
        var orderToken = _c.Current;
        if (orderToken.Kind != TokenKind.Integer) return FailValue(orderToken, SyntaxMessages.ExpectedSeriesClause(_c.Describe(orderToken)));
        _c.Advance();
        var order = _c.ParseInteger(orderToken);
        if (order > _limits.MaxSeriesOrder) return FailValue(orderToken, SyntaxMessages.SeriesTooLong(order, _limits.MaxSeriesOrder));
        return (_c.TextOf(nameToken), (int)order);
    }

    private (string, int)? FailValue(Token at, string message)
    {
        _c.Report(at, message);
        return null;
    }

    /// <summary><c>Q</c> | <c>GF(p)</c> | <c>GF(p^k)</c>; p must be prime, k ≥ 1, and the field within MaxFieldBits.</summary>
    public FieldSpec? ParseField()
    {
        var nameToken = _c.Current;
        if (nameToken.Kind != TokenKind.Name)
            return _c.Fail<FieldSpec>(nameToken, SyntaxMessages.ExpectedField(_c.HasPrevious ? _c.Describe(_c.Previous) : null, _c.Describe(nameToken)));
        if (nameToken.IsWord(_c.Text, "Q"))
        {
            _c.Advance();
            return FieldSpec.Rationals;
        }
        if (!nameToken.IsWord(_c.Text, "GF")) return _c.Fail<FieldSpec>(nameToken, SyntaxMessages.UnknownField(_c.TextOf(nameToken)));
        _c.Advance();

        var open = _c.Current;
        if (open.Kind != TokenKind.LeftParen) return _c.Fail<FieldSpec>(open, SyntaxMessages.ExpectedFieldParenthesis(_c.Describe(open)));
        _c.Advance();
        var pToken = _c.Current;
        if (pToken.Kind is not (TokenKind.Integer or TokenKind.Name)) return _c.Fail<FieldSpec>(pToken, SyntaxMessages.ExpectedCharacteristic(_c.Describe(pToken)));
        _c.Advance();
        Token? kToken = null;
        if (_c.Current.Kind == TokenKind.Caret)
        {
            _c.Advance();
            if (_c.Current.Kind != TokenKind.Integer) return _c.Fail<FieldSpec>(_c.Current, SyntaxMessages.ExpectedFieldExponent(_c.Describe(_c.Current)));
            kToken = _c.Current;
            _c.Advance();
        }
        if (_c.Current.Kind != TokenKind.RightParen)
            return _c.Fail<FieldSpec>(_c.Current, SyntaxMessages.UnclosedParenthesis(open.Column, _c.Describe(_c.Current)));
        var close = _c.Current;
        _c.Advance();

        var fieldText = _c.ShortText(nameToken.Start, close.End);
        var maxBits = _limits.MaxFieldBits;
        if (pToken.Kind == TokenKind.Name)
        {
            // GF(p) with p a family parameter: checked per instance (FieldSpec.Bind), and against the ranges after the line.
            var degree = 1;
            if (kToken is { } degreeToken && (degreeToken.Length > 4
                    || (degree = int.Parse(_c.Text.AsSpan(degreeToken.Start, degreeToken.Length), NumberStyles.None, CultureInfo.InvariantCulture)) < 1))
                return _c.Fail<FieldSpec>(degreeToken, SyntaxMessages.ZeroFieldExponent(fieldText));
            return FieldSpec.FiniteOfParameter(_c.TextOf(pToken), degree, _c.At(pToken));
        }
        // Check the size from the digit count before converting, so a huge p costs nothing: 10^(d-1) ≥ 2^(3.32(d-1)).
        if ((pToken.Length - 1) * 3.3219 > maxBits) return _c.Fail<FieldSpec>(pToken, SyntaxMessages.FieldTooLarge(fieldText, maxBits));
        var p = _c.ParseInteger(pToken);
        if (p.GetBitLength() > maxBits) return _c.Fail<FieldSpec>(pToken, SyntaxMessages.FieldTooLarge(fieldText, maxBits));
        var prime = FieldSpec.Finite(p);
        if (!prime.Success)
        {
            var (q, e) = AsPrimePower(p);
            return _c.Fail<FieldSpec>(pToken, SyntaxMessages.NotPrime(fieldText, p, q, e));
        }
        var k = 1;
        if (kToken is { } kt)
        {
            if (kt.Length > 9) return _c.Fail<FieldSpec>(kt, SyntaxMessages.FieldTooLarge(fieldText, maxBits));
            k = int.Parse(_c.Text.AsSpan(kt.Start, kt.Length), NumberStyles.None, CultureInfo.InvariantCulture);
            if (k < 1) return _c.Fail<FieldSpec>(kt, SyntaxMessages.ZeroFieldExponent(fieldText));
            if (BigInteger.Log(p, 2) * k > maxBits) return _c.Fail<FieldSpec>(kt, SyntaxMessages.FieldTooLarge(fieldText, maxBits));
        }
        return k == 1 ? prime.Value : prime.Value.WithDegree(k).Value;
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
}
