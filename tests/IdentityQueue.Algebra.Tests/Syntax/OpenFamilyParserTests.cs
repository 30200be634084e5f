using System.Numerics;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Tests.Syntax;

/// <summary>Open-ended families, <c>for n &gt;= A</c> (SPEC §3): the parse, the printed line, the first instances, and the positioned refusals.</summary>
public class OpenFamilyParserTests
{
    private static IdentityEntry Entry(string line)
    {
        var result = CatalogueParser.ParseLine(line, 3);
        Assert.True(result.Success, result.Error?.ToString());
        return result.Value!;
    }

    [Fact]
    public void MosersCircleLineIsAnOpenFamilyInN()
    {
        // Moser's circle problem as R. K. Guy states it ("The strong law of small numbers", Amer. Math. Monthly 95 (1988)).
        var entry = Entry("regions: sum(k in 0..4: binom(n-1, k)) = 2^(n-1) for n >= 1");

        var open = Assert.IsType<ParameterRange>(entry.OpenParameter);
        Assert.Equal("n", open.Name);
        Assert.True(open.OpenEnded);
        Assert.False(open.PrimesOnly);
        Assert.Equal("1", TreeText.Of(open.From));
        Assert.Equal(new SourcePosition(3, 54), open.Position);
        Assert.True(entry.IsFamily);
        Assert.Equal("regions: sum(k in 0..4: binom(n - 1, k)) = 2^(n - 1) for n >= 1", ExprPrinter.Print(entry));
    }

    [Fact]
    public void ClosedFamilyHasNoOpenParameter()
    {
        var entry = Entry("x^n = x^n for n in 1..3");
        Assert.Null(entry.OpenParameter);
        Assert.False(entry.Parameters[0].OpenEnded);
    }

    [Fact]
    public void StartMayBeAnIntegerExpression()
    {
        var entry = Entry("x^n = x^n for n >= 2*3 - 1");
        var expansion = FamilyExpander.Expand(entry, openInstances: 3);
        Assert.True(expansion.Success, expansion.Error?.ToString());
        Assert.Equal([5, 6, 7], expansion.Instances.Select(i => (int)i["n"]));
    }

    [Fact]
    public void ExpanderGivesTheFirstChunkInIncreasingN()
    {
        var entry = Entry("regions: sum(k in 0..4: binom(n-1, k)) = 2^(n-1) for n >= 1");

        Assert.Equal([BigInteger.One], FamilyExpander.Expand(entry).Instances.Select(i => i["n"]));
        Assert.Equal(Enumerable.Range(1, 8).Select(v => new BigInteger(v)), FamilyExpander.Expand(entry, openInstances: 8).Instances.Select(i => i["n"]));
    }

    [Fact]
    public void ExpandedInstancesCompileToTheMoserValues()
    {
        // R. K. Guy (1988): the circle is cut into 1, 2, 4, 8, 16, 31 regions for n = 1..6 points, while 2^(n-1) = 32 at n = 6.
        var entry = Entry("regions: sum(k in 0..4: binom(n-1, k)) = 2^(n-1) for n >= 1");
        long[] regions = [1, 2, 4, 8, 16, 31];
        foreach (var instance in FamilyExpander.Expand(entry, openInstances: 6).Instances)
        {
            var n = (int)instance["n"];
            var left = ParameterEvaluator.EvaluateInteger(entry.Left, instance, Limits.Default, "lhs");
            var right = ParameterEvaluator.EvaluateInteger(entry.Right, instance, Limits.Default, "rhs");
            Assert.Equal(regions[n - 1], (long)left);
            Assert.Equal(n < 6, left == right);
        }
    }

    public static TheoryData<string, string, int> Refusals => new()
    {
        // another parameter after the open-ended one: at the ','
        { "x = y for n >= 1, k in 1..2", "the open-ended parameter 'n >= …' must be the only parameter of its line", 17 },
        // an open-ended parameter after another: at its name
        { "x = y for k in 1..2, n >= 1", "the open-ended parameter 'n >= …' must be the only parameter of its line", 22 },
        { "x = y for n >= 1, m >= 2", "the open-ended parameter 'n >= …' must be the only parameter of its line", 17 },
        { "x = y for n prime >= 2", "an open-ended parameter cannot take only primes", 19 },
        { "x = y over GF(p) for p >= 2", "the field GF(p) cannot use the open-ended parameter 'p'", 15 },
        { "x = y for n >= 1 .. 5", "unexpected '..' after the range of 'n'", 18 },
        { "x = y for n >=", "expected an expression after '>=', found end of line", 15 },
        { "x = y for n >= 1 over Q", "the 'over FIELD' clause must come before the 'for' clause", 18 },
    };

    [Theory]
    [MemberData(nameof(Refusals))]
    public void RefusedLineGivesMessageAtColumn(string line, string message, int column)
    {
        var result = CatalogueParser.ParseLine(line, 9);

        Assert.False(result.Success);
        Assert.Contains(message, result.Error!.Message);
        Assert.Equal(new SourcePosition(9, column), result.Error.Position);
    }
}
