
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;

namespace IdentityQueue.Worker;

/// <summary>
/// One worker process on one SQLite store: holds the store's worker lock, recovers work claimed by a dead process,
/// rebuilds the queue from the store, and runs the Hangfire server until the batch is settled (<see cref="RunToCompletion"/>)
/// or until it is told to stop (<see cref="RunUntilStopped"/>). Not thread-safe; one per process.
/// </summary>
public sealed class WorkerSession : IDisposable
{
    private readonly StoreLock _lock;
    private readonly IHost _host;

    private WorkerSession(StoreLock storeLock, IHost host)
    {
        _lock = storeLock;
        _host = host;
    }

    public IScreeningStore Store => _host.Services.GetRequiredService<IScreeningStore>();

    /// <summary>Opens a session, or gives the reason it cannot (another worker holds the store).</summary>
    public static WorkerSession? Open(string storePath, WorkerSettings settings, bool longRunning, bool quiet,
        Action<IServiceCollection> addStore, out string? problem)
    {
        var storeLock = StoreLock.TryAcquire(storePath, out problem);
        if (storeLock is null) return null;
        var queuePath = storePath + ".queue";
        // We hold the store alone: whatever the queue file holds belongs to a dead process. The store is the truth;
        // the queue is rebuilt from it, and claims of the dead process go back to pending.
        WorkerHost.ResetQueue(queuePath);
        var plan = new HostPlan(queuePath, storePath + ".log.jsonl",
            quiet ? Serilog.Events.LogEventLevel.Warning : Serilog.Events.LogEventLevel.Information, RunPlannerService: longRunning);
        var host = WorkerHost.Build(settings, plan, addStore);
        host.Services.GetRequiredService<IScreeningStore>().Recover();
        return new WorkerSession(storeLock, host);
    }

    /// <summary>Runs until every candidate has a final state, reporting progress; returns the final counts.</summary>
    public StateCounts RunToCompletion(Action<StateCounts> progress, TimeSpan reportEvery, CancellationToken cancellation)
    {
        _host.Start();
        var planner = _host.Services.GetRequiredService<Planner>();
        var store = Store;
        var settings = _host.Services.GetRequiredService<WorkerSettings>();
        var lastReport = DateTime.MinValue;
        StateCounts counts;
        while (true)
        {
            planner.Plan();
            counts = store.Counts();
            if (DateTime.UtcNow - lastReport >= reportEvery) { progress(counts); lastReport = DateTime.UtcNow; }
            if (counts.Pending + counts.InFlight == 0 || cancellation.IsCancellationRequested) break;
            cancellation.WaitHandle.WaitOne(settings.PlanInterval);
        }
        _host.StopAsync(TimeSpan.FromSeconds(60)).GetAwaiter().GetResult();
        store.Recover();
        counts = store.Counts();
        progress(counts);
        return counts;
    }

    /// <summary>Runs the long-running worker until SIGINT/SIGTERM (the generic host's console lifetime).</summary>
    public void RunUntilStopped()
    {
        _host.Start();
        _host.WaitForShutdown();
        // Stopped: in-flight chunks saved what they screened and released the rest; queued work goes back to pending.
        Store.Recover();
    }

    /// <summary>Enqueues the pending work without running it (<c>idq enqueue</c>); returns the candidates enqueued.</summary>
    public int EnqueueOnly()
    {
        var planner = _host.Services.GetRequiredService<Planner>();
        var total = 0;
        int n;
        do { n = planner.Plan(all: true); total += n; } while (n > 0);
        return total;
    }

    public void Dispose()
    {
        (_host as IDisposable)?.Dispose();
        _lock.Dispose();
    }

}
