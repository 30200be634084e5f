using System.Collections.Concurrent;
using IdentityQueue.Screening.Ports;

namespace IdentityQueue.Worker;

/// <summary>What this process has done, and what it is screening now, for its heartbeat and progress line. Thread-safe.</summary>
public sealed class WorkerStats(TimeProvider clock)
{
    private long _chunks, _candidates;
    private readonly ConcurrentDictionary<long, InFlightCandidate> _screening = new();

    public WorkerStats() : this(TimeProvider.System) { }

    /// <summary>A job thread starts screening a candidate.</summary>
    public void Begin(long id, string? label) => _screening[id] = new InFlightCandidate(id, label, clock.GetUtcNow().UtcDateTime);

    /// <summary>It has finished (or stopped) screening it.</summary>
    public void End(long id) => _screening.TryRemove(id, out _);

    /// <summary>The candidate screened the longest now, or null when none is.</summary>
    public InFlightCandidate? Longest()
    {
        InFlightCandidate? longest = null;
        foreach (var c in _screening.Values)
            if (longest is null || c.Since < longest.Since) longest = c;
        return longest;
    }

    public long ChunksDone => Interlocked.Read(ref _chunks);

    public long CandidatesDone => Interlocked.Read(ref _candidates);

    public void ChunkDone(int candidates)
    {
        Interlocked.Increment(ref _chunks);
        Interlocked.Add(ref _candidates, candidates);
    }
}
