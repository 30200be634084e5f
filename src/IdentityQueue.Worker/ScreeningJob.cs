using System.ComponentModel;
using Hangfire;
using IdentityQueue.Screening;
using Microsoft.Extensions.Logging;

namespace IdentityQueue.Worker;

/// <summary>
/// The Hangfire job: screens one chunk of candidates for one stage. It takes only ids, and it may run twice or stop
/// halfway (at-least-once delivery): settled candidates are skipped, trials are keyed (candidate, seq) with points derived
/// from the catalogue's seed, so a second run recomputes exactly what the first stored and stores nothing twice.
/// </summary>
public sealed class ScreeningJob(IScreeningStore store, WorkerSettings settings, WorkerStats stats, CandidateCompiler compiler, ILogger<ScreeningJob> log)
{
    /// <summary>Outcomes written per transaction.</summary>
    public const int SaveBatch = 250;

    [AutomaticRetry(Attempts = 5, DelaysInSeconds = [1, 5, 15, 60, 300])]
    [DisplayName("screen {1} (stage {0})")]
    public void Run(int stage, long[] candidateIds, CancellationToken cancellation)
    {
        // Checkpoint: dying before the claim leaves the candidates queued; start-up recovery returns them to pending.
        var claimed = store.Claim(candidateIds, settings.WorkerName);
        var outcomes = new List<CandidateOutcome>(SaveBatch);
        for (var i = 0; i < claimed.Count; i++)
        {
            if (cancellation.IsCancellationRequested)
            {
                // A graceful stop: what is screened is saved, the rest goes back to pending for the next run.
                store.Save(outcomes, settings.WorkerName);
                store.Release(claimed.Skip(i).Select(c => c.Id).ToList());
                log.LogInformation("stopping: released {Count} candidates of a stage-{Stage} chunk", claimed.Count - i, stage);
                return;
            }
            outcomes.Add(ScreenOne(claimed[i], stage, cancellation));
            if (outcomes.Count == SaveBatch)
            {
                store.Save(outcomes, settings.WorkerName);
                outcomes.Clear();
            }
            // Checkpoint: dying here loses only the unsaved outcomes; their candidates stay claimed, are returned to pending
            // at the next start, and are screened again with the same seeds, giving the same trials.
        }
        store.Save(outcomes, settings.WorkerName);
        stats.ChunkDone(claimed.Count);
    }

    /// <summary>
    /// A compile error of a stored candidate: its catalogue line (the stored position) and the column in the stored side,
    /// which is the catalogue's side as printed by the importer (`idq show` prints it), with the side and the values:
    /// "line 36, column 20 of the stored rhs, at n=2, j=1: …".
    /// </summary>
    internal static string StoredMessage(Algebra.Syntax.IdentityEntry entry, Algebra.Syntax.Diagnostic error)
    {
        if (error.Side is null) return $"line {entry.Line}: {error}";
        return $"line {entry.Line}, column {error.Position.Column} of the stored {error.Side}{(error.Values is null ? "" : $", {error.Values}")}: {error.Message}";
    }

    /// <summary>Screens one candidate; a deterministic failure of this candidate is its outcome, never the chunk's.</summary>
    internal CandidateOutcome ScreenOne(CandidateWork work, int stage, CancellationToken cancellation)
    {
        if (work.Problem is not null) return new CandidateOutcome(work.Id, null, work.Problem, null);
        try
        {
            var compiled = compiler.Compile(work.Entry!, work.Parameters);
            if (!compiled.Success) return new CandidateOutcome(work.Id, null, StoredMessage(work.Entry!, compiled.Error!), null);
            var options = new ScreeningOptions
            {
                Seed = work.Seed,
                TargetBits = work.TargetBits,
                Limits = settings.Limits,
                MaxNewStages = settings.TwoPass && stage == 1 ? 1 : null,
            };
            return new CandidateOutcome(work.Id, Screener.Screen(compiled.Value!, options, work.Key, work.Trials, cancellation), null, null);
        }
        catch (Exception e) when (e is not OutOfMemoryException and not OperationCanceledException)
        {
            log.LogWarning(e, "candidate {Id} failed", work.Id);
            return new CandidateOutcome(work.Id, null, null, $"{e.GetType().Name}: {e.Message}");
        }
    }
}
