using IdentityQueue.Screening;
using Microsoft.Extensions.Time.Testing;

namespace IdentityQueue.Worker.Tests;

/// <summary>The job's at-least-once behaviour: run twice, stopped, or crashed between its claim and its save.</summary>
public sealed class JobTests
{
    private static long[] All(FakeStore store) => [.. store.Rows.Select(r => r.Id)];

    /// <summary>The store after one uninterrupted run of one job over everything: what every other path must end at.</summary>
    private static IReadOnlyList<string> Uninterrupted()
    {
        var store = Some.Store();
        Some.Job(store, Some.Settings()).Run(1, All(store), CancellationToken.None);
        return store.Snapshot();
    }

    [Fact]
    public void OneRunSettlesEveryCandidate()
    {
        var store = Some.Store();
        Some.Job(store, Some.Settings()).Run(1, All(store), CancellationToken.None);
        Assert.Equal("survived", store[1].State);
        Assert.Equal("refuted", store[2].State);
        Assert.Equal("invalid", store[3].State);
        Assert.Equal("lhs: line 1, column 3: unexpected ')'", store[3].Message);
        Assert.All(new long[] { 4, 5, 6, 7 }, id => Assert.Equal("survived", store[id].State)); // Gauss's formula holds for every n
        Assert.Equal(new Screening.Ports.StateCounts(0, 0, 0, 1, 5, 0, 1, 0), store.Counts());
    }

    [Fact]
    public void AJobDeliveredTwiceDoesNoHarm()
    {
        // At-least-once delivery: the queue hands the same job out again after its outcomes were saved. Settled candidates
        // are skipped at the claim, so the second run stores no trial and changes no row.
        var store = Some.Store();
        var settings = Some.Settings();
        Some.Job(store, settings).Run(1, All(store), CancellationToken.None);
        var first = store.Snapshot();
        var inserts = store.TrialInserts;
        Some.Job(store, settings).Run(1, All(store), CancellationToken.None);
        Assert.Equal(first, store.Snapshot());
        Assert.Equal(inserts, store.TrialInserts);
        Assert.Equal(Uninterrupted(), store.Snapshot());
    }

    [Fact]
    public void TwoCopiesOfAJobOnAClaimedChunkStoreEachTrialOnce()
    {
        // A job handed to a second worker while the first is still on it (a worker presumed dead that was not): both screen
        // the chunk with the same seeds and save the same trials; the (candidate, seq) key keeps one copy of each.
        var store = Some.Store();
        var settings = Some.Settings();
        var ids = All(store);
        store.BeforeSave = _ =>
        {
            store.BeforeSave = null;
            // The second copy runs to its end between the first copy's claim and its first save.
            Some.Job(store, settings with { WorkerName = "test:2" }).Run(1, ids, CancellationToken.None);
        };
        Some.Job(store, settings).Run(1, ids, CancellationToken.None);
        Assert.Equal(Uninterrupted(), store.Snapshot());
        Assert.Equal(store.Rows.Sum(r => r.Trials.Count), store.TrialInserts);
    }

    [Fact]
    public void ACrashBetweenClaimAndSaveLosesNothing()
    {
        // The process dies after the claim, before anything is saved (the save throws, as a commit that never happened).
        // The candidates are left claimed; start-up recovery returns them to pending, and the job that runs again (the
        // queue's retry, or the planner's next round) ends where an uninterrupted run ends: same states, same trials.
        var store = Some.Store();
        var settings = Some.Settings();
        store.BeforeSave = _ => throw new IOException("killed");
        Assert.Throws<IOException>(() => Some.Job(store, settings).Run(1, All(store), CancellationToken.None));
        Assert.Equal(7, store.Counts().Screening);
        Assert.Equal(0, store.TrialInserts);
        store.BeforeSave = null;
        Assert.Equal(7, store.Recover());
        Assert.Equal(7, store.Counts().Pending);
        var jobs = new RecordingJobs();
        Some.Planner(store, jobs, settings).Plan(all: true);
        Some.RunAll(store, jobs, settings);
        Assert.Equal(Uninterrupted(), store.Snapshot());
    }

