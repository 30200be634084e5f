using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Tests.Syntax;

/// <summary>Malformed lines: each gives one diagnostic naming the problem at the exact column, and nothing throws.</summary>
public class CatalogueParserDiagnosticsTests
{
    public static TheoryData<string, string, int> MalformedLines => new()
    {
        // operators and operands
        { "x + = y", "expected an expression after '+', found '='", 5 },
        { "x = y +", "expected an expression after '+', found end of line", 8 },
        { "x^ = 1", "empty exponent: expected an expression after '^', found '='", 4 },
        { "2x = y", "expected an operator between '2' and 'x'", 2 },
        { "x = (a+b)(a-b)", "expected an operator between ')' and '('", 10 },
        { "x = a[1 2]", "expected an operator between '1' and '2'", 9 },
        { "x = y extra", "expected an operator between 'y' and 'extra'", 7 },
        { "x = ()", "empty parentheses", 6 },
        { "x = over", "expected an expression after '=', found 'over'", 5 },
        // characters the lexer refuses
        { "1.5 = x", "decimal numbers are not supported; write 3/2", 1 },
        { "x = .5", "decimal numbers are not supported; write 1/2", 5 },
        { "x = $", "unexpected character '$'", 5 },
        { "x = 3e10", "scientific notation is not supported; write 3*10^10", 5 },
        { "x = y \u2212 1", "unexpected character '\u2212' (U+2212); write '-'", 7 },
        { "x = y**2", "'**' is not an operator; write '^' for a power", 6 },
        { "x == y", "'==' is not an operator", 3 },
        // the two sides
        { "= y", "the left side of the identity is empty", 1 },
        { "x = ", "expected an expression after '=', found end of line", 4 },
        { "x + 1", "expected '=' between the two sides of the identity, found end of line", 6 },
        { "x = y = z", "a second '='", 7 },
        { "x = y)", "unexpected ')' with no matching '('", 6 },
        { "x = y]", "unexpected ']' with no matching '['", 6 },
        { "(x+1 = x", "expected ')' to close '(' at column 1, found '='", 6 },
        // names, calls, indices
        { "x[ = 1", "expected an index after '[', found '='", 4 },
        { "x[] = 1", "expected an index after '[', found ']'", 3 },
        { "binom(x) = 1", "binom takes 2 arguments, got 1", 1 },
        { "binom(x, y, z) = 1", "binom takes 2 arguments, got 3", 1 },
        { "x = 1 + det(x, y)", "det takes 1 argument, got 2", 9 },
        { "x = binom(x,)", "expected an argument after ',', found ')'", 13 },
        { "foo(x) = 1", "unknown function 'foo'", 1 },
        { "sum + 1 = 2", "'sum' is a reserved word and cannot be used as a variable", 1 },
        { "det = 1", "'det' is a reserved word (a built-in function) and cannot be used as a variable; call it as det(...)", 1 },
        { "x = 1 + in", "expected an expression after '+', found 'in'", 9 },
        // bound forms
        { "sum(k 0..3: k) = 1", "expected 'in' after 'k', found '0'", 7 },
        { "sum(k in 0..3 k) = 1", "expected ':' before the body of sum(...), found 'k'", 15 },
        { "matrix(i in 1..2, j in 1..2 i) = x", "expected ':' before the body of matrix(...), found 'i'", 29 },
        { "sum(k in 0..3: ) = 1", "expected the body of sum(...) after ':', found ')'", 16 },
        { "sum(3 in 0..3: k) = 1", "expected the name of the bound variable after 'sum(', found '3'", 5 },
        { "sum(k in 0 3: k) = 1", "expected '..' between the two ends of the range, found '3'", 12 },
        { "prod(k in 1..n: k = 1", "expected ')' to close '(' at column 5, found '='", 19 },
        { "matrix(i in 1..3: i) = x", "expected ',' and the column range after the row range of matrix(...), found ':'", 17 },
        { "matrix(i in 1..2, i in 1..2: 1) = x", "the row and column variables of matrix(...) are both 'i'", 19 },
        // matrix literals
        { "[[a,b],[c]] = x", "matrix rows must have equal length: row 2 has 1 entry, row 1 has 2", 8 },
        { "[[a, b], [c, d] = x", "expected ']' to close '[' at column 1, found '='", 17 },
        { "[[a,b] [c,d]] = x", "expected ',' between rows 1 and 2 of the matrix literal, found '['", 8 },
        { "[] = x", "empty matrix literal", 1 },
        { "[a, b] = x", "expected '[' to start row 1 of the matrix literal, found 'a'", 2 },
        { "[[a, ]] = x", "expected a matrix entry after ',', found ']'", 6 },
        // fields
        { "x = y over GF(12)", "GF(12): 12 is not a prime", 15 },
        { "x = y over GF(4)", "GF(4): 4 is not a prime; for the field with 4 elements write GF(2^2)", 15 },
        { "x = y over GF(2^0)", "GF(2^0): the exponent k must be at least 1", 17 },
        { "x = y over GF(2^99999999999)", "the field has more than MaxFieldBits (4096) bits", 17 },
        { "x = y over R", "unknown field 'R'; write Q, GF(p) or GF(p^k)", 12 },
        { "x = y over", "expected a field (Q, GF(p) or GF(p^k)) after 'over', found end of line", 11 },
        { "x = y over GF(7", "expected ')' to close '(' at column 14, found end of line", 16 },
        { "x = y over GF(x)", "GF(x): 'x' must be a parameter of this family line", 15 },
        { "x = y over GF(+)", "expected a prime p after 'GF(', found '+'", 15 },
        { "x = y over Q Q", "unexpected 'Q' after the field", 14 },
        { "x = y over GF(7) over Q", "a second 'over' clause", 18 },
        // families
        { "x = y for n 1..3", "expected 'in' after 'n', found '1'", 13 },
        { "x = y for n in 1..", "expected an expression after '..', found end of line", 19 },
        { "x = y for n in 1...3", "'...' is not a range; write A..B", 17 },
        { "x = y for", "expected a parameter name after 'for', found end of line", 10 },
        { "x = y for n in 1..3, n in 1..2", "parameter 'n' is given twice", 22 },
        { "x = y for sum in 1..2", "'sum' is a reserved word and cannot name a parameter", 11 },
        { "x = y for n in 1..3 k in 0..n", "unexpected 'k' after the range of 'n'; separate ranges with ','", 21 },
        { "x = y for n in 1..3 over Q", "the 'over FIELD' clause must come before the 'for' clause", 21 },
        { "x = y for n in 1..3 for k in 1..2", "a second 'for' clause", 21 },
        // conditions and the new functions
        { "iverson(n) = 1", "expected a comparison (<, <=, >, >=, = or !=) in the condition, found ')'", 10 },
        { "x < y = 1", "the comparison '<' can only be the condition of iverson(A < B) or when(A < B, THEN, ELSE)", 3 },
        { "iverson(n < 1 and) = 1", "expected an expression after 'and', found ')'", 18 },
        { "n! = 1", "'!' is not an operator: write fact(n)", 2 },
        { "min(n) = 1", "min takes 2 or more arguments, got 1", 1 },
        { "when(n < 1, x) = 1", "when takes 3 arguments, got 2", 1 },
        { "multinomial() = 1", "multinomial takes 1 or more arguments, got 0", 1 },
        { "x = and", "expected an expression after '=', found 'and'", 5 },
        // labels
        { ": x = y", "empty label before ':'", 1 },
        { "lbl:", "expected an identity after the label 'lbl:', found end of line", 5 },
    };

