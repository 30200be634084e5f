using System.Numerics;
using System.Text;
using IdentityQueue.Algebra;
using IdentityQueue.Screening.Catalogues;

namespace IdentityQueue.Screening.Tests.Catalogues;

/// <summary>
/// Open-ended families in the three formats (SPEC §3): <c>for n &gt;= A</c> in <c>.idq</c> and in a <c>.csv</c> "for"
/// column, <c>"for": {"n": [A, null]}</c> in <c>.jsonl</c>; each gives its first chunk, within the open family budget.
/// </summary>
public sealed class OpenFamilyReaderTests
{
    private const string Moser = "sum(k in 0..4: binom(n-1, k))"; // R. K. Guy (1988), Moser's circle problem

    private static List<CatalogueLine> Read(string fileName, string text, OpenFamilyBudget? budget = null)
    {
        var reader = new CatalogueReader(fileName, Limits.Default, budget);
        using var stream = new MemoryStream(Encoding.UTF8.GetBytes(text));
        return [.. reader.Read(stream)];
    }

    private static void AssertFirstChunk(CatalogueEntry entry, int first, int count, OpenFamilyBudget budget)
    {
        Assert.Equal(new OpenFamily("n", first, budget), entry.Open);
        Assert.Equal(Enumerable.Range(first, count).Select(v => $"regions[n={v}]"), entry.Instances.Select(i => i.Label));
        Assert.Equal(Enumerable.Range(first, count).Select(v => new BigInteger(v)), entry.Instances.Select(i => i.Parameters.Single().Value));
    }

    [Fact]
    public void Idq_OpenFamilyGivesItsFirstChunkOfEight()
    {
        var lines = Read("c.idq", $"regions: {Moser} = 2^(n-1) for n >= 1\npow: x^n = x^n for n in 1..3\n");
        AssertFirstChunk(lines[0].Read.Value!, 1, OpenFamilyBudget.DefaultChunk, OpenFamilyBudget.Default);
        Assert.Null(lines[1].Read.Value!.Open);
    }

    [Fact]
    public void Jsonl_NullUpperBoundIsOpenEnded()
    {
        var lines = Read("c.jsonl", $$$"""
            {"label": "regions", "lhs": "{{{Moser}}}", "rhs": "2^(n-1)", "for": {"n": [1, null]}}
            {"label": "regions2", "lhs": "x", "rhs": "x", "for": {"n": [null, 3]}}
            {"label": "regions3", "lhs": "x", "rhs": "x", "for": {"n": [1, null], "k": [1, 2]}}
            {"label": "regions4", "lhs": "x", "rhs": "x", "for": "n >= 4"}
            """);
        AssertFirstChunk(lines[0].Read.Value!, 1, 8, OpenFamilyBudget.Default);
        Assert.Equal("line 2: \"for\": the ends of \"n\" must be integers or expression strings (or null for no end: [1, null] is n >= 1)",
            lines[1].Read.Error!.ToString());
        // Counted in the line built from the fields, the ',' after "n >= 1" is in the field "for.n" (at its end).
        Assert.Equal("line 3, column 2 of \"for.n\": the open-ended parameter 'n >= …' must be the only parameter of its line; " +
            "give the others ranges in a line of their own, or give 'n' a range 'in A..B'", lines[2].Read.Error!.ToString());
        Assert.Equal(new OpenFamily("n", 4, OpenFamilyBudget.Default), lines[3].Read.Value!.Open);
    }

    [Fact]
    public void Csv_ForColumnTakesTheIdqText()
    {
        var lines = Read("c.csv", $"label,lhs,rhs,for\nregions,\"{Moser}\",2^(n-1),n >= 1\nbad,x,x,\"n >= 1, k in 1..2\"\n");
        AssertFirstChunk(lines[1].Read.Value!, 1, 8, OpenFamilyBudget.Default);
        Assert.StartsWith("line 3, column 7 of \"for\": the open-ended parameter 'n >= …' must be the only parameter", lines[2].Read.Error!.ToString());
    }

    [Fact]
    public void FirstChunkStaysWithinTheBudget()
    {
        var budget = OpenFamilyBudget.Create(5).Value;
        var lines = Read("c.idq", $"regions: {Moser} = 2^(n-1) for n >= 1\n", budget);
        AssertFirstChunk(lines[0].Read.Value!, 1, 5, budget);
    }

    [Fact]
    public void Budget_IsValidatedAndCountsChunks()
    {
        Assert.False(OpenFamilyBudget.Create(0).Success);
        Assert.False(OpenFamilyBudget.Create(Limits.Default.MaxFamilySize + 1).Success);
        Assert.False(OpenFamilyBudget.Create(10, 0).Success);
        var budget = OpenFamilyBudget.Create(20).Value;
        Assert.Equal((8, 8, 4, 0), (budget.NextChunk(0), budget.NextChunk(8), budget.NextChunk(16), budget.NextChunk(20)));
        Assert.Equal((64, 8), (OpenFamilyBudget.Default.Instances, OpenFamilyBudget.Default.Chunk));
    }

    [Fact]
    public void OpenFamilyFarFromZeroIsRejected()
    {
        var lines = Read("c.idq", "far: x^n = x^n for n >= 2^63\n");
        Assert.Contains("an open-ended family starts at most 2^62 away from 0", lines[0].Read.Error!.ToString());
        Assert.StartsWith("line 1, column 20", lines[0].Read.Error!.ToString());
    }
}