    [Fact]
    public void ACrashAfterPartOfAChunkWasSavedLosesNothing()
    {
        // Verdicts are saved as they are reached (SaveEvery); the process dies at its second save. What the first save stored
        // stays; the rest is screened again after recovery, with the same seeds, and nothing is stored twice.
        var store = Some.Store();
        var clock = new FakeTimeProvider { AutoAdvanceAmount = TimeSpan.FromSeconds(1) }; // every reading of the clock is a second later
        var settings = Some.Settings();
        var saves = 0;
        store.BeforeSave = _ => { if (++saves == 2) throw new IOException("killed"); };
        Assert.Throws<IOException>(() => Some.Job(store, settings, clock).Run(1, All(store), CancellationToken.None));
        var settled = store.Counts().Settled;
        Assert.InRange(settled, 1, 6);
        store.BeforeSave = null;
        store.Recover();
        Some.Job(store, settings).Run(1, All(store), CancellationToken.None);
        Assert.Equal(Uninterrupted(), store.Snapshot());
        Assert.Equal(store.Rows.Sum(r => r.Trials.Count), store.TrialInserts);
    }

    [Fact]
    public void AStoppedJobSavesWhatItScreenedAndReleasesTheRest()
    {
        // A graceful stop (the job's token fires) after the first save: the saved verdicts stay, the unscreened candidates go
        // back to pending at once (no recovery needed), and the next run finishes them as one run would have.
        var store = Some.Store();
        var clock = new FakeTimeProvider { AutoAdvanceAmount = TimeSpan.FromSeconds(1) };
        using var stop = new CancellationTokenSource();
        store.BeforeSave = _ => stop.Cancel();
        Some.Job(store, Some.Settings(), clock).Run(1, All(store), stop.Token);
        store.BeforeSave = null;
        var counts = store.Counts();
        Assert.Equal(0, counts.InFlight);
        Assert.True(counts.Settled >= 1 && counts.Pending >= 1, $"{counts}");
        Some.Job(store, Some.Settings()).Run(1, All(store), CancellationToken.None);
        Assert.Equal(Uninterrupted(), store.Snapshot());
    }

    [Fact]
    public void VerdictsAreSavedAsTheyAreReached()
    {
        // SaveEvery (1 s) read from the injected clock: with every reading a second later, each verdict is saved on its own.
        var store = Some.Store();
        var clock = new FakeTimeProvider { AutoAdvanceAmount = TimeSpan.FromSeconds(1) };
        Some.Job(store, Some.Settings(), clock).Run(1, All(store), CancellationToken.None);
        Assert.Equal(7, store.SaveCalls);
        // With a clock that stands still the chunk is saved once (fewer than SaveBatch outcomes).
        var still = Some.Store();
        Some.Job(still, Some.Settings(), new FakeTimeProvider()).Run(1, All(still), CancellationToken.None);
        Assert.Equal(1, still.SaveCalls);
        Assert.Equal(store.Snapshot(), still.Snapshot());
    }

    [Fact]
    public void TheTimeBudgetIsReadFromTheInjectedClock()
    {
        // A clock that jumps ten minutes at every reading exhausts the 60 s budget (TimePerCandidate) before the first trial:
        // the verdict depends on the injected clock only, never on this machine's speed.
        var store = Some.Store();
        var clock = new FakeTimeProvider { AutoAdvanceAmount = TimeSpan.FromMinutes(10) };
        Some.Job(store, Some.Settings(), clock).Run(1, All(store), CancellationToken.None);
        Assert.Equal("undecided", store[1].State);
        Assert.StartsWith("the time budget (TimePerCandidate = 60 s) ran out", store[1].Message);
        Assert.Equal("invalid", store[3].State);
    }
}