    [Theory]
    [MemberData(nameof(MalformedLines))]
    public void MalformedLineGivesMessageAtColumn(string line, string message, int column)
    {
        var result = CatalogueParser.ParseLine(line, 42);

        Assert.False(result.Success);
        var error = result.Error!;
        Assert.Contains(message, error.Message);
        Assert.Equal(new SourcePosition(42, column), error.Position);
    }

    [Fact]
    public void TableHasAtLeastThirtyFiveLines()
    {
        Assert.True(MalformedLines.Count >= 35);
    }

    [Fact]
    public void FailedResultThrowsOnlyWhenItsValueIsRead()
    {
        var result = CatalogueParser.ParseLine("x = ", 1);
        Assert.False(result.Success);
        Assert.Throws<InvalidOperationException>(() => result.Value);
    }

    [Fact]
    public void UnknownFunctionMessageListsTheFunctions()
    {
        var message = CatalogueParser.ParseLine("foo(x) = 1", 1).Error!.Message;
        Assert.Contains("binom", message);
        Assert.Contains("qbinom", message);
        Assert.Contains("matrix", message);
    }

    [Fact]
    public void LongTokensAreShortenedInMessages()
    {
        var line = "x = 2" + new string('7', 5000) + "y";
        var message = CatalogueParser.ParseLine(line, 1).Error!.Message;
        Assert.Contains("(5001 characters)", message);
        Assert.True(message.Length < 200, message);
    }

    [Fact]
    public void ParseIdentityRefusesABlankText()
    {
        var result = CatalogueParser.ParseIdentity("   # nothing here");
        Assert.False(result.Success);
        Assert.Equal(SyntaxMessages.ExpectedIdentity, result.Error!.Message);
        Assert.Equal(1, result.Error.Position.Line);
    }

    [Theory]
    [InlineData("", "expected an expression, found end of line", 1)]
    [InlineData("x = y", "unexpected '=' after the end of the expression", 3)]
    [InlineData("x y", "expected an operator between 'x' and 'y'", 3)]
    [InlineData("(x", "expected ')' to close '(' at column 1, found end of line", 3)]
    public void ParseExpressionRefusesAnythingButOneExpression(string text, string message, int column)
    {
        var result = CatalogueParser.ParseExpression(text);
        Assert.False(result.Success);
        Assert.Contains(message, result.Error!.Message);
        Assert.Equal(new SourcePosition(1, column), result.Error.Position);
    }

    [Theory]
    [InlineData("", "expected a field (Q, GF(p) or GF(p^k)), found end of line", 1)]
    [InlineData("gf(7)", "unknown field 'gf'", 1)]
    [InlineData("GF(7) x", "unexpected 'x' after the field", 7)]
    [InlineData("GF(7) for", "unexpected 'for' after the field", 7)]
    [InlineData("GF 7", "expected '(' after 'GF', found '7'", 4)]
    [InlineData("GF(1)", "GF(1): 1 is not a prime", 4)]
    [InlineData("GF(2^x)", "expected the exponent k, a positive integer, after '^', found 'x'", 6)]
    public void ParseFieldRefusesAnythingButOneField(string text, string message, int column)
    {
        var result = CatalogueParser.ParseField(text);
        Assert.False(result.Success);
        Assert.Contains(message, result.Error!.Message);
        Assert.Equal(new SourcePosition(1, column), result.Error.Position);
    }
}
