using System.ComponentModel;
using Hangfire;
using IdentityQueue.Screening;
using IdentityQueue.Screening.Counterexamples;
using IdentityQueue.Screening.Ports;
using Microsoft.Extensions.Logging;

namespace IdentityQueue.Worker;

/// <summary>
/// The Hangfire job: screens one chunk of candidates for one stage. It takes only ids, and it may run twice or stop
/// halfway (at-least-once delivery): settled candidates are skipped, trials are keyed (candidate, seq) with points derived
/// from the catalogue's seed, so a second run recomputes exactly what the first stored and stores nothing twice. Verdicts
/// are saved as they are reached (at least every <see cref="WorkerSettings.SaveEvery"/>), candidates estimated slow are
/// screened after the rest of the chunk, and a stop (the job's token) cancels the running trial, saves and releases.
/// </summary>
public sealed class ScreeningJob(IWorkSource source, IOutcomeSink sink, WorkerSettings settings, WorkerStats stats, CandidateCompiler compiler,
    TimeProvider clock, ILogger<ScreeningJob> log)
{
    /// <summary>Outcomes written per transaction.</summary>
    public const int SaveBatch = 250;

    [AutomaticRetry(Attempts = 5, DelaysInSeconds = [1, 5, 15, 60, 300])]
    [DisplayName("screen {1} (stage {0})")]
    public void Run(int stage, long[] candidateIds, CancellationToken cancellation)
    {
        // The job carries the stage's number (queued jobs are stored); the policy says what the stage is.
        var workStage = settings.Policy.Stage(stage);
        // Checkpoint: dying before the claim leaves the candidates queued; start-up recovery returns them to pending.
        var claimed = source.Claim(candidateIds, settings.WorkerName);
        var outcomes = new List<CandidateOutcome>(SaveBatch);
        var lastSave = clock.GetTimestamp();
        void Flush()
        {
            if (outcomes.Count > 0) sink.Save(outcomes, settings.WorkerName);
            outcomes.Clear();
            lastSave = clock.GetTimestamp();
        }
        // Candidates whose first trial alone is estimated longer than SlowCandidate wait until the rest of the chunk is
        // screened and saved, so that one slow candidate never holds up the others.
        var slow = new List<Prepared>();
        for (var i = 0; i < claimed.Count; i++)
        {
            if (cancellation.IsCancellationRequested)
            {
                Stop(outcomes, claimed.Skip(i).Select(c => c.Id).Concat(slow.Select(p => p.Work.Id)).ToList(), stage);
                return;
            }
            var prepared = Prepare(claimed[i], workStage);
            if (prepared.Outcome is { } settled) outcomes.Add(settled);
            else if (prepared.Estimate > settings.SlowCandidate)
            {
                slow.Add(prepared);
                continue;
            }
            else outcomes.Add(Screen(prepared, cancellation));
            // Checkpoint: dying here loses only the unsaved outcomes (at most SaveEvery's worth); their candidates stay claimed,
            // are returned to pending at the next start, and are screened again with the same seeds, giving the same trials.
            if (outcomes.Count >= SaveBatch || clock.GetElapsedTime(lastSave) >= settings.SaveEvery) Flush();
        }
        Flush();
        for (var k = 0; k < slow.Count; k++)
        {
            if (cancellation.IsCancellationRequested)
            {
                Stop(outcomes, slow.Skip(k).Select(p => p.Work.Id).ToList(), stage);
                return;
            }
            log.LogInformation("candidate {Id} ({Label}) is slow: one trial is estimated at {Seconds:F1} s (the budget is {Budget})",
                slow[k].Work.Id, slow[k].Work.Label, slow[k].Estimate.TotalSeconds, settings.Budget);
            outcomes.Add(Screen(slow[k], cancellation));
            Flush();
        }
        stats.ChunkDone(claimed.Count);
    }

    /// <summary>
    /// A compile error of a stored candidate, pointing at its catalogue line: "line 36, column 20, rhs, at n=2, j=1: …"
    /// when the stored side is the text as written there (its column is stored), else the column inside the stored side,
    /// "line 36, column 20 of the stored rhs, at n=2, j=1: …" (a side written out from definitions, a hand-inserted row).
    /// </summary>
    internal static string StoredMessage(Algebra.Syntax.IdentityEntry entry, Algebra.Syntax.Diagnostic error)
    {
        if (error.Side is null) return $"line {entry.Line}: {error}";
        var values = error.Values is null ? "" : $", {error.Values}";
        var span = error.Side == "lhs" ? entry.LeftSpan : error.Side == "rhs" ? entry.RightSpan : null;
        return span is { } s
            ? $"line {entry.Line}, column {s.Column + error.Position.Column - 1}, {error.Side}{values}: {error.Message}"
            : $"line {entry.Line}, column {error.Position.Column} of the stored {error.Side}{values}: {error.Message}";
    }

    /// <summary>A graceful stop: what is screened is saved (a candidate stopped mid-screen with its finished trials, as pending), the rest goes back to pending.</summary>
    private void Stop(List<CandidateOutcome> outcomes, List<long> unscreened, int stage)
    {
        sink.Save(outcomes, settings.WorkerName);
        outcomes.Clear();
        source.Release(unscreened);
        log.LogInformation("stopping: released {Count} candidates of a stage-{Stage} chunk", unscreened.Count, stage);
    }

    /// <summary>A claimed candidate ready to screen (compiled, with its options and the estimate of its first trial), or its outcome already.</summary>
    internal sealed record Prepared(CandidateWork Work, CandidateOutcome? Outcome, Algebra.Compile.CompiledIdentity? Identity, ScreeningOptions? Options, TimeSpan Estimate);

    /// <summary>Compiles one candidate and estimates its first trial; a deterministic failure of this candidate is its outcome, never the chunk's.</summary>
    internal Prepared Prepare(CandidateWork work, WorkStage stage)
    {
        if (work.Problem is not null) return new Prepared(work, CandidateOutcome.Invalid(work.Id, work.Problem), null, null, TimeSpan.Zero);
        try
        {
            var compiled = compiler.Compile(work.Entry!, work.Parameters);
            if (!compiled.Success) return new Prepared(work, CandidateOutcome.Invalid(work.Id, StoredMessage(work.Entry!, compiled.Error)), null, null, TimeSpan.Zero);
            var options = new ScreeningOptions
            {
                Seed = work.Seed,
                Target = work.Target,
                Limits = settings.Limits,
                Policy = settings.Policy,
                Budget = settings.Budget,
                Clock = clock,
                Costs = settings.Costs,
                MaxNewStages = ScreeningPolicy.NewStagesFor(stage, settings.TwoPass),
            };
            var estimate = work.Trials.Count == 0 ? Screener.Estimate(compiled.Value, options).OneTrial : TimeSpan.Zero;
            return new Prepared(work, null, compiled.Value, options, estimate);
        }
        catch (Exception e) when (e is not OutOfMemoryException and not OperationCanceledException)
        {
            log.LogWarning(e, "candidate {Id} failed", work.Id);
            return new Prepared(work, CandidateOutcome.Failed(work.Id, $"{e.GetType().Name}: {e.Message}"), null, null, TimeSpan.Zero);
        }
    }

    /// <summary>Screens one prepared candidate (stopping with its finished trials when <paramref name="cancellation"/> fires).</summary>
    internal CandidateOutcome Screen(Prepared prepared, CancellationToken cancellation)
    {
        var work = prepared.Work;
        stats.Begin(work.Id, work.Label);
        try
        {
            var result = Screener.Screen(prepared.Identity!, prepared.Options!, work.Key, work.Trials, cancellation);
            var outcome = CandidateOutcome.Screened(work.Id, result);
            if (result.Verdict != Verdict.Refuted || !settings.Policy.RefutationDetails) return outcome;
            // a later, budgeted stage: where and how the refuted identity fails (the smallest counterexample, the difference)
            return outcome with { Details = RefutationDetails.Find(prepared.Identity!, settings.Policy, work.Key, clock, cancellation) };
        }
        catch (Exception e) when (e is not OutOfMemoryException and not OperationCanceledException)
        {
            log.LogWarning(e, "candidate {Id} failed", work.Id);
            return CandidateOutcome.Failed(work.Id, $"{e.GetType().Name}: {e.Message}");
        }
        finally
        {
            stats.End(work.Id);
        }
    }
}
