using System.Numerics;
using System.Text.Json;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Exact;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Tests.Compile;

/// <summary>
/// The integer and number functions against outside values: the fixture tests/fixtures/number-functions.jsonl is made by
/// make_number_functions_fixture.py from Debian's python3-sympy (fibonacci, lucas, stirling, harmonic, bernoulli, catalan,
/// multinomial_coefficients, floor, ceiling, Mod, igcd, Abs, KroneckerDelta), and a few published tables and formulas.
/// </summary>
public class NumberFunctionTests
{
    private static readonly Dictionary<string, BigInteger> NoScope = new();

    private sealed record Row(string Expr, string Value);

    public static TheoryData<string, string> Fixture()
    {
        var data = new TheoryData<string, string>();
        var path = Path.Combine(AppContext.BaseDirectory, "fixtures", "number-functions.jsonl");
        var options = new JsonSerializerOptions { PropertyNameCaseInsensitive = true };
        foreach (var line in File.ReadLines(path))
            if (line.Length > 0)
            {
                var row = JsonSerializer.Deserialize<Row>(line, options)!;
                data.Add(row.Expr, row.Value);
            }
        return data;
    }

    private static Rational Evaluate(string text, IReadOnlyDictionary<string, BigInteger>? scope = null)
    {
        var parsed = CatalogueParser.ParseExpression(text);
        Assert.True(parsed.Success, parsed.Error?.ToString());
        return ParameterEvaluator.EvaluateRational(parsed.Value, scope ?? NoScope, Limits.Default, "the test");
    }

    private static string Text(Rational r) => r.IsInteger ? r.Numerator.ToString() : $"{r.Numerator}/{r.Denominator}";

    [Fact]
    public void FixtureIsThere_AndCoversEveryFunction()
    {
        var exprs = Fixture().Select(row => (string)row[0]).ToList();
        Assert.True(exprs.Count > 1500);
        foreach (var f in Builtins.ParameterFunctions.Where(f => f != Builtins.Iverson))
            Assert.Contains(exprs, e => e.StartsWith(f + "(", StringComparison.Ordinal));
    }

    [Theory]
    [MemberData(nameof(Fixture))]
    public void Value_EqualsSympy(string expr, string expected) => Assert.Equal(expected, Text(Evaluate(expr)));

    [Fact]
    public void CompiledConstant_EqualsTheExactValue()
    {
        // The compiler folds a number function to one constant: bernoulli(10) = 5/66 (sympy, and the classical table).
        var entry = CatalogueParser.ParseIdentity("x*bernoulli(10) = x*5/66").Value;
        var compiled = IdentityCompiler.Compile(entry);
        Assert.True(compiled.Success, compiled.Error?.ToString());
        Assert.Contains(Rational.Create(5, 66), compiled.Value!.Program.Constants);
        Assert.Equal(1, compiled.Value.Bounds.Degree);
    }

    [Theory]
    // Iverson bracket and conditions: [n ≤ k] etc. (common practice).
    [InlineData("iverson(3 < 4)", "1")]
    [InlineData("iverson(4 < 4)", "0")]
    [InlineData("iverson(4 <= 4)", "1")]
    [InlineData("iverson(5 > 4)", "1")]
    [InlineData("iverson(4 >= 5)", "0")]
    [InlineData("iverson(2*3 = 6)", "1")]
    [InlineData("iverson(2*3 != 6)", "0")]
    [InlineData("iverson(1 < 2 and 3 < 2)", "0")]
    [InlineData("iverson(1 < 2 and 2 < 3)", "1")]
    [InlineData("iverson(1 > 2 and 1 > 2 or 1 < 2)", "1")]  // 'and' binds tighter: (F and F) or T
    [InlineData("iverson(1 < 2 or 1 > 2 and 1 > 2)", "1")]  // T or (F and F)
    [InlineData("iverson(1 > 2 or 1 > 2 and 1 < 2)", "0")]
    [InlineData("when(1 < 2, 7, fact(-1))", "7")]          // the other branch is never evaluated
    [InlineData("when(2 < 1, 1/0, 8)", "8")]
    [InlineData("min(3, -1, 2)", "-1")]
    [InlineData("max(3, -1, 7/2)", "7/2")]
    [InlineData("gcd(12, 18, 8)", "2")]
    [InlineData("floor(-1/3) + ceil(1/3)", "0")]
    public void IntegerFunctions_FollowTheirDefinitions(string expr, string expected) => Assert.Equal(expected, Text(Evaluate(expr)));

