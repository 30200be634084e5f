using System.Globalization;
using System.Numerics;
using System.Text;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Tests.Syntax;

/// <summary>Printing trees back as catalogue text: minimal parentheses, and printing is a fixed point of parse-then-print.</summary>
public class ExprPrinterTests
{
    private static Expr Parse(string text)
    {
        var result = CatalogueParser.ParseExpression(text);
        Assert.True(result.Success, result.Error?.ToString());
        return result.Value;
    }

    [Theory]
    [InlineData("-x^2", "-x^2")]
    [InlineData("(-x)^2", "(-x)^2")]
    [InlineData("-(x^2)", "-x^2")]
    [InlineData("a-(b-c)", "a - (b - c)")]
    [InlineData("(a-b)-c", "a - b - c")]
    [InlineData("a+(b+c)", "a + (b + c)")]
    [InlineData("a/(b*c)", "a/(b*c)")]
    [InlineData("(a/b)*c", "a/b*c")]
    [InlineData("a*(b/c)", "a*(b/c)")]
    [InlineData("2^3^2", "2^3^2")]
    [InlineData("2^(3^2)", "2^3^2")]
    [InlineData("(2^3)^2", "(2^3)^2")]
    [InlineData("2^(-1)", "2^-1")]
    [InlineData("x^(n+1)", "x^(n + 1)")]
    [InlineData("x^(2*n)", "x^(2*n)")]
    [InlineData("-(a*b)", "-(a*b)")]
    [InlineData("(-a)*b", "-a*b")]
    [InlineData("a*(-b)", "a*-b")]
    [InlineData("a-(-b)", "a - -b")]
    [InlineData("-(-x)", "--x")]
    [InlineData("-(a+b)", "-(a + b)")]
    [InlineData("(a+b)*(c-d)", "(a + b)*(c - d)")]
    [InlineData("((((x))))", "x")]
    [InlineData("a[i,j] + x[ i+1 ]", "a[i,j] + x[i + 1]")]
    [InlineData("binom(n,k)", "binom(n, k)")]
    [InlineData("sum(k in 0..n-1: q^k)", "sum(k in 0..n - 1: q^k)")]
    [InlineData("prod(i in 1..n: (1-q^i))", "prod(i in 1..n: 1 - q^i)")]
    [InlineData("matrix(i in 1..n,j in 1..n: x[i]^(j-1))", "matrix(i in 1..n, j in 1..n: x[i]^(j - 1))")]
    [InlineData("det([[a,b],[c,d]])", "det([[a, b], [c, d]])")]
    [InlineData("(x[1])^2", "x[1]^2")]
    [InlineData("(fact(n))^2", "fact(n)^2")]
    [InlineData("iverson(k<=n-1)", "iverson(k <= n - 1)")]
    [InlineData("when(i=1,x,when(i!=2,y,z))", "when(i = 1, x, when(i != 2, y, z))")]
    [InlineData("min(a,b,c)+gcd(n,k)", "min(a, b, c) + gcd(n, k)")]
    [InlineData("q^(-1)", "q^-1")]
    [InlineData("iverson(0<=k and k<=n or n<0)", "iverson(0 <= k and k <= n or n < 0)")]
    public void PrintsWithMinimalParentheses(string text, string printed)
    {
        Assert.Equal(printed, ExprPrinter.Print(Parse(text)));
    }

    public static TheoryData<string> RoundTripTexts => new()
    {
        "-x^2", "(-x)^2", "a-(b-c)", "a/(b*c)", "2^3^2", "(2^3)^2", "2^-x^2", "-(a-b)*-(c/d)^-e",
        "(a^2+b^2)*(c^2+d^2) - ((a*c-b*d)^2 + (a*d+b*c)^2)",
        "sum(k in 0..n: binom(n,k)*x^k*y^(n-k))",
        "det(matrix(i in 1..3, j in 1..3: x[i]^(j-1))) - prod(i in 1..3: prod(j in i+1..3: x[j]-x[i]))",
        "qbinom(n, k, q) - (qbinom(n-1, k-1, q) + q^k*qbinom(n-1, k, q))",
        "transpose([[1, 2], [3, 4]])^2 - 2*id(2)",
        "a/b/c/(d/e)", "a - b - (c - d) - -e", "((a+b)^(c+d))^(e^f)",
        "iverson(n - 1 < k*2) + when(n >= 2, x^(k-n), -1) - delta(i, j)*mod(n, 3)",
        "fib(n-1)*fib(n+1) - fib(n)^2 - (-1)^n", "when(i < j and j <= n or i = n and n != 0 or 1 > 2, x, y)", "floor(n/2) + ceil((n+1)/3) + abs(1 - n) + max(1, n, 2*n)",
        "stirling1(n, k) + stirling2(n, k) + harmonic(n) + bernoulli(2*n) + catalan(n) + multinomial(a, b, c) + lucas(-n)",
    };

