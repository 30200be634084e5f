using Hangfire;
using IdentityQueue.Screening;
using IdentityQueue.Screening.Ports;
using Microsoft.Extensions.Logging;

namespace IdentityQueue.Worker;

/// <summary>
/// Keeps the queue fed: takes pending candidates of the earliest stage (<see cref="ScreeningPolicy.Stages"/>) from the work
/// source and enqueues them in chunks, so that every candidate's cheap first trial runs before survivors move on to larger
/// fields; open-ended families grow here (<see cref="IWorkSource.GrowOpenFamilies"/>), under <c>idq run</c> and
/// <c>idq worker</c> alike. Thread-safe through the work source.
/// </summary>
public sealed class Planner(IWorkSource store, IWorkerRegistry registry, IBackgroundJobClient jobs, WorkerSettings settings, HostPlan plan, ILogger<Planner> log)
{
    private readonly bool _shared = plan.Queue.IsShared;

    /// <summary>
    /// Enqueues more work when fewer than three chunks per worker are in flight (or everything pending, with
    /// <paramref name="all"/>); returns the candidates enqueued. When nothing is pending it first looks for candidates
    /// inserted by hand since the last look.
    /// </summary>
    public int Plan(bool all = false)
    {
        // Open-ended families whose last chunk is settled without a refutation grow first, so their next chunk is planned now.
        store.GrowOpenFamilies();
        var counts = store.Counts();
        if (counts.Pending == 0 && counts.InFlight == 0 && store.EnsureResultRows() > 0) counts = store.Counts();
        // On a shared store every live worker process counts: the queue is theirs together.
        var threads = _shared ? Math.Max(settings.Workers, registry.LiveThreads(settings.DeadAfter)) : settings.Workers;
        var room = all ? long.MaxValue : (long)threads * 3 * settings.ChunkSize - counts.InFlight;
        if (room < settings.ChunkSize || counts.Pending == 0) return 0;
        // Checkpoint, shared store: the jobs are enqueued inside TakePending, before the candidates are committed as queued;
        // a planner dying or failing in between leaves them pending (a job already made screens them harmlessly), never
        // queued with no job. A store of one process (SQLite) enqueues after the commit instead, so that its single writer
        // is not held while the jobs are written; dying in between leaves them queued, and start-up recovery returns them.
        var enqueued = 0;
        var work = PlannedWork.None;
        void Enqueue(WorkStage stage, IReadOnlyList<long> ids)
        {
            var number = stage.Number;
            foreach (var chunk in ids.Chunk(settings.ChunkSize))
            {
                jobs.Enqueue<ScreeningJob>(j => j.Run(number, chunk, CancellationToken.None));
                enqueued += chunk.Length;
            }
        }
        try
        {
            var max = (int)Math.Min(room, int.MaxValue);
            if (_shared) work = store.TakePending(settings.Policy.Stages, max, Enqueue);
            else
            {
                work = store.TakePending(settings.Policy.Stages, max);
                Enqueue(work.Stage, work.Ids);
            }
        }
        catch (Exception e) when (e is not OutOfMemoryException)
        {
            // The queue or the store is away (a database restart): what has no job yet goes back to pending (on a shared
            // store the rollback did that already), so that nothing is left queued with no job to screen it.
            log.LogWarning("enqueuing failed ({Problem}); the candidates without a job stay pending ({Count} had their job made)", e.Message, enqueued);
            if (!_shared && work.Ids.Length > enqueued) store.Release(work.Ids.Skip(enqueued).ToList());
            throw;
        }
        if (work.Ids.Length > 0) log.LogInformation("enqueued {Count} candidates for stage {Stage}", work.Ids.Length, work.Stage.Number);
        return work.Ids.Length;
    }
}
