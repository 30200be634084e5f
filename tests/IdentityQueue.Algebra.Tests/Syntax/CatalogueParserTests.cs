using System.Numerics;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Tests.Syntax;

/// <summary>Well-formed catalogue text (the forms of SPEC §3) and the trees and entries it gives.</summary>
public class CatalogueParserTests
{
    private static IdentityEntry Entry(string line, int lineNumber = 1)
    {
        var result = CatalogueParser.ParseLine(line, lineNumber);
        Assert.True(result.Success, result.Error?.ToString());
        Assert.NotNull(result.Value);
        return result.Value;
    }

    private static string Tree(string expression)
    {
        var result = CatalogueParser.ParseExpression(expression);
        Assert.True(result.Success, result.Error?.ToString());
        return TreeText.Of(result.Value);
    }

    [Fact]
    public void TwoSquaresLineGivesLabelSidesAndDefaultField()
    {
        const string line = "two-squares: (a^2+b^2)*(c^2+d^2) = (a*c-b*d)^2 + (a*d+b*c)^2";
        var entry = Entry(line, 7);

        Assert.Equal("two-squares", entry.Label);
        Assert.Equal("(* (+ (^ a 2) (^ b 2)) (+ (^ c 2) (^ d 2)))", TreeText.Of(entry.Left));
        Assert.Equal("(+ (^ (- (* a c) (* b d)) 2) (^ (+ (* a d) (* b c)) 2))", TreeText.Of(entry.Right));
        Assert.Same(FieldSpec.Rationals, entry.Field);
        Assert.Empty(entry.Parameters);
        Assert.False(entry.IsFamily);
        Assert.Equal(7, entry.Line);
        Assert.Equal(line, entry.Text);
    }

    [Fact]
    public void BinomialFamilyLineGivesSumAndParameterRange()
    {
        var entry = Entry("binomial: sum(k in 0..n: binom(n,k)) = 2^n for n in 0..5");

        Assert.Equal("binomial", entry.Label);
        Assert.Equal("(sum k 0 n (binom n k))", TreeText.Of(entry.Left));
        Assert.Equal("(^ 2 n)", TreeText.Of(entry.Right));
        var range = Assert.Single(entry.Parameters);
        Assert.Equal("n", range.Name);
        Assert.Equal("0", TreeText.Of(range.From));
        Assert.Equal("5", TreeText.Of(range.To));
        Assert.Equal(new SourcePosition(1, 48), range.Position);
        Assert.True(entry.IsFamily);
    }

    [Fact]
    public void LineWithoutLabelHasNullLabel()
    {
        var entry = Entry("x*y = y*x");
        Assert.Null(entry.Label);
        Assert.Equal("(* x y)", TreeText.Of(entry.Left));
    }

    [Theory]
    [InlineData("x = x over Q", "Q")]
    [InlineData("x = x over GF(7)", "GF(7)")]
    [InlineData("x = x over GF(2^8)", "GF(2^8)")]
    [InlineData("x = x over GF( 3 ^ 2 )", "GF(3^2)")]
    [InlineData("x = x over GF(2305843009213693951)", "GF(2305843009213693951)")] // 2^61 - 1, a Mersenne prime
    public void OverClauseGivesTheField(string line, string field)
    {
        Assert.Equal(field, Entry(line).Field.ToString());
    }

    [Fact]
    public void OverGfPowerGivesCharacteristicAndDegree()
    {
        var field = Entry("x^2 = x*x over GF(2^8)").Field;
        Assert.Equal(FieldKind.Finite, field.Kind);
        Assert.Equal(new BigInteger(2), field.Characteristic);
        Assert.Equal(8, field.Degree);
    }

    [Fact]
    public void ForClauseGivesOneRange()
    {
        var entry = Entry("fact(n) = n*fact(n-1) for n in 2..12");
        var range = Assert.Single(entry.Parameters);
        Assert.Equal(("n", "2", "12"), (range.Name, TreeText.Of(range.From), TreeText.Of(range.To)));
    }

