using IdentityQueue.Algebra;
using IdentityQueue.Screening.Ports;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Logging;

namespace IdentityQueue.Worker;

/// <summary>
/// One worker process on one store. On a SQLite store it holds the store's worker lock, returns work claimed by a dead
/// process to pending and rebuilds the queue from the store; on a shared (PostgreSQL) store any number of processes run
/// side by side, and only the work of workers whose heartbeat stopped is returned. It runs the Hangfire server until the
/// batch is settled (<see cref="RunToCompletion"/>) or until it is told to stop (<see cref="RunUntilStopped"/>).
/// Not thread-safe; one per process.
/// </summary>
public sealed class WorkerSession : IDisposable
{
    private readonly StoreLock? _lock;
    private readonly IHost _host;
    private readonly bool _shared;

    private WorkerSession(StoreLock? storeLock, IHost host, bool shared)
    {
        _lock = storeLock;
        _host = host;
        _shared = shared;
    }

    private IWorkSource Work => _host.Services.GetRequiredService<IWorkSource>();

    private IRecovery Recovery => _host.Services.GetRequiredService<IRecovery>();

    /// <summary>The candidate this process has been screening the longest now, or null when none is (for the progress line).</summary>
    public InFlightCandidate? LongestInFlight => _host.Services.GetRequiredService<WorkerStats>().Longest();

    /// <summary>
    /// Opens a session on a SQLite store at <paramref name="storePath"/> (queue and log files beside it), or gives the
    /// reason it cannot (another worker holds the store).
    /// </summary>
    public static Result<WorkerSession> Open(string storePath, WorkerSettings settings, bool longRunning, bool quiet,
        Action<IServiceCollection> addStore)
    {
        var acquired = StoreLock.TryAcquire(storePath);
        if (!acquired.Success) return acquired.Cast<WorkerSession>();
        var storeLock = acquired.Value;
        var queuePath = storePath + ".queue";
        // We hold the store alone: whatever the queue file holds belongs to a dead process. The store is the truth;
        // the queue is rebuilt from it, and claims of the dead process go back to pending.
        WorkerHost.ResetQueue(queuePath);
        var host = WorkerHost.Build(settings, Plan(QueueStorage.Sqlite(queuePath), storePath + ".log.jsonl", longRunning, quiet), addStore);
        host.Services.GetRequiredService<IRecovery>().Recover();
        return Result<WorkerSession>.Ok(new WorkerSession(storeLock, host, shared: false));
    }

    /// <summary>
    /// Opens a session on a shared store whose queue is <paramref name="queue"/> (PostgreSQL): no lock, and recovery
    /// touches only the work of dead workers. The log goes to <paramref name="logPath"/> (shared by processes on one machine).
    /// </summary>
    public static WorkerSession OpenShared(QueueStorage queue, string logPath, WorkerSettings settings, bool longRunning, bool quiet,
        Action<IServiceCollection> addStore)
    {
        if (!queue.IsShared) throw new ArgumentException("not a shared queue", nameof(queue));
        // Every process plans: counting the store's states five times a second in each would grow the database's load with
        // the number of workers, so a shared store is planned at most once a second per process (the queue holds three
        // chunks per thread, many seconds of work).
        if (settings.PlanInterval < SharedPlanInterval) settings = settings with { PlanInterval = SharedPlanInterval };
        var host = WorkerHost.Build(settings, Plan(queue, logPath, longRunning, quiet), addStore);
        host.Services.GetRequiredService<IRecovery>().RecoverShared(settings.DeadAfter, settings.QueuedStaleAfter);
        return new WorkerSession(null, host, shared: true);
    }

    /// <summary>The shortest planning interval on a shared store.</summary>
    public static readonly TimeSpan SharedPlanInterval = TimeSpan.FromSeconds(1);

    private static HostPlan Plan(QueueStorage queue, string logPath, bool longRunning, bool quiet) =>
        new(queue, logPath, quiet ? Serilog.Events.LogEventLevel.Warning : Serilog.Events.LogEventLevel.Information, RunPlannerService: longRunning);

    /// <summary>Runs until every candidate has a final state, reporting progress; returns the final counts.</summary>
    public StateCounts RunToCompletion(Action<StateCounts> progress, TimeSpan reportEvery, CancellationToken cancellation)
    {
        _host.Start();
        var planner = _host.Services.GetRequiredService<Planner>();
        var store = Work;
        var settings = _host.Services.GetRequiredService<WorkerSettings>();
        var lastReport = DateTime.MinValue;
        StateCounts counts;
        while (true)
        {
            try
            {
                planner.Plan();
                counts = store.Counts();
                // Settled, unless an open-ended family can still grow: its last chunk may have settled after Plan looked.
                if (counts.Pending + counts.InFlight == 0 && store.GrowOpenFamilies() > 0) counts = store.Counts();
            }
            catch (Exception e) when (_shared && e is not OutOfMemoryException)
            {
                // The database is away (the store's own retries gave up for now): wait and look again.
                _host.Services.GetRequiredService<ILogger<WorkerSession>>().LogWarning("the store is unreachable ({Problem}); retrying", e.Message);
                cancellation.WaitHandle.WaitOne(settings.HeartbeatInterval);
                if (cancellation.IsCancellationRequested) break;
                continue;
            }
            if (DateTime.UtcNow - lastReport >= reportEvery) { progress(counts); lastReport = DateTime.UtcNow; }
            if (counts.Pending + counts.InFlight == 0 || cancellation.IsCancellationRequested) break;
            cancellation.WaitHandle.WaitOne(settings.PlanInterval);
        }
        _host.StopAsync(TimeSpan.FromSeconds(60)).GetAwaiter().GetResult();
        AfterStop(settings);
        counts = store.Counts();
        progress(counts);
        return counts;
    }

    /// <summary>Runs the long-running worker until SIGINT/SIGTERM (the generic host's console lifetime).</summary>
    public void RunUntilStopped()
    {
        _host.Start();
        _host.WaitForShutdown();
        AfterStop(_host.Services.GetRequiredService<WorkerSettings>());
    }

    /// <summary>
    /// Stopped: in-flight chunks saved what they screened and released the rest. On a SQLite store, queued work goes back to
    /// pending (the queue file is rebuilt at the next start); on a shared store queued chunks stay in the queue for the
    /// other workers, and only this worker's leftover claims are returned.
    /// </summary>
    private void AfterStop(WorkerSettings settings)
    {
        if (_shared) Recovery.ReleaseClaimsOf(settings.WorkerName);
        else Recovery.Recover();
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
        _lock?.Dispose();
    }
}
