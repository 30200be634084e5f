using Hangfire;
using Microsoft.Extensions.Logging;

namespace IdentityQueue.Worker;

/// <summary>
/// Keeps the queue fed: takes pending candidates of the earliest stage from the store and enqueues them in chunks, so
/// that every candidate's cheap first trial runs before survivors move on to larger fields. Thread-safe through the store.
/// </summary>
public sealed class Planner(IScreeningStore store, IBackgroundJobClient jobs, WorkerSettings settings, HostPlan plan, ILogger<Planner> log)
{
    private readonly bool _shared = plan.Queue.IsShared;

    /// <summary>
    /// Enqueues more work when fewer than three chunks per worker are in flight (or everything pending, with
    /// <paramref name="all"/>); returns the candidates enqueued. When nothing is pending it first looks for candidates
    /// inserted by hand since the last look.
    /// </summary>
    public int Plan(bool all = false)
    {
        var counts = store.Counts();
        if (counts.Pending == 0 && counts.InFlight == 0 && store.EnsureResultRows() > 0) counts = store.Counts();
        // On a shared store every live worker process counts: the queue is theirs together.
        var threads = _shared ? Math.Max(settings.Workers, store.LiveThreads(settings.DeadAfter)) : settings.Workers;
        var room = all ? long.MaxValue : (long)threads * 3 * settings.ChunkSize - counts.InFlight;
        if (room < settings.ChunkSize || counts.Pending == 0) return 0;
        // Checkpoint: TakePending marks the candidates queued before their jobs exist; dying in between leaves them
        // queued with no job, and start-up recovery returns them to pending.
        var work = store.TakePending((int)Math.Min(room, int.MaxValue));
        var enqueued = 0;
        try
        {
            foreach (var chunk in work.Ids.Chunk(settings.ChunkSize))
            {
                jobs.Enqueue<ScreeningJob>(j => j.Run(work.Stage, chunk, CancellationToken.None));
                enqueued += chunk.Length;
            }
        }
        catch (Exception e) when (e is not OutOfMemoryException)
        {
            // The queue is away (a database restart): give back what has no job yet, so that it is not left queued with
            // nothing to screen it. Should a job have been created after all, its candidates are screened twice, harmlessly.
            log.LogWarning("enqueuing failed ({Problem}); {Count} candidates go back to pending", e.Message, work.Ids.Count - enqueued);
            store.Release(work.Ids.Skip(enqueued).ToList());
            throw;
        }
        if (work.Ids.Count > 0) log.LogInformation("enqueued {Count} candidates for stage {Stage}", work.Ids.Count, work.Stage);
        return work.Ids.Count;
    }
}