    [Fact]
    public void ForClauseGivesSeveralRangesWhoseEndsMayUseEarlierOnes()
    {
        var entry = Entry("binom(n,k) = binom(n,n-k) for n in 1..3, k in 0..n");
        Assert.Equal(2, entry.Parameters.Count);
        Assert.Equal(("k", "0", "n"), (entry.Parameters[1].Name, TreeText.Of(entry.Parameters[1].From), TreeText.Of(entry.Parameters[1].To)));
    }

    [Fact]
    public void OverAndForMayBothBeGiven()
    {
        var entry = Entry("(x+y)^p = x^p + y^p over GF(5) for p in 5..5");
        Assert.Equal("GF(5)", entry.Field.ToString());
        Assert.Single(entry.Parameters);
    }

    [Fact]
    public void RangeEndsAreExpressions()
    {
        var entry = Entry("x = x for n in -1..2*3+1");
        Assert.Equal("(neg 1)", TreeText.Of(entry.Parameters[0].From));
        Assert.Equal("(+ (* 2 3) 1)", TreeText.Of(entry.Parameters[0].To));
    }

    [Theory]
    [InlineData("x[i]", "(index x i)")]
    [InlineData("a[i,j]", "(index a i j)")]
    [InlineData("a[i+1, 2*j]", "(index a (+ i 1) (* 2 j))")]
    [InlineData("x[i]^2", "(^ (index x i) 2)")]
    [InlineData("x [ i ]", "(index x i)")]
    public void IndexedNamesTakeExpressionIndices(string text, string tree)
    {
        Assert.Equal(tree, Tree(text));
    }

    [Theory]
    [InlineData("sum(k in 0..n: k)", "(sum k 0 n k)")]
    [InlineData("prod(i in 1..n: x[i])", "(prod i 1 n (index x i))")]
    [InlineData("sum(k in 0..n-1: q^k)", "(sum k 0 (- n 1) (^ q k))")]
    [InlineData("sum(i in 1..n: sum(j in i..n: a[i,j]))", "(sum i 1 n (sum j i n (index a i j)))")]
    [InlineData("matrix(i in 1..n, j in 1..n: x[i]^(j-1))", "(matrix i 1 n j 1 n (^ (index x i) (- j 1)))")]
    public void BoundFormsGiveTheirVariableRangeAndBody(string text, string tree)
    {
        Assert.Equal(tree, Tree(text));
    }

    [Fact]
    public void BoundFormNodeRecordsKindAndPosition()
    {
        var sum = Assert.IsType<SumExpr>(CatalogueParser.ParseExpression("1 + prod(i in 1..3: i)").Value);
        var product = Assert.IsType<BoundExpr>(sum.Terms[1].Value);
        Assert.Equal(BoundKind.Product, product.Kind);
        Assert.Equal("i", product.Variable);
        Assert.Equal(new SourcePosition(1, 5), product.Position);
    }

    [Theory]
    [InlineData("[[a, b], [c, d]]", "(rows (a b) (c d))")]
    [InlineData("[[1]]", "(rows (1))")]
    [InlineData("[[a, b, c]]", "(rows (a b c))")]
    [InlineData("[[x+1], [-y]]", "(rows ((+ x 1)) ((neg y)))")]
    public void MatrixLiteralsGiveRows(string text, string tree)
    {
        Assert.Equal(tree, Tree(text));
    }

    [Theory]
    [InlineData("det([[a, b], [c, d]])", "(det (rows (a b) (c d)))")]
    [InlineData("pf(M)", "(pf M)")]
    [InlineData("perm(matrix(i in 1..3, j in 1..3: 1))", "(perm (matrix i 1 3 j 1 3 1))")]
    [InlineData("tr(A*B)", "(tr (* A B))")]
    [InlineData("transpose(A)", "(transpose A)")]
    [InlineData("id(3)", "(id 3)")]
    [InlineData("det(id(n)) + 2*A^2", "(+ (det (id n)) (* 2 (^ A 2)))")]
    public void MatrixFunctionsAreCalls(string text, string tree)
    {
        Assert.Equal(tree, Tree(text));
    }

