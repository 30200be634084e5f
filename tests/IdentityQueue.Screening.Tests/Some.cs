using System.Numerics;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Screening.Tests;

/// <summary>Small builders of sample data for the screening tests.</summary>
internal static class Some
{
    public const ulong Seed = 20261201;

    /// <summary>Parses one catalogue line; fails the test on a parse error.</summary>
    public static IdentityEntry Entry(string line)
    {
        var parsed = CatalogueParser.ParseIdentity(line);
        Assert.True(parsed.Success, $"parse failed: {parsed.Error}");
        return parsed.Value;
    }

    /// <summary>Compiles every instance of a line (one for a plain identity).</summary>
    public static IReadOnlyList<CompiledIdentity> Instances(string line)
    {
        var entry = Entry(line);
        var family = FamilyExpander.Expand(entry);
        Assert.True(family.Success, $"expansion failed: {family.Error}");
        return family.Instances.Select(p =>
        {
            var compiled = IdentityCompiler.Compile(entry, p);
            Assert.True(compiled.Success, $"compile failed: {compiled.Error}");
            return compiled.Value!;
        }).ToList();
    }

    public static CompiledIdentity Compiled(string line) => Assert.Single(Instances(line));

    public static ScreenResult Screen(string line, int targetBits = 64, ulong seed = Seed) =>
        Screener.Screen(Compiled(line), new ScreeningOptions { Target = EvidenceTarget.Create(targetBits).Value, Seed = seed }, candidateKey: 1);

    public static IReadOnlyList<ScreenResult> ScreenFamily(string line, int targetBits = 64, ulong seed = Seed) =>
        Instances(line).Select((c, i) => Screener.Screen(c, new ScreeningOptions { Target = EvidenceTarget.Create(targetBits).Value, Seed = seed }, (ulong)i)).ToList();

    public static BigInteger Param(CompiledIdentity c, string name) => c.Parameters[name];
}
