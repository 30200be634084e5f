using IdentityQueue.Store;
using IdentityQueue.Store.Work;
using static IdentityQueue.Cli.Tests.StoreEndToEndTests;

namespace IdentityQueue.Cli.Tests.Postgres;

/// <summary>
/// The work queue's SQL on a real PostgreSQL server with several connections at once, as several worker processes use
/// it: planners racing for pending candidates never take the same one, and recovery returns only dead workers' claims.
/// The oracle is plain counting: every candidate is taken exactly once.
/// </summary>
public sealed class PostgresQueueTests : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("idq-pgq-").FullName;
    private readonly string _pg;

    public PostgresQueueTests()
    {
        _pg = PostgresServer.Missing is null || ExternalTools.Required ? PostgresServer.CreateDatabase() : "";
    }

    public void Dispose()
    {
        if (_pg.Length > 0) PostgresServer.DropDatabase(_pg);
        try { Directory.Delete(_dir, recursive: true); } catch (IOException) { }
    }

    private void Import(int n)
    {
        var file = Path.Combine(_dir, "q.idq");
        File.WriteAllText(file, $"sq: (x + n)^2 = x^2 + 2*n*x + n^2 for n in 1..{n}\n");
        Assert.Equal(0, Idq("init", "--postgres", _pg).Code);
        Assert.Equal(0, Idq("import", file, "--postgres", _pg, "--seed", "1").Code);
    }

    [PostgresFact]
    public void ConcurrentPlanners_NeverTakeTheSameCandidate()
    {
        Import(3000);
        var taken = new System.Collections.Concurrent.ConcurrentBag<long>();
        Parallel.For(0, 6, new ParallelOptions { MaxDegreeOfParallelism = 6 }, _ =>
        {
            using var store = StoreConnection.OpenPostgreSql(_pg);
            var queue = new WorkQueue(store);
            while (true)
            {
                var (_, ids) = queue.TakePending(37);
                if (ids.Count == 0) break;
                foreach (var id in ids) taken.Add(id);
            }
        });
        Assert.Equal(3000, taken.Count);
        Assert.Equal(3000, taken.Distinct().Count());
    }

    // A planner that fails (or dies) while enqueuing leaves its candidates pending, never queued with no job; while it
    // enqueues, the rows it took are locked and another planner skips them.
    [PostgresFact]
    public void FailedEnqueue_LeavesTheCandidatesPending_AndOtherPlannersSkipRowsBeingTaken()
    {
        Import(30);
        using var store = StoreConnection.OpenPostgreSql(_pg);
        using var other = StoreConnection.OpenPostgreSql(_pg);
        var queue = new WorkQueue(store);
        IReadOnlyList<long> seenByOther = [];
        Assert.Throws<InvalidOperationException>(() => queue.TakePending(10, (_, ids) =>
        {
            Assert.Equal(10, ids.Count);
            seenByOther = new WorkQueue(other).TakePending(100).Ids; // the other planner takes the 20 rows not locked
            throw new InvalidOperationException("the queue is away");
        }));
        Assert.Equal(20, seenByOther.Count);
        Assert.Equal(10L, queue.CountByState()["pending"]);
        Assert.Equal(20L, queue.CountByState()["queued"]);
        var (_, again) = queue.TakePending(100, (_, _) => { });
        Assert.Equal(10, again.Count);
        Assert.Empty(again.Intersect(seenByOther));
    }

    [PostgresFact]
    public void SharedRecovery_ReturnsOnlyTheClaimsOfDeadWorkers()
    {
        Import(20);
        using var store = StoreConnection.OpenPostgreSql(_pg);
        var queue = new WorkQueue(store);
        var registry = new WorkerRegistry(store);
        registry.Register("alive:1", "alive", 1, 1);
        registry.Register("dead:2", "dead", 2, 1);
        var (_, ids) = queue.TakePending(20);
        queue.Claim(ids.Take(10).ToList(), "alive:1");
        queue.Claim(ids.Skip(10).ToList(), "dead:2");
        using (var age = store.Connection.CreateCommand())
        {
            // dead:2 last beat ten minutes ago, and its claims are as old
            age.CommandText = """
                UPDATE worker SET heartbeat_at = now() - interval '10 minutes' WHERE name = 'dead:2';
                UPDATE result SET claimed_at = now() - interval '10 minutes' WHERE claimed_by = 'dead:2';
                """;
            age.ExecuteNonQuery();
        }
        Assert.Equal(10, queue.RecoverShared(TimeSpan.FromSeconds(60), TimeSpan.FromHours(2)));
        Assert.Equal(10L, queue.CountByState()["pending"]);
        Assert.Equal(10L, queue.CountByState()["screening"]);
        Assert.Equal(1, registry.List(TimeSpan.FromSeconds(60)).Count(w => w.Live));
        Assert.Equal(1, registry.LiveThreads(TimeSpan.FromSeconds(60)));
    }
}