    [Theory]
    [InlineData("binom(a, k)", "(binom a k)")]
    [InlineData("fact(n)", "(fact n)")]
    [InlineData("qint(n, q)", "(qint n q)")]
    [InlineData("qfact(n, q)", "(qfact n q)")]
    [InlineData("qbinom(n, k, q)", "(qbinom n k q)")]
    [InlineData("qbinom(n+1, k, q^2)", "(qbinom (+ n 1) k (^ q 2))")]
    public void IntegerAndQFunctionsAreCalls(string text, string tree)
    {
        Assert.Equal(tree, Tree(text));
    }

    [Fact]
    public void QAnalogueLineParses()
    {
        var entry = Entry("q-pascal: qbinom(n, k, q) = qbinom(n-1, k-1, q) + q^k*qbinom(n-1, k, q) for n in 1..8, k in 1..n");
        Assert.Equal("(+ (qbinom (- n 1) (- k 1) q) (* (^ q k) (qbinom (- n 1) k q)))", TreeText.Of(entry.Right));
    }

    [Fact]
    public void VandermondeLineParses()
    {
        var entry = Entry("vdm.3: det(matrix(i in 1..3, j in 1..3: x[i]^(j-1))) = prod(i in 1..3: prod(j in i+1..3: x[j] - x[i]))");
        Assert.Equal("vdm.3", entry.Label);
        Assert.Equal("(prod i 1 3 (prod j (+ i 1) 3 (- (index x j) (index x i))))", TreeText.Of(entry.Right));
    }

    [Fact]
    public void IntegerLiteralsOfAnySizeAreExact()
    {
        var digits = "123456789012345678901234567890123456789012345678901234567890";
        var literal = Assert.IsType<IntegerLiteral>(CatalogueParser.ParseExpression(digits).Value);
        Assert.Equal(BigInteger.Parse(digits), literal.Value);
    }

    [Theory]
    [InlineData("0", 0)]
    [InlineData("007", 7)]
    [InlineData("999999999999999999", 999999999999999999)] // 18 digits: the short path
    public void ShortIntegerLiteralsHaveTheirValue(string text, long value)
    {
        Assert.Equal(new BigInteger(value), Assert.IsType<IntegerLiteral>(CatalogueParser.ParseExpression(text).Value).Value);
    }

    [Fact]
    public void NineteenDigitLiteralTakesTheLongPath()
    {
        var literal = Assert.IsType<IntegerLiteral>(CatalogueParser.ParseExpression("9999999999999999999").Value);
        Assert.Equal(BigInteger.Parse("9999999999999999999"), literal.Value);
    }

    [Theory]
    [InlineData("")]
    [InlineData("   ")]
    [InlineData("\t \r")]
    [InlineData("# a comment")]
    [InlineData("   # an indented comment = with an equals sign")]
    public void BlankAndCommentLinesGiveNoEntry(string line)
    {
        var result = CatalogueParser.ParseLine(line, 3);
        Assert.True(result.Success);
        Assert.Null(result.Value);
    }

    [Fact]
    public void CommentAfterIdentityIsIgnoredButKeptInText()
    {
        const string line = "x + 0 = x   # additive identity";
        var entry = Entry(line);
        Assert.Equal("x", TreeText.Of(entry.Right));
        Assert.Equal(line, entry.Text);
    }

    [Fact]
    public void CarriageReturnAndTabsAreWhitespace()
    {
        var entry = Entry("\tx\t=\tx\r");
        Assert.Equal("x", TreeText.Of(entry.Left));
    }

