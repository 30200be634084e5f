using System.Numerics;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Tests.Compile;

/// <summary><c>for p prime in A..B</c> and <c>over GF(p)</c> with p a family parameter: one field per instance.</summary>
public class PrimeFamilyTests
{
    private static IdentityEntry Entry(string line)
    {
        var parsed = CatalogueParser.ParseIdentity(line);
        Assert.True(parsed.Success, parsed.Error?.ToString());
        return parsed.Value;
    }

    // π(100) = 25 (OEIS A000720; common practice); the primes below 20 are 2, 3, 5, 7, 11, 13, 17, 19.
    [Fact]
    public void PrimeRange_ExpandsToThePrimesOfTheRange()
    {
        Assert.Equal(25, FamilyExpander.Expand(Entry("x = x for p prime in 1..100")).Instances.Count);
        var small = FamilyExpander.Expand(Entry("x = x for p prime in -5..20")).Instances.Select(i => (int)i["p"]);
        Assert.Equal([2, 3, 5, 7, 11, 13, 17, 19], small);
        // a later range may use the prime, and a prime range may follow another
        var pairs = FamilyExpander.Expand(Entry("x = x for n in 1..3, p prime in n..2*n")).Instances.Select(i => ((int)i["n"], (int)i["p"]));
        Assert.Equal([(1, 2), (2, 2), (2, 3), (3, 3), (3, 5)], pairs);
    }

    [Fact]
    public void NoPrimeInTheRange_IsAnEmptyFamily()
    {
        var expansion = FamilyExpander.Expand(Entry("x = x for p prime in 24..28"));
        Assert.False(expansion.Success);
        Assert.Contains("no instances", expansion.Error!.Message);
    }

    [Fact]
    public void FieldOfAParameter_IsBoundPerInstance()
    {
        var entry = Entry("(x+y)^p = x^p + y^p over GF(p) for p prime in 2..13");
        Assert.Equal("GF(p)", entry.Field.ToString());
        foreach (var instance in FamilyExpander.Expand(entry).Instances)
        {
            var compiled = IdentityCompiler.Compile(entry, instance);
            Assert.True(compiled.Success, compiled.Error?.ToString());
            Assert.Equal(FieldSpec.Finite(instance["p"]).Value, compiled.Value!.Field);
        }
        Assert.Equal("GF(5^2)", Entry("x = x over GF(p^2) for p prime in 2..5").Field.Bind(new Dictionary<string, BigInteger> { ["p"] = 5 }, 4096).Value.ToString());
    }

    [Fact]
    public void CompositeCharacteristic_IsACompileErrorOfThatInstance()
    {
        var entry = Entry("x = x over GF(p) for p in 2..4");
        var compiled = IdentityCompiler.Compile(entry, new Dictionary<string, BigInteger> { ["p"] = 4 });
        Assert.False(compiled.Success);
        Assert.Equal(new SourcePosition(1, 15), compiled.Error!.Position);
        Assert.Contains("GF(p) needs a prime p, but p = 4", compiled.Error.Message);
    }

    [Theory]
    [InlineData("x = x over GF(q) for p prime in 2..5", 15, "'q' must be a parameter of this family line")]
    [InlineData("x = x over GF(p)", 15, "'p' must be a parameter of this family line")]
    [InlineData("x = x over GF(p^0) for p prime in 2..5", 17, "")]
    public void FieldParameter_MustBeAFamilyParameter(string line, int column, string fragment)
    {
        var parsed = CatalogueParser.ParseIdentity(line);
        Assert.False(parsed.Success);
        Assert.Equal(column, parsed.Error!.Position.Column);
        Assert.Contains(fragment, parsed.Error.Message);
    }

    [Fact]
    public void PrintedEntry_KeepsThePrimeRangeAndTheFieldParameter()
    {
        const string line = "wilson: fact(p - 1) = -1 over GF(p) for p prime in 2..30";
        Assert.Equal(line, ExprPrinter.Print(Entry(line)));
    }
}
