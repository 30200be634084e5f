using IdentityQueue.Algebra;

namespace IdentityQueue.Worker;

/// <summary>Settings of a worker process; validated by <see cref="Validate"/> at start-up. Immutable.</summary>
public sealed record WorkerSettings
{
    /// <summary>Hangfire worker threads in this process.</summary>
    public int Workers { get; init; } = Environment.ProcessorCount;

    /// <summary>Candidates per job: a job must carry enough work to pay for the queue's own cost (about 15–20 ms a job).</summary>
    public int ChunkSize { get; init; } = 1000;

    /// <summary>This process's name in claims and trial rows: host:pid.</summary>
    public string WorkerName { get; init; } = $"{Environment.MachineName}:{Environment.ProcessId}";

    public Limits Limits { get; init; } = Limits.Default;

    /// <summary>The screening policy: trial limits and the stages the planner takes work by.</summary>
    public IdentityQueue.Screening.ScreeningPolicy Policy { get; init; } = IdentityQueue.Screening.ScreeningPolicy.Default;

    /// <summary>How long a trial takes on each rung (measured once per process; tests give fixed speeds).</summary>
    public IdentityQueue.Screening.CostModel Costs { get; init; } = IdentityQueue.Screening.CostModel.Calibrated;

    /// <summary>The time one candidate's screening may take (<c>TimePerCandidate</c>, <c>--time-per-candidate</c>).</summary>
    public IdentityQueue.Screening.TimeBudget Budget { get; init; } = IdentityQueue.Screening.TimeBudget.Default;

    /// <summary>
    /// Outcomes of a chunk are saved at least this often (and before a slow candidate starts), so that verdicts reach the
    /// store as they are reached, not at the end of the chunk.
    /// </summary>
    public TimeSpan SaveEvery { get; init; } = TimeSpan.FromSeconds(1);

    /// <summary>
    /// A candidate whose first trial is estimated longer than this is screened after the rest of its chunk (which is saved
    /// first), so that one slow candidate never holds up the others.
    /// </summary>
    public TimeSpan SlowCandidate { get; init; } = TimeSpan.FromSeconds(1);

    /// <summary>How often the planner looks for work to enqueue.</summary>
    public TimeSpan PlanInterval { get; init; } = TimeSpan.FromMilliseconds(200);

    /// <summary>
    /// Screen in two passes over the catalogue: first every candidate's cheap stage (its trials on the cheapest rung), then the survivors' remaining trials,
    /// so that a partial run already holds nearly all refutations. Off by default: each survivor is then claimed, compiled
    /// and saved once instead of twice, which is about a fifth faster end to end (see the README's Performance section).
    /// Either way each candidate climbs the field ladder from the cheapest rung.
    /// </summary>
    public bool TwoPass { get; init; }

    /// <summary>How often the worker writes its heartbeat (and, on a shared store, looks for dead workers' claims).</summary>
    public TimeSpan HeartbeatInterval { get; init; } = TimeSpan.FromSeconds(5);

    /// <summary>A worker whose heartbeat is older than this is presumed dead: its claims may go back to pending.</summary>
    public TimeSpan DeadAfter { get; init; } = TimeSpan.FromSeconds(60);

    /// <summary>Candidates queued this long without being claimed are orphans of a planner that died; they go back to pending.</summary>
    public TimeSpan QueuedStaleAfter { get; init; } = TimeSpan.FromHours(2);

    /// <summary>
    /// PostgreSQL queue only: a fetched job whose worker stops extending its fetch this long is handed to another worker
    /// (Hangfire.PostgreSql's sliding invisibility timeout: a live worker keeps extending it, however long the chunk runs).
    /// </summary>
    public TimeSpan InvisibilityTimeout { get; init; } = TimeSpan.FromMinutes(2);

    /// <summary>PostgreSQL queue only: how often an idle worker thread asks the queue for a job.</summary>
    public TimeSpan QueuePollInterval { get; init; } = TimeSpan.FromSeconds(2);

    /// <summary>A message for each invalid setting; empty when all are fine.</summary>
    public IReadOnlyList<string> Validate()
    {
        var problems = new List<string>();
        if (Workers < 1 || Workers > 256) problems.Add($"--workers must be between 1 and 256, got {Workers}");
        if (ChunkSize < 1 || ChunkSize > 100_000) problems.Add($"--chunk-size must be between 1 and 100000, got {ChunkSize}");
        if (InvisibilityTimeout < TimeSpan.FromSeconds(5)) problems.Add($"the invisibility timeout must be at least 5 s, got {InvisibilityTimeout.TotalSeconds} s");
        if (DeadAfter < 3 * HeartbeatInterval) problems.Add($"dead-after ({DeadAfter.TotalSeconds} s) must be at least three heartbeats ({HeartbeatInterval.TotalSeconds} s each)");
        return problems;
    }
}