    // SPEC §3: '^' is right-associative.
    [Fact]
    public void PowerIsRightAssociative()
    {
        Assert.Equal("(^ 2 (^ 3 2))", Tree("2^3^2"));
        Assert.Equal("(^ (^ 2 3) 2)", Tree("(2^3)^2"));
    }

    // SPEC §3: '^' binds tighter than unary minus.
    [Fact]
    public void UnaryMinusAppliesToThePower()
    {
        Assert.Equal("(neg (^ x 2))", Tree("-x^2"));
        Assert.Equal("(^ (neg x) 2)", Tree("(-x)^2"));
    }

    [Theory]
    [InlineData("2^-1", "(^ 2 (neg 1))")]
    [InlineData("2^-x^2", "(^ 2 (neg (^ x 2)))")]
    [InlineData("x^+2", "(^ x 2)")]
    public void ExponentMayStartWithASign(string text, string tree)
    {
        Assert.Equal(tree, Tree(text));
    }

    // Common practice: '*' and '/' bind tighter than '+' and '-', and all four associate to the left.
    [Theory]
    [InlineData("a+b*c", "(+ a (* b c))")]
    [InlineData("a*b+c", "(+ (* a b) c)")]
    [InlineData("a-b-c", "(- a b c)")]
    [InlineData("a/b/c", "(/ a b c)")]
    [InlineData("a/b*c", "(/* a b c)")]
    [InlineData("a-b+c", "(-+ a b c)")]
    [InlineData("a*b^c", "(* a (^ b c))")]
    [InlineData("-a*b", "(* (neg a) b)")]
    [InlineData("a*-b", "(* a (neg b))")]
    [InlineData("a - -b", "(- a (neg b))")]
    [InlineData("--a", "(neg (neg a))")]
    [InlineData("+a", "a")]
    [InlineData("-(a+b)*c", "(* (neg (+ a b)) c)")]
    [InlineData("((a))", "a")]
    public void OperatorsFollowTheUsualPrecedence(string text, string tree)
    {
        Assert.Equal(tree, Tree(text));
    }

    [Theory]
    [InlineData("α + β", "(+ α β)")]
    [InlineData("x_1*y2", "(* x_1 y2)")]
    [InlineData("_t", "_t")]
    [InlineData("Q + GF", "(+ Q GF)")] // field names are not reserved
    public void NamesMayUseUnderscoresDigitsAndGreekLetters(string text, string tree)
    {
        Assert.Equal(tree, Tree(text));
    }

    [Fact]
    public void NodesRecordOneBasedPositions()
    {
        var entry = Entry("  a + b*c = -x", 4);
        var sum = Assert.IsType<SumExpr>(entry.Left);
        Assert.Equal(new SourcePosition(4, 3), sum.Position);
        Assert.Equal(new SourcePosition(4, 5), sum.Terms[1].OperatorPosition);
        var product = Assert.IsType<ProductExpr>(sum.Terms[1].Value);
        Assert.Equal(new SourcePosition(4, 7), product.Position);
        Assert.Equal(new SourcePosition(4, 8), product.Factors[1].OperatorPosition);
        Assert.Equal(new SourcePosition(4, 13), entry.Right.Position);
    }

    [Fact]
    public void ParseIdentityReadsALabelledIdentity()
    {
        var result = CatalogueParser.ParseIdentity("sq: (x+1)^2 = x^2 + 2*x + 1");
        Assert.True(result.Success);
        Assert.Equal("sq", result.Value.Label);
        Assert.Equal(1, result.Value.Line);
    }

    [Theory]
    [InlineData("Q", "Q")]
    [InlineData(" GF(7) ", "GF(7)")]
    [InlineData("GF(2^8)", "GF(2^8)")]
    [InlineData("GF(3^1)", "GF(3)")]
    public void ParseFieldReadsAFieldOption(string text, string field)
    {
        var result = CatalogueParser.ParseField(text);
        Assert.True(result.Success, result.Error?.ToString());
        Assert.Equal(field, result.Value.ToString());
    }
}
