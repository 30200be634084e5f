using IdentityQueue.Algebra;
using IdentityQueue.Screening;
using Microsoft.Extensions.Logging.Abstractions;

namespace IdentityQueue.Worker.Tests;

/// <summary>Sample candidates and the worker's pieces wired to a fake store.</summary>
internal static class Some
{
    /// <summary>(x + y)^2 = x^2 + 2xy + y^2: the binomial theorem for n = 2 (common knowledge; sympy's expand agrees).</summary>
    public const string True = "square: (x + y)^2 = x^2 + 2*x*y + y^2";

    /// <summary>(x + y)^2 = x^2 + y^2 is false over Q: the two sides differ by 2xy.</summary>
    public const string False = "freshman: (x + y)^2 = x^2 + y^2";

    /// <summary>sum of k for k = 1..n is n(n+1)/2 (Gauss's formula), for n = 1..4: four instances of one family.</summary>
    public const string Family = "gauss: sum(k in 1..n: k*x) = n*(n+1)/2*x for n in 1..4";

    public static WorkerSettings Settings(bool twoPass = false, int chunk = 1000, int workers = 1) => new()
    {
        WorkerName = "test:1",
        Workers = workers,
        ChunkSize = chunk,
        TwoPass = twoPass,
        // Every trial estimated at 1 µs per field operation: no candidate counts as slow, whatever this machine's speed.
        Costs = CostModel.Fixed(RungSpeed.Uniform(1e-3)),
    };

    public static ScreeningJob Job(FakeStore store, WorkerSettings settings, TimeProvider? clock = null) =>
        new(store, store, settings, new WorkerStats(clock ?? TimeProvider.System), new CandidateCompiler(Limits.Default),
            clock ?? TimeProvider.System, NullLogger<ScreeningJob>.Instance);

    public static Planner Planner(FakeStore store, RecordingJobs jobs, WorkerSettings settings) =>
        new(store, store, jobs, settings, new HostPlan(QueueStorage.Sqlite("unused.queue"), "unused.log", Serilog.Events.LogEventLevel.Warning, false),
            NullLogger<Planner>.Instance);

    /// <summary>Runs every recorded job once, in order, as the queue would.</summary>
    public static void RunAll(FakeStore store, RecordingJobs jobs, WorkerSettings settings)
    {
        foreach (var (stage, ids) in jobs.Chunks) Job(store, settings).Run(stage, ids, CancellationToken.None);
        jobs.Jobs.Clear();
    }

    /// <summary>A store with a true, a false and an unreadable candidate, and a family of four.</summary>
    public static FakeStore Store()
    {
        var store = new FakeStore();
        store.Add(True);
        store.Add(False);
        store.AddUnreadable("lhs: line 1, column 3: unexpected ')'");
        store.Add(Family);
        return store;
    }
}
