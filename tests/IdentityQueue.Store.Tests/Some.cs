using IdentityQueue.Algebra.Compile;
using IdentityQueue.Screening;
using IdentityQueue.Store.Work;

namespace IdentityQueue.Store.Tests;

/// <summary>Small builders of sample data for the store tests.</summary>
internal static class Some
{
    public const string Worker = "test-worker";

    /// <summary>Loads, binds, compiles and screens a stored candidate as a worker would, continuing after its stored trials.</summary>
    public static ScreenResult Screen(TempStore store, long candidateId, int targetBits = 64)
    {
        var candidates = new CandidateStore(store.Connection);
        var candidate = candidates.LoadCandidate(candidateId);
        Assert.NotNull(candidate);
        var bound = candidate.Bind();
        Assert.True(bound.Success, bound.Error);
        var compiled = IdentityCompiler.Compile(bound.Entry!, bound.Parameters);
        Assert.True(compiled.Success, compiled.Error?.ToString());
        var options = new ScreeningOptions { Target = EvidenceTarget.Create(targetBits).Value, Seed = candidate.Seed.Value };
        return Screener.Screen(compiled.Value!, options, candidate.TrialKey(bound), candidates.LoadTrials(candidateId));
    }

    /// <summary>Imports one catalogue text as <c>c.idq</c> with a fixed seed.</summary>
    public static void Catalogue(TempStore store, string text) =>
        store.Import(store.File("c.idq", text), new Store.Import.ImportOptions { Seed = 20261201 });

    public static long Id(TempStore store, string label) => store.Count($"SELECT id FROM candidate WHERE label = '{label}'");
}