    [Theory]
    // Negafibonacci: F(−n) = (−1)^(n+1)·F(n), L(−n) = (−1)^n·L(n) (Knuth, TAOCP vol. 1, §1.2.8 ex. 8 [memory]); checked far beyond the fixture.
    [InlineData(1000)]
    [InlineData(2001)]
    public void NegativeIndices_FollowTheReflectionFormulas(int n)
    {
        var f = NumberFunctions.Fibonacci(n, Limits.Default);
        Assert.Equal(n % 2 == 1 ? f : -f, NumberFunctions.Fibonacci(-n, Limits.Default));
        var l = NumberFunctions.Lucas(n, Limits.Default);
        Assert.Equal(n % 2 == 0 ? l : -l, NumberFunctions.Lucas(-n, Limits.Default));
        // L(n) = F(n−1) + F(n+1) and F(2n) = F(n)·L(n) (Vajda, "Fibonacci & Lucas numbers", 1989, formulas (6) and (13) [memory]).
        Assert.Equal(NumberFunctions.Fibonacci(n - 1, Limits.Default) + NumberFunctions.Fibonacci(n + 1, Limits.Default), l);
        Assert.Equal(f * l, NumberFunctions.Fibonacci(2 * n, Limits.Default));
    }

    [Fact]
    public void StirlingNumbers_SumToFactorialAndBell()
    {
        // Σ_k [n,k] = n! (permutations by cycles) and Σ_k {n,k} = Bell(n); Bell(25) = 4638590332229999353 (OEIS A000110 [memory]).
        BigInteger first = 0, second = 0;
        for (var k = 0; k <= 25; k++)
        {
            first += NumberFunctions.Stirling1(25, k, Limits.Default);
            second += NumberFunctions.Stirling2(25, k, Limits.Default);
        }
        Assert.Equal(Enumerable.Range(1, 25).Aggregate(BigInteger.One, (a, i) => a * i), first);
        Assert.Equal(BigInteger.Parse("4638590332229999353"), second);
    }

    [Fact]
    public void Limits_AreCheckedBeforeTheWork()
    {
        var small = Limits.Default with { MaxNumberFunctionWork = 100, MaxParameterBits = 64 };
        Assert.Contains("MaxNumberFunctionWork", Assert.Throws<NumberFunctionException>(() => NumberFunctions.Stirling2(100, 50, small)).Message);
        Assert.Contains("MaxParameterBits", Assert.Throws<NumberFunctionException>(() => NumberFunctions.Fibonacci(200, small)).Message);
        Assert.Contains("MaxParameterBits", Assert.Throws<NumberFunctionException>(() => NumberFunctions.Catalan(60, small)).Message);
        Assert.Contains("MaxParameterBits", Assert.Throws<NumberFunctionException>(() => NumberFunctions.Multinomial([40, 40], small)).Message);
        // F(92) < 2^63 fits; {n, 1} = 1 for any n needs no big numbers, only the (few) table cells.
        Assert.Equal(BigInteger.Parse("7540113804746346429"), NumberFunctions.Fibonacci(92, small));
        Assert.Equal(BigInteger.One, NumberFunctions.Stirling2(40, 1, small));
        Assert.Equal(BigInteger.One, NumberFunctions.Stirling1(BigInteger.Pow(10, 12), BigInteger.Pow(10, 12), small)); // [n, n] = 1 without a table
    }
}