    [Theory]
    [MemberData(nameof(RoundTripTexts))]
    public void ParsingThePrintedTextGivesTheSameTree(string text)
    {
        var tree = Parse(text);
        var printed = ExprPrinter.Print(tree);
        var reparsed = Parse(printed);

        Assert.Equal(TreeText.Of(tree), TreeText.Of(reparsed));
        Assert.Equal(printed, ExprPrinter.Print(reparsed));
    }

    [Fact]
    public void NegativeLiteralBuiltByHandIsParenthesisedAsABase()
    {
        var at = new SourcePosition(1, 1);
        var power = new BinaryExpr(BinaryOperator.Power, new IntegerLiteral(-3, at), new IntegerLiteral(2, at), at, at);
        Assert.Equal("(-3)^2", ExprPrinter.Print(power));
        var difference = new SumExpr([new SumTerm(new NameRef("x", at), false, at), new SumTerm(new IntegerLiteral(-3, at), true, at)], at);
        Assert.Equal("x - -3", ExprPrinter.Print(difference));
    }

    [Fact]
    public void PrintsAWholeEntry()
    {
        var entry = CatalogueParser.ParseLine("fam.1 :  x^p+y^p=(x+y)^p  over GF(2^8) for p in 2..2, k in 0..p # frobenius", 1).Value!;
        Assert.Equal("fam.1: x^p + y^p = (x + y)^p over GF(2^8) for p in 2..2, k in 0..p", ExprPrinter.Print(entry));
    }

    [Fact]
    public void EntryOverTheRationalsPrintsNoOverClause()
    {
        var entry = CatalogueParser.ParseLine("x = x over Q", 1).Value!;
        Assert.Equal("x = x", ExprPrinter.Print(entry));
    }

    [Fact]
    public void PrintedEntryParsesToTheSameEntry()
    {
        var entry = CatalogueParser.ParseLine("binomial: sum(k in 0..n: binom(n,k)) = 2^n over GF(7) for n in 0..5", 1).Value!;
        var printed = ExprPrinter.Print(entry);
        var again = CatalogueParser.ParseLine(printed, 1).Value!;
        Assert.Equal(printed, ExprPrinter.Print(again));
        Assert.Equal(entry.Label, again.Label);
        Assert.Equal(entry.Field, again.Field);
    }

    [Fact]
    public void WritesIntoAGivenBuilder()
    {
        var output = new StringBuilder("lhs: ");
        Parse("a+b").Accept(new ExprPrinter(output));
        Assert.Equal("lhs: a + b", output.ToString());
    }

    [Theory]
    [InlineData(1)]
    [InlineData(1_999)]
    [InlineData(2_000)]
    [InlineData(2_001)]
    [InlineData(4_000)]
    [InlineData(4_001)]
    [InlineData(12_345)]
    public void PrintsLongLiteralsDigitForDigit(int length)
    {
        var random = new Random(length);
        var digits = new char[length];
        for (var i = 0; i < length; i++) digits[i] = (char)('0' + random.Next(10));
        digits[0] = '7';
        // Runs of zeros inside exercise the padding of the lower halves.
        for (var i = length / 2; i < Math.Min(length, length / 2 + 2_100); i++) digits[i] = '0';
        var text = new string(digits);
        Assert.Equal(text, ExprPrinter.Print(Parse(text)));
    }

    [Theory]
    [InlineData(2_000)]
    [InlineData(4_000)]
    [InlineData(8_000)]
    public void PrintsPowersOfTenAndTheirNeighbours(int exponent)
    {
        var power = BigInteger.Pow(10, exponent);
        var at = new SourcePosition(1, 1);
        foreach (var value in new[] { power - 1, power, power + 1, -power })
            Assert.Equal(value.ToString(CultureInfo.InvariantCulture), ExprPrinter.Print(new IntegerLiteral(value, at)));
    }
}
