using System.Data.Common;

namespace IdentityQueue.Store.Work;

/// <summary>A worker process as <c>idq status</c> shows it.</summary>
/// <param name="Name">The worker's name.</param>
/// <param name="Host">The machine it runs on.</param>
/// <param name="Pid">Its process id.</param>
/// <param name="Threads">Its screening threads.</param>
/// <param name="StartedAt">UTC, when it started.</param>
/// <param name="HeartbeatAt">UTC, its last heartbeat.</param>
/// <param name="ChunksDone">Chunks it finished.</param>
/// <param name="CandidatesDone">Candidates it finished.</param>
/// <param name="Live">Whether its heartbeat is recent.</param>
/// <param name="CurrentCandidateId">The candidate it has been on the longest (as of its last heartbeat), null when idle.</param>
/// <param name="CurrentLabel">That candidate's label.</param>
/// <param name="CurrentSince">Since when it is on that candidate.</param>
public sealed record WorkerInfo(string Name, string Host, int Pid, int Threads, DateTime StartedAt, DateTime HeartbeatAt,
    long ChunksDone, long CandidatesDone, bool Live, long? CurrentCandidateId = null, string? CurrentLabel = null, DateTime? CurrentSince = null);

/// <summary>
/// The <c>worker</c> table: each worker process registers, beats its heartbeat with its counters, and signs off when it
/// stops gracefully. A process whose heartbeat is older than the dead-after time is presumed dead. Uses the connection it
/// is given; not thread-safe.
/// </summary>
public sealed class WorkerRegistry(StoreConnection store)
{
    private readonly StoreConnection _store = store;
    private readonly DbConnection _db = store.Connection;

    /// <summary>Registers (or re-registers, after a restart with the same host:pid) a worker process.</summary>
    public void Register(string name, string host, int pid, int threads)
    {
        using var command = _db.Command("""
            INSERT INTO worker (name, host, pid, threads, started_at, heartbeat_at, chunks_done, candidates_done, stopped_at)
            VALUES (@name, @host, @pid, @threads, CURRENT_TIMESTAMP, CURRENT_TIMESTAMP, 0, 0, NULL)
            ON CONFLICT (name) DO UPDATE SET host = excluded.host, pid = excluded.pid, threads = excluded.threads,
                started_at = excluded.started_at, heartbeat_at = excluded.heartbeat_at, chunks_done = 0, candidates_done = 0,
                stopped_at = NULL
            """);
        command.Parameter("@name", name);
        command.Parameter("@host", host);
        command.Parameter("@pid", pid);
        command.Parameter("@threads", threads);
        command.ExecuteNonQuery();
    }

    /// <summary>
    /// Records that the worker is alive, with its counters so far and the candidate it has been screening the longest
    /// (<paramref name="currentCandidateId"/> since <paramref name="currentSince"/>, UTC; null when idle).
    /// </summary>
    public void Heartbeat(string name, long chunksDone, long candidatesDone, long? currentCandidateId = null, DateTime? currentSince = null)
    {
        // The time on the candidate is written as "so many seconds before the database's now", like every other time here.
        var seconds = currentSince is DateTime since ? (int)Math.Max(0, (DateTime.UtcNow - since.ToUniversalTime()).TotalSeconds) : 0;
        var current = currentCandidateId is null ? "current_candidate_id = NULL, current_since = NULL"
            : $"current_candidate_id = @current, current_since = {_store.SecondsAgo(seconds)}";
        using var command = _db.Command($"""
            UPDATE worker SET heartbeat_at = CURRENT_TIMESTAMP, chunks_done = @chunks, candidates_done = @candidates, {current}
            WHERE name = @name
            """);
        command.Parameter("@name", name);
        command.Parameter("@chunks", chunksDone);
        command.Parameter("@candidates", candidatesDone);
        if (currentCandidateId is long id) command.Parameter("@current", id);
        command.ExecuteNonQuery();
    }

    /// <summary>Marks the worker stopped (a graceful stop).</summary>
    public void SignOff(string name, long chunksDone, long candidatesDone)
    {
        using var command = _db.Command("""
            UPDATE worker SET heartbeat_at = CURRENT_TIMESTAMP, stopped_at = CURRENT_TIMESTAMP, chunks_done = @chunks,
                candidates_done = @candidates, current_candidate_id = NULL, current_since = NULL
            WHERE name = @name
            """);
        command.Parameter("@name", name);
        command.Parameter("@chunks", chunksDone);
        command.Parameter("@candidates", candidatesDone);
        command.ExecuteNonQuery();
    }

    /// <summary>Worker threads of the processes alive now (heartbeat within <paramref name="deadAfter"/>).</summary>
    public int LiveThreads(TimeSpan deadAfter)
    {
        using var command = _db.Command($"""
            SELECT COALESCE(SUM(threads), 0) FROM worker
            WHERE stopped_at IS NULL AND heartbeat_at >= {_store.SecondsAgo((int)Math.Ceiling(deadAfter.TotalSeconds))}
            """);
        return Convert.ToInt32(command.ExecuteScalar(), System.Globalization.CultureInfo.InvariantCulture);
    }

    /// <summary>
    /// Every worker that has not stopped gracefully, newest first, and whether it is alive (heartbeat within
    /// <paramref name="deadAfter"/>); with <paramref name="includeStopped"/> also the stopped ones.
    /// </summary>
    public IReadOnlyList<WorkerInfo> List(TimeSpan deadAfter, bool includeStopped = false)
    {
        using var command = _db.Command($"""
            SELECT w.name, w.host, w.pid, w.threads, w.started_at, w.heartbeat_at, w.chunks_done, w.candidates_done,
                   CASE WHEN w.stopped_at IS NULL AND w.heartbeat_at >= {_store.SecondsAgo((int)Math.Ceiling(deadAfter.TotalSeconds))} THEN 1 ELSE 0 END,
                   w.current_candidate_id, c.label, w.current_since
            FROM worker w LEFT JOIN candidate c ON c.id = w.current_candidate_id
            {(includeStopped ? "" : "WHERE w.stopped_at IS NULL")}
            ORDER BY w.started_at DESC, w.name
            """);
        var list = new List<WorkerInfo>();
        using var r = command.ExecuteReader();
        while (r.Read())
            list.Add(new WorkerInfo(r.GetString(0), r.GetString(1), r.GetInt32(2), r.GetInt32(3), r.GetDateTime(4), r.GetDateTime(5),
                r.GetInt64(6), r.GetInt64(7), Convert.ToInt32(r.GetValue(8), System.Globalization.CultureInfo.InvariantCulture) == 1,
                r.IsDBNull(9) ? null : r.GetInt64(9), r.IsDBNull(10) ? null : r.GetString(10), r.IsDBNull(11) ? null : r.GetDateTime(11)));
        return list;
    }
}
