using IdentityQueue.Screening;

namespace IdentityQueue.Worker.Tests;

public sealed class PlannerTests
{
    [Fact]
    public void EveryFirstStageCandidateIsPlannedBeforeAnyLaterStage()
    {
        // ScreeningPolicy.Stages: stage 1 (no zero trial yet) before stage 2 (the rest). Two passes leave survivors of the
        // first pass pending with zero trials; fresh candidates added meanwhile still come first. A target of 2^-1024 is more
        // than one stage on the cheapest rung buys (at most 16 lanes of about 29 bits each), so every survivor needs stage 2.
        var store = Some.Store();
        store.Target = EvidenceTarget.Create(1024).Value;
        var settings = Some.Settings(twoPass: true, chunk: 2);
        var jobs = new RecordingJobs();
        var planner = Some.Planner(store, jobs, settings);
        planner.Plan(all: true);
        Assert.All(jobs.Chunks, c => Assert.Equal(WorkStage.FirstTrial.Number, c.Stage));
        Assert.Equal([[1, 2], [3, 4], [5, 6], [7]], jobs.Chunks.Select(c => c.Ids));
        Some.RunAll(store, jobs, settings);
        // After the first pass the survivors are pending with their cheap stage stored; the refuted and invalid are settled.
        Assert.Equal("refuted", store[2].State);
        Assert.Equal("invalid", store[3].State);
        Assert.All(new long[] { 1, 4, 5, 6, 7 }, id => Assert.Equal("pending", store[id].State));
        Assert.All(new long[] { 1, 4, 5, 6, 7 }, id => Assert.True(store[id].ZeroTrials > 0));
        var late = store.Add(Some.False).Single();
        planner.Plan(all: true);
        Assert.Equal([(1, new[] { late })], jobs.Chunks.Select(c => (c.Stage, c.Ids)));
        Some.RunAll(store, jobs, settings);
        planner.Plan(all: true);
        Assert.All(jobs.Chunks, c => Assert.Equal(WorkStage.Rest.Number, c.Stage));
        Assert.Equal([1, 4, 5, 6, 7], jobs.Chunks.SelectMany(c => c.Ids));
        Some.RunAll(store, jobs, settings);
        Assert.Equal(new Screening.Ports.StateCounts(0, 0, 0, 2, 5, 0, 1, 0), store.Counts());
    }

    [Fact]
    public void ThePlannerKeepsThreeChunksPerThreadInFlight()
    {
        // Room: threads × 3 × chunk size − in flight (the planner's rule); 1 thread × 3 × 2 = 6 of the 7 candidates.
        var store = Some.Store();
        var jobs = new RecordingJobs();
        var planner = Some.Planner(store, jobs, Some.Settings(chunk: 2));
        Assert.Equal(6, planner.Plan());
        Assert.Equal(6, store.Counts().Queued);
        Assert.Equal(0, planner.Plan()); // room 0 < one chunk
        Assert.Equal(1, store.Counts().Pending);
    }

    [Fact]
    public void AQueueThatFailsLeavesTheCandidatesWithoutAJobPending()
    {
        // One process per store: the planner enqueues after taking; when the queue fails at the second chunk the first
        // chunk's candidates stay queued (their job exists) and the rest go back to pending, so none is queued without a job.
        var store = Some.Store();
        var jobs = new RecordingJobs { FailAt = 2 };
        var planner = Some.Planner(store, jobs, Some.Settings(chunk: 2));
        Assert.Throws<InvalidOperationException>(() => planner.Plan());
        Assert.Equal([[1, 2]], jobs.Chunks.Select(c => c.Ids));
        Assert.Equal("queued", store[1].State);
        Assert.Equal("queued", store[2].State);
        Assert.All(new long[] { 3, 4, 5, 6, 7 }, id => Assert.Equal("pending", store[id].State));
    }

    [Fact]
    public void AnOpenFamilysNextChunkIsPlannedInTheRoundThatGrowsIt()
    {
        // IWorkSource.GrowOpenFamilies runs before the planner counts and takes, so a chunk it adds is enqueued at once.
        var store = Some.Store();
        var jobs = new RecordingJobs();
        var planner = Some.Planner(store, jobs, Some.Settings(chunk: 100));
        var grown = new List<long>();
        store.Grow = s =>
        {
            if (grown.Count > 0) return 0;
            grown.AddRange(s.Add(Some.False));
            return grown.Count;
        };
        Assert.Equal(8, planner.Plan(all: true)); // the seven candidates and the grown one
        Assert.Contains(grown.Single(), jobs.Chunks.SelectMany(c => c.Ids));
    }

    [Fact]
    public void OnASharedStoreEveryLiveWorkerThreadCounts()
    {
        // A shared store: room is counted over the live threads of every worker process (the registry), not this one's.
        var store = Some.Store();
        store.RegisterWorker("other:2", 1);
        var jobs = new RecordingJobs();
        var planner = new Planner(store, store, jobs, Some.Settings(chunk: 1),
            new HostPlan(new QueueStorage(null, Npgsql.NpgsqlDataSource.Create("Host=unused")), "unused.log", Serilog.Events.LogEventLevel.Warning, false),
            Microsoft.Extensions.Logging.Abstractions.NullLogger<Planner>.Instance);
        store.RegisterWorker("test:1", 1);
        Assert.Equal(6, planner.Plan()); // 2 threads × 3 × 1
    }
}

public sealed class ValueEqualityTests
{
    [Fact]
    public void RecordsThatCarryArraysCompareByValue()
    {
        // #14 point 8: records compared in tests compare their arrays element by element (common practice for value records).
        Assert.Equal(new Screening.Ports.PlannedWork(WorkStage.Rest, [1, 2]), new Screening.Ports.PlannedWork(WorkStage.Rest, [1, 2]));
        Assert.NotEqual(new Screening.Ports.PlannedWork(WorkStage.Rest, [1, 2]), new Screening.Ports.PlannedWork(WorkStage.Rest, [2, 1]));
        TrialRecord Trial() => new(3, new TrialField(7, 2, [3, 0, 1], 5.6), 11, TrialOutcome.Nonzero,
            [new PointValue("x", [1, 2]), new PointValue("y[2]", [4, 0])], [5, 6], "result", null, 17);
        Assert.Equal(Trial(), Trial());
        Assert.Equal(Trial().GetHashCode(), Trial().GetHashCode());
        Assert.NotEqual(Trial(), Trial() with { Point = [new PointValue("x", [1, 2]), new PointValue("y[2]", [4, 1])] });
        Assert.NotEqual(Trial(), Trial() with { Field = new TrialField(7, 2, [3, 1, 1], 5.6) });
    }
}
