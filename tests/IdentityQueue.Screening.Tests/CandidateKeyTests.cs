using System.Numerics;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Screening.Tests;

/// <summary>
/// SPEC §5: every trial's prime and point derive from (seed, the candidate's canonical identity, trial number). The key
/// depends on what the identity says, not on how it was spelled or where it is stored.
/// </summary>
public sealed class CandidateKeyTests
{
    private static ulong Key(string line, params (string Name, int Value)[] parameters)
    {
        var parsed = CatalogueParser.ParseIdentity(line);
        Assert.True(parsed.Success, parsed.Error?.ToString());
        return CandidateKey.Of(parsed.Value!, parameters.ToDictionary(p => p.Name, p => (BigInteger)p.Value, StringComparer.Ordinal));
    }

    [Fact]
    public void SpacingParenthesesLabelsAndRangesDoNotChangeTheKey()
    {
        var plain = Key("(x+y)^2 = x^2 + 2*x*y + y^2");
        Assert.Equal(plain, Key("sq:   ( x + y ) ^ 2   =   x^2+2*x*y+y^2"));
        Assert.Equal(plain, Key("((x+y))^2 = ((x^2 + 2*x*y) + y^2)"));
        // a family instance is keyed by its parameter values, not by the range it came from
        Assert.Equal(Key("x^n = x^n for n in 1..9", ("n", 3)), Key("x^n = x^n for n in 3..3", ("n", 3)));
    }

    [Fact]
    public void WhatTheIdentitySaysChangesTheKey()
    {
        var plain = Key("(x+y)^2 = x^2 + 2*x*y + y^2");
        Assert.NotEqual(plain, Key("(x+y)^2 = x^2 + 2*x*y + y^2 over GF(7)"));
        Assert.NotEqual(plain, Key("x^2 + 2*x*y + y^2 = (x+y)^2"));
        Assert.NotEqual(plain, Key("(x+z)^2 = x^2 + 2*x*z + z^2"));
        Assert.NotEqual(Key("x^n = x^n", ("n", 3)), Key("x^n = x^n", ("n", 4)));
        Assert.NotEqual(Key("x^n = x^n", ("n", 3)), Key("x^n = x^n", ("m", 3)));
    }

    [Fact]
    public void CanonicalTextListsParametersInOrdinalOrder()
    {
        var parsed = CatalogueParser.ParseIdentity("a*x = x*a over GF(5)").Value!;
        var parameters = new Dictionary<string, BigInteger>(StringComparer.Ordinal) { ["n"] = 2, ["k"] = -1 };
        Assert.Equal("a*x = x*a over GF(5) | k=-1, n=2", CandidateKey.Canonical(parsed, parameters));
    }

    [Fact]
    public void RunSeedsAreValidatedWhereTheyEnter()
    {
        Assert.Equal(42UL, RunSeed.Parse("42").Value.Value);
        Assert.Equal(RunSeed.Max, RunSeed.FromUser(RunSeed.Max).Value.Value);
        var tooBig = RunSeed.FromUser(RunSeed.Max + 1);
        Assert.False(tooBig.Success);
        Assert.Contains("2^63 - 1", tooBig.Error.Message);
        var negative = RunSeed.Parse("-1");
        Assert.False(negative.Success);
        Assert.Contains("whole number", negative.Error.Message);
        Assert.Throws<ArgumentOutOfRangeException>(() => RunSeed.FromStored(-5));
        for (var i = 0; i < 100; i++) Assert.True(RunSeed.Random().Value <= RunSeed.Max);
    }
}
