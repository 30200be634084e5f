using IdentityQueue.Algebra;
using IdentityQueue.Screening;
using IdentityQueue.Screening.Ports;
using IdentityQueue.Store.Work;

namespace IdentityQueue.Store.Tests.Work;

/// <summary>The worker's ports as the store implements them, on a real SQLite file.</summary>
public sealed class StoreWorkPortsTests
{
    [Fact]
    public void AClaimParsesAFamilysSidesOncePerChunk()
    {
        // #14 point 9: the instances of a family store the same sides and differ in their parameters; one claim parses them
        // once. x^n = x^(n*n) is true for n = 0 and 1 only (worked by hand: x^2 ≠ x^4, x^3 ≠ x^9).
        using var store = TempStore.Create();
        Some.Catalogue(store, "squares: x^n = x^(n*n) for n in 0..3\nsingle: x + 1 = 1 + x\n");
        var ports = new StoreWorkPorts(store.Connection.Location, Limits.Default);
        var planned = ports.TakePending(ScreeningPolicy.Default.Stages, 100);
        Assert.Equal(WorkStage.FirstTrial, planned.Stage);
        Assert.Equal(5, planned.Ids.Length);
        var claimed = ports.Claim(planned.Ids, Some.Worker);
        Assert.Equal(5, claimed.Count);
        var family = claimed.Where(c => c.Label!.StartsWith("squares", StringComparison.Ordinal)).ToList();
        Assert.Equal(4, family.Count);
        Assert.All(family, c => Assert.Same(family[0].Entry!.Left, c.Entry!.Left));
        string[] parameters = ["0", "1", "2", "3"];
        Assert.Equal(parameters, family.Select(c => c.Parameters["n"].ToString()));
        Assert.Equal(4, family.Select(c => c.Key).Distinct().Count()); // each instance keeps its own trial key

        var sides = new StoredSides();
        var candidates = new CandidateStore(store.Connection);
        foreach (var id in planned.Ids) Assert.True(candidates.LoadCandidate(id)!.Bind(Limits.Default, sides).Success);
        Assert.Equal(2, sides.Parses);
    }

    [Fact]
    public void StagesAreScreeningsAndTheStoreSelectsByTheStoredCount()
    {
        // A stage is a range of result.trials_zero handed over by Screening (ScreeningPolicy.Stages); the store only selects.
        using var store = TempStore.Create();
        Some.Catalogue(store, "a: x + 1 = 1 + x\nb: x*y = y*x\n");
        store.Execute("UPDATE result SET trials_zero = 2 WHERE candidate_id = (SELECT id FROM candidate WHERE label = 'b')");
        var ports = new StoreWorkPorts(store.Connection.Location, Limits.Default);
        var onlyLater = ports.TakePending([WorkStage.Rest], 10);
        Assert.Equal(WorkStage.Rest, onlyLater.Stage);
        Assert.Equal(new[] { Some.Id(store, "b") }, onlyLater.Ids.ToArray());
        var custom = new WorkStage(7, 0, 0);
        var first = ports.TakePending([custom], 10);
        Assert.Equal(custom, first.Stage);
        Assert.Equal(new[] { Some.Id(store, "a") }, first.Ids.ToArray());
        Assert.Empty(ports.TakePending(ScreeningPolicy.Default.Stages, 10).Ids);
    }

    [Fact]
    public void RaisingTheTargetReopensOnlySurvivorsShortOfIt()
    {
        // The error bound stored is log2 of the bound; a target of 2^-B means a bound of at most -B (EvidenceTarget.BoundLog2).
        using var store = TempStore.Create();
        Some.Catalogue(store, "a: x + 1 = 1 + x\nb: x*y = y*x\n");
        store.Execute("UPDATE result SET state = 'survived', error_bound_log2 = -70 WHERE candidate_id = (SELECT id FROM candidate WHERE label = 'a')");
        store.Execute("UPDATE result SET state = 'survived', error_bound_log2 = -130 WHERE candidate_id = (SELECT id FROM candidate WHERE label = 'b')");
        Assert.Equal(1, new WorkQueue(store.Connection).RaiseTarget(EvidenceTarget.Create(128).Value));
        Assert.Equal(1, store.Count("SELECT count(*) FROM result WHERE state = 'pending'"));
        Assert.Equal(128, store.Count("SELECT min(target_bits) FROM catalogue"));
        Assert.Equal(EvidenceTarget.Create(128).Value, new CandidateStore(store.Connection).LoadCandidate(Some.Id(store, "a"))!.Target);
    }

    [Fact]
    public void TheRetryRunsACallAgainOnlyWhileTheErrorIsTransient()
    {
        // The decorator's rule, without a server: transient errors are retried within the time allowed, others thrown at once.
        var calls = 0;
        var retry = new StoreRetry(e => e is TimeoutException, TimeSpan.FromMinutes(1), "test", null, null, null);
        Assert.Equal(3, retry.Run(() => ++calls < 3 ? throw new TimeoutException() : calls));
        calls = 0;
        Assert.Throws<FormatException>(() => retry.Run(() => { calls++; throw new FormatException(); }));
        Assert.Equal(1, calls);
        Assert.True(StoreRetry.IsTransient(new StoreUnavailableException("away", new System.Net.Sockets.SocketException())));
        Assert.False(StoreRetry.IsTransient(new InvalidOperationException("bad SQL")));
    }
}
