using Microsoft.Extensions.Logging.Abstractions;

namespace IdentityQueue.Worker.Tests;

/// <summary>The worker's side of recovery: the heartbeat service on a shared store, and claims returned at a stop.</summary>
public sealed class RecoveryTests
{
    /// <summary>Waits until <paramref name="condition"/> holds; the limit only turns a stuck run into a clear failure.</summary>
    private static void WaitFor(Func<bool> condition, string what)
    {
        var limit = DateTime.UtcNow + TimeSpan.FromMinutes(2);
        while (!condition())
        {
            Assert.True(DateTime.UtcNow < limit, $"waited too long for {what}");
            Thread.Sleep(5);
        }
    }

    [Fact]
    public async Task OnASharedStoreTheHeartbeatReturnsDeadWorkersClaimsAndSignsOffAtTheEnd()
    {
        // A dead worker's chunk (claimed, never saved) goes back to pending at a live worker's next beat (the fake's
        // RecoverShared returns every claim: here every other worker is dead); the live worker signs off when it stops.
        var store = Some.Store();
        var dead = store.Claim([1, 2, 3], "dead:9");
        Assert.Equal(3, dead.Count);
        var settings = Some.Settings() with { HeartbeatInterval = TimeSpan.FromMilliseconds(10) };
        var stats = new WorkerStats();
        stats.ChunkDone(5);
        var plan = new HostPlan(new QueueStorage(null, Npgsql.NpgsqlDataSource.Create("Host=unused")), "unused.log", Serilog.Events.LogEventLevel.Warning, false);
        var service = new HeartbeatService(store, store, settings, stats, plan, NullLogger<HeartbeatService>.Instance);
        await service.StartAsync(CancellationToken.None);
        Assert.True(store.Workers.ContainsKey("test:1"));
        WaitFor(() => store.Counts().Screening == 0, "the dead worker's claims to be returned");
        Assert.Equal(7, store.Counts().Pending);
        WaitFor(() => store.Workers["test:1"].Chunks == 1, "a heartbeat with the counters");
        await service.StopAsync(CancellationToken.None);
        Assert.Equal((1, 1L, 5L, true), store.Workers["test:1"]);
        Assert.Equal(0, store.LiveThreads(settings.DeadAfter));
    }
}
