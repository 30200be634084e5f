using System.Numerics;
using Hangfire;
using Hangfire.Common;
using Hangfire.States;
using IdentityQueue.Algebra.Syntax;
using IdentityQueue.Screening;
using IdentityQueue.Screening.Ports;

namespace IdentityQueue.Worker.Tests;

/// <summary>
/// An in-memory store behind the worker's ports, keeping the rules the real stores keep (SPEC's result states; trials keyed
/// by (candidate, seq) and never stored twice; a screen result with fewer trials than stored is stale and ignored; claims
/// skip settled candidates). Thread-safe by one lock.
/// </summary>
internal sealed class FakeStore : IWorkSource, IOutcomeSink, IWorkerRegistry, IRecovery
{
    internal sealed class Row
    {
        public required long Id { get; init; }
        public required IdentityEntry? Entry { get; init; }
        public required IReadOnlyDictionary<string, BigInteger> Parameters { get; init; }
        public string? Problem { get; init; }
        public string State { get; set; } = "pending";
        public string? ClaimedBy { get; set; }
        public SortedDictionary<int, TrialRecord> Trials { get; } = [];
        public ScreenResult? Result { get; set; }
        public string? Message { get; set; }
        public int ZeroTrials => Trials.Values.Count(t => t.Outcome == TrialOutcome.Zero);
    }

    private readonly object _gate = new();
    private readonly SortedDictionary<long, Row> _rows = [];

    public ulong Seed { get; init; } = 7;

    /// <summary>The catalogue's evidence target.</summary>
    public EvidenceTarget Target { get; set; } = EvidenceTarget.Default;

    /// <summary>Trial rows inserted, over all saves.</summary>
    public int TrialInserts { get; private set; }

    public int SaveCalls { get; private set; }

    /// <summary>Runs at the start of every save; a test makes it throw (the process "dies" before the commit) or cancel a job.</summary>
    public Action<IReadOnlyList<CandidateOutcome>>? BeforeSave { get; set; }

    public Dictionary<string, (int Threads, long Chunks, long Candidates, bool Stopped)> Workers { get; } = [];

    /// <summary>Adds a candidate from a catalogue line (every instance of a family), pending; returns the ids.</summary>
    public IReadOnlyList<long> Add(string line)
    {
        var parsed = CatalogueParser.ParseIdentity(line);
        Assert.True(parsed.Success, $"parse failed: {parsed.Error}");
        var expanded = Algebra.Compile.FamilyExpander.Expand(parsed.Value);
        Assert.True(expanded.Success, $"expansion failed: {expanded.Error}");
        var ids = new List<long>();
        lock (_gate)
            foreach (var p in expanded.Instances)
            {
                var id = _rows.Count + 1;
                _rows[id] = new Row { Id = id, Entry = parsed.Value with { Parameters = [] }, Parameters = p };
                ids.Add(id);
            }
        return ids;
    }

    /// <summary>Adds a candidate whose stored text did not parse.</summary>
    public long AddUnreadable(string problem)
    {
        lock (_gate)
        {
            var id = _rows.Count + 1;
            _rows[id] = new Row { Id = id, Entry = null, Parameters = new Dictionary<string, BigInteger>(), Problem = problem };
            return id;
        }
    }

    public Row this[long id] { get { lock (_gate) return _rows[id]; } }

    public IReadOnlyList<Row> Rows { get { lock (_gate) return [.. _rows.Values]; } }

    /// <summary>What a test compares between runs: each candidate's state, message and trials (seq, outcome, point seed).</summary>
    public IReadOnlyList<string> Snapshot()
    {
        lock (_gate)
            return [.. _rows.Values.Select(r => $"{r.Id} {r.State} {r.Message} [{string.Join(" ", r.Trials.Values.Select(t => $"{t.Seq}:{t.Outcome}:{t.PointSeed}"))}]")];
    }

    public StateCounts Counts()
    {
        lock (_gate)
        {
            long Of(string s) => _rows.Values.Count(r => r.State == s);
            return new StateCounts(Of("pending"), Of("queued"), Of("screening"), Of("refuted"), Of("survived"), Of("undecided"), Of("invalid"), Of("failed"));
        }
    }

    public int EnsureResultRows() => 0;

    /// <summary>What growing the open-ended families does (the test's choice); none by default.</summary>
    public Func<FakeStore, int>? Grow { get; set; }

    public int GrowOpenFamilies() => Grow?.Invoke(this) ?? 0;

