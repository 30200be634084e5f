using IdentityQueue.Algebra;
using IdentityQueue.Screening;
using IdentityQueue.Store;
using IdentityQueue.Store.Work;
using IdentityQueue.Worker;
using StoreOutcome = IdentityQueue.Store.Work.CandidateOutcome;
using WorkerOutcome = IdentityQueue.Worker.CandidateOutcome;

namespace IdentityQueue.Cli;

/// <summary>
/// The workers' port onto a SQLite store: each call opens its own connection (cheap; connections are not thread-safe and
/// Hangfire runs jobs on several threads). Thread-safe.
/// </summary>
internal sealed class SqliteWorkerStore(string path, Limits limits) : IScreeningStore
{
    private StoreConnection Open() => StoreConnection.OpenSqlite(path);

    public int Recover()
    {
        using var c = Open();
        return new WorkQueue(c).Recover();
    }

    public int EnsureResultRows()
    {
        using var c = Open();
        return new CandidateStore(c).EnsureResultRows();
    }

    public PlannedWork TakePending(int max)
    {
        using var c = Open();
        var (stage, ids) = new WorkQueue(c).TakePending(max);
        return new PlannedWork(stage, ids);
    }

    public IReadOnlyList<CandidateWork> Claim(IReadOnlyList<long> ids, string worker)
    {
        using var c = Open();
        return new WorkQueue(c).Claim(ids, worker).Select(claimed =>
        {
            var s = claimed.Candidate;
            var bound = s.Bind(limits);
            return new CandidateWork(s.Id, unchecked((ulong)s.CatalogueSeed), s.CatalogueTargetBits, bound.Entry, bound.Parameters, bound.Error, claimed.Trials);
        }).ToList();
    }

    public void Save(IReadOnlyList<WorkerOutcome> outcomes, string worker)
    {
        if (outcomes.Count == 0) return;
        using var c = Open();
        new CandidateStore(c).Save(outcomes.Select(o =>
            o.Result is not null ? StoreOutcome.Screened(o.Id, o.Result)
            : o.Invalid is not null ? StoreOutcome.Invalid(o.Id, o.Invalid)
            : StoreOutcome.Failed(o.Id, o.Failed ?? "failed")).ToList(), worker);
    }

    public void Release(IReadOnlyList<long> ids)
    {
        if (ids.Count == 0) return;
        using var c = Open();
        new WorkQueue(c).Release(ids);
    }

    public StateCounts Counts()
    {
        using var c = Open();
        var n = new WorkQueue(c).CountByState();
        long Of(string s) => n.TryGetValue(s, out var v) ? v : 0;
        return new StateCounts(Of("pending"), Of("queued"), Of("screening"), Of("refuted"), Of("survived"), Of("undecided"), Of("invalid"), Of("failed"));
    }
}