    public PlannedWork TakePending(IReadOnlyList<WorkStage> stages, int max, Action<WorkStage, IReadOnlyList<long>>? beforeCommit = null)
    {
        lock (_gate)
        {
            foreach (var stage in stages)
            {
                var ids = _rows.Values.Where(r => r.State == "pending" && stage.Contains(r.ZeroTrials)).Take(max).Select(r => r.Id).ToList();
                if (ids.Count == 0) continue;
                beforeCommit?.Invoke(stage, ids); // throws: nothing is committed, the rows stay pending
                foreach (var id in ids) _rows[id].State = "queued";
                return new PlannedWork(stage, [.. ids]);
            }
            return PlannedWork.None;
        }
    }

    public IReadOnlyList<CandidateWork> Claim(IReadOnlyList<long> ids, string worker)
    {
        lock (_gate)
        {
            var claimed = new List<CandidateWork>();
            foreach (var id in ids)
            {
                if (!_rows.TryGetValue(id, out var r) || r.State is not ("pending" or "queued" or "screening")) continue;
                r.State = "screening";
                r.ClaimedBy = worker;
                var key = r.Entry is null ? (ulong)id : CandidateKey.Of(r.Entry, r.Parameters);
                claimed.Add(new CandidateWork(id, Seed, key, Target, r.Entry, r.Parameters, r.Problem, [.. r.Trials.Values], $"c{id}"));
            }
            return claimed;
        }
    }

    public void Save(IReadOnlyList<CandidateOutcome> outcomes, string worker)
    {
        BeforeSave?.Invoke(outcomes);
        lock (_gate)
        {
            SaveCalls++;
            foreach (var o in outcomes)
            {
                if (!_rows.TryGetValue(o.CandidateId, out var r)) continue;
                if (!o.IsScreened)
                {
                    r.State = o.Kind == OutcomeKind.Invalid ? "invalid" : "failed";
                    r.Message = o.Message;
                    r.ClaimedBy = null;
                    continue;
                }
                foreach (var t in o.Screen.Trials)
                    if (r.Trials.TryAdd(t.Seq, t)) TrialInserts++;
                if (o.Screen.Trials.Count < r.Trials.Count) continue; // stale: a later screening got there first
                r.State = o.Screen.Verdict.ToString().ToLowerInvariant();
                r.Result = o.Screen;
                r.Message = o.Message;
                r.ClaimedBy = null;
            }
        }
    }

    public void Release(IReadOnlyList<long> ids)
    {
        lock (_gate)
            foreach (var id in ids)
                if (_rows.TryGetValue(id, out var r) && r.State is "queued" or "screening") { r.State = "pending"; r.ClaimedBy = null; }
    }

    public int Recover()
    {
        lock (_gate)
        {
            var open = _rows.Values.Where(r => r.State is "queued" or "screening").ToList();
            foreach (var r in open) { r.State = "pending"; r.ClaimedBy = null; }
            return open.Count;
        }
    }

    public int RecoverShared(TimeSpan deadAfter, TimeSpan queuedStaleAfter) => Recover();

    public int ReleaseClaimsOf(string worker)
    {
        lock (_gate)
        {
            var mine = _rows.Values.Where(r => r.State == "screening" && r.ClaimedBy == worker).ToList();
            foreach (var r in mine) { r.State = "pending"; r.ClaimedBy = null; }
            return mine.Count;
        }
    }

    public void RegisterWorker(string name, int threads)
    {
        lock (_gate) Workers[name] = (threads, 0, 0, false);
    }

    public void Heartbeat(string name, long chunksDone, long candidatesDone, bool stopped = false, InFlightCandidate? longest = null)
    {
        lock (_gate) Workers[name] = (Workers[name].Threads, chunksDone, candidatesDone, stopped);
    }

    public int LiveThreads(TimeSpan deadAfter)
    {
        lock (_gate) return Workers.Values.Where(w => !w.Stopped).Sum(w => w.Threads);
    }
}

/// <summary>A queue client that keeps the jobs it is given (Hangfire's enqueue goes through <see cref="Create"/>).</summary>
internal sealed class RecordingJobs : IBackgroundJobClient
{
    public List<Job> Jobs { get; } = [];

    /// <summary>Throws on the n-th job (1-based), as a queue whose database went away.</summary>
    public int? FailAt { get; set; }

    public string Create(Job job, IState state)
    {
        if (FailAt == Jobs.Count + 1) throw new InvalidOperationException("the queue is away");
        Jobs.Add(job);
        return Jobs.Count.ToString(System.Globalization.CultureInfo.InvariantCulture);
    }

    public bool ChangeState(string jobId, IState state, string expectedState) => true;

    /// <summary>The stage and ids of each job.</summary>
    public IReadOnlyList<(int Stage, long[] Ids)> Chunks => [.. Jobs.Select(j => ((int)j.Args[0], (long[])j.Args[1]))];
}
