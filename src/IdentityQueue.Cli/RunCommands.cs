using System.CommandLine;
using System.Diagnostics;
using IdentityQueue.Algebra;
using IdentityQueue.Screening;
using IdentityQueue.Screening.Ports;
using IdentityQueue.Store;
using IdentityQueue.Store.Read;
using IdentityQueue.Store.Schema;
using IdentityQueue.Store.Work;
using IdentityQueue.Worker;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Logging;
using Spectre.Console;

namespace IdentityQueue.Cli;

/// <summary><c>idq run</c>, <c>idq worker</c> and <c>idq enqueue</c>: the batch, on an in-process Hangfire server.</summary>
internal static class RunCommands
{
    private sealed record RunArgs(StoreOptions Db, Option<int?> Workers, Option<int?> Target, Option<int> Chunk, Option<int?> Invisibility, Option<bool> TwoPass,
        Option<double> Time, Option<bool> NoDetails);

    private static RunArgs Arguments(Command command, bool target, bool screens = true)
    {
        var args = new RunArgs(
            new StoreOptions(),
            new Option<int?>("--workers") { Description = "Worker threads in this process (default: the number of cores)." },
            new Option<int?>("--target-bits") { Description = "Raise the evidence wanted to 2^-B; survivors short of it get more trials, nothing settled is redone." },
            new Option<int>("--chunk-size") { Description = "Candidates per queue job.", DefaultValueFactory = _ => 1000 },
            new Option<int?>("--invisibility-timeout")
            {
                HelpName = "SECONDS",
                Description = "PostgreSQL only: a chunk whose worker died goes back to the queue this long after the worker's last sign of life (default 120).",
            },
            new Option<bool>("--two-pass")
            {
                Description = "First give every candidate its cheap stage of trials, then the survivors the rest: a partial run holds nearly all refutations, but the whole run is slower.",
            },
            CheckCommand.TimeOption(),
            CheckCommand.NoDetailsOption());
        args.Db.AddTo(command);
        command.Options.Add(args.Workers);
        if (target) command.Options.Add(args.Target);
        command.Options.Add(args.Chunk);
        command.Options.Add(args.Invisibility);
        command.Options.Add(args.TwoPass);
        if (screens) command.Options.Add(args.Time);
        if (screens) command.Options.Add(args.NoDetails);
        return args;
    }

    public static Command Run(TextWriter output, TextWriter error)
    {
        var command = new Command("run", "The main job: enqueue everything pending, screen it with an in-process worker pool, show progress, and exit when every candidate has a final state.\n\n" +
            "Examples:\n  idq run\n  idq run --db night.db --workers 2\n  idq run --target-bits 128   # more evidence for the survivors only\n" +
            "  idq run --summary run.json --on-finish 'mail -s \"idq done\" me@example.org < \"$IDQ_SUMMARY\"'");
        var a = Arguments(command, target: true);
        var end = new RunEnd(
            new Option<string?>("--summary")
            {
                HelpName = "FILE",
                Description = $"At the end, write a JSON summary: counts per state per catalogue, elapsed time, throughput, each catalogue's seed and version, and up to {RunSummary.LabelsListed} survived and refuted labels per catalogue.",
            },
            new Option<string?>("--on-finish")
            {
                HelpName = "COMMAND",
                Description = $"At the end, run COMMAND with /bin/sh -c (cmd.exe /c on Windows) and wait for it; it finds the summary's path in ${RunSummary.SummaryVariable} " +
                    $"(a temporary file without --summary), the run's exit code in ${RunSummary.ExitCodeVariable} and the store in ${RunSummary.StoreVariable}. Its exit code is printed and never changes idq's.",
            });
        command.Options.Add(end.Summary);
        command.Options.Add(end.OnFinish);
        command.SetAction(parse => Execute(parse, a, output, error, RunMode.ToCompletion, end));
        return command;
    }

    public static Command Worker(TextWriter output, TextWriter error)
    {
        var command = new Command("worker", "A long-running worker for overnight batches: screens whatever becomes pending (also rows inserted by hand) until SIGINT/SIGTERM, then stops gracefully.\n\n" +
            "Examples:\n  idq worker --db night.db --workers 2\n  nohup idq worker --db night.db > worker.out 2>&1 &   # stop with kill -TERM; chunks in flight are finished or released");
        var a = Arguments(command, target: false);
        command.SetAction(parse => Execute(parse, a, output, error, RunMode.UntilStopped));
        return command;
    }

    public static Command Enqueue(TextWriter output, TextWriter error)
    {
        var command = new Command("enqueue", "Enqueue pending candidates (also rows inserted by hand) without working on them; a later 'idq run' or 'idq worker' screens them.\n\n" +
            "Examples:\n  idq enqueue --db night.db\n  idq enqueue --db night.db --target-bits 128   # survivors short of 2^-128 get more trials later");
        var a = Arguments(command, target: true, screens: false);
        command.SetAction(parse => Execute(parse, a, output, error, RunMode.EnqueueOnly));
        return command;
    }

    private enum RunMode { ToCompletion, UntilStopped, EnqueueOnly }

    /// <summary><c>idq run</c>'s end: the summary file and the command to run.</summary>
    private sealed record RunEnd(Option<string?> Summary, Option<string?> OnFinish);

    private static int Execute(ParseResult parse, RunArgs a, TextWriter output, TextWriter error, RunMode mode, RunEnd? end = null)
    {
        if (a.Db.Conflict(parse) is { } conflict)
        {
            error.WriteLine($"idq: {conflict}");
            return ExitCodes.BadInput;
        }
        var location = a.Db.Location(parse);
        var path = location.Display;
        var settings = new WorkerSettings
        {
            Workers = parse.GetValue(a.Workers) ?? Environment.ProcessorCount,
            ChunkSize = parse.GetValue(a.Chunk),
            TwoPass = parse.GetValue(a.TwoPass),
        };
        if (parse.GetValue(a.NoDetails)) settings = settings with { Policy = settings.Policy with { RefutationDetails = false } };
        if (parse.GetValue(a.Invisibility) is int seconds) settings = settings with { InvisibilityTimeout = TimeSpan.FromSeconds(seconds) };
        var problems = settings.Validate();
        if (mode != RunMode.EnqueueOnly)
        {
            var budget = TimeBudget.Create(parse.GetValue(a.Time));
            if (budget.Success) settings = settings with { Budget = budget.Value };
            else problems = [.. problems, budget.Error.Message];
        }
        EvidenceTarget? target = null;
        if (parse.GetValue(a.Target) is int bits)
        {
            var given = EvidenceTarget.Create(bits);
            if (given.Success) target = given.Value;
            else problems = [.. problems, given.Error.Message];
        }
        var summaryPath = end is null ? null : parse.GetValue(end.Summary);
        var onFinish = end is null ? null : parse.GetValue(end.OnFinish);
        if (summaryPath is not null && RunSummary.Check(summaryPath) is { } badSummary) problems = [.. problems, badSummary];
        if (onFinish is not null && string.IsNullOrWhiteSpace(onFinish)) problems = [.. problems, "--on-finish: the command is empty"];
        if (problems.Count > 0)
        {
            foreach (var p in problems) error.WriteLine($"idq: {p}");
            return ExitCodes.BadInput;
        }
        long settledBefore = 0;
        try
        {
            using var store = StoreConnection.Open(location);
            store.EnsureCurrent();
            var queue = new WorkQueue(store);
            if (target is { } raised)
            {
                var reopened = queue.RaiseTarget(raised);
                if (reopened > 0) output.WriteLine($"target {raised}: {reopened} survivors get more trials");
            }
            if (summaryPath is not null || onFinish is not null)
                settledBefore = StatusCounts.Read(store).Counts.Where(c => c.State.IsFinal()).Sum(c => c.Count);
        }
        catch (StoreUnavailableException e)
        {
            error.WriteLine($"idq: {e.Message}");
            return ExitCodes.BadInput;
        }

        var interactive = mode == RunMode.ToCompletion && !Console.IsOutputRedirected && ReferenceEquals(output, Console.Out);
        // The store's implementation of the worker's ports (retrying while a PostgreSQL server is away), one instance for all four.
        void AddStore(IServiceCollection services)
        {
            services.AddSingleton(provider => StoreWorkPorts.ForWorker(location, settings.Limits,
                provider.GetRequiredService<ILoggerFactory>().CreateLogger("IdentityQueue.Store"), provider.GetRequiredService<TimeProvider>()));
            services.AddSingleton<IWorkSource>(provider => provider.GetRequiredService<RetryingWorkPorts>());
            services.AddSingleton<IOutcomeSink>(provider => provider.GetRequiredService<RetryingWorkPorts>());
            services.AddSingleton<IWorkerRegistry>(provider => provider.GetRequiredService<RetryingWorkPorts>());
            services.AddSingleton<IRecovery>(provider => provider.GetRequiredService<RetryingWorkPorts>());
        }
        var opened = location.IsPostgreSql
            ? Result<WorkerSession>.Ok(WorkerSession.OpenShared(QueueStorage.Shared(StoreConnection.DataSource(location.Target)), SharedLogPath,
                settings, longRunning: mode == RunMode.UntilStopped, quiet: mode != RunMode.UntilStopped, AddStore))
            : WorkerSession.Open(location.Target, settings, longRunning: mode == RunMode.UntilStopped, quiet: mode != RunMode.UntilStopped, AddStore);
        if (!opened.Success)
        {
            if (mode == RunMode.EnqueueOnly)
            {
                // A worker is running on this store: it plans pending work itself; make sure hand-inserted rows are seen.
                using var store = StoreConnection.Open(location);
                var added = new CandidateStore(store).EnsureResultRows();
                output.WriteLine($"a worker is running on {path}; it will screen the pending candidates ({added} new rows made pending)");
                return ExitCodes.Success;
            }
            error.WriteLine($"idq: {opened.Error.Message}");
            return ExitCodes.BadInput;
        }
        using var session = opened.Value;
        switch (mode)
        {
            case RunMode.EnqueueOnly:
                output.WriteLine($"enqueued {session.EnqueueOnly()} candidates on {path}; 'idq run' or 'idq worker' screens them");
                return ExitCodes.Success;
            case RunMode.UntilStopped:
            {
                output.WriteLine($"worker {settings.WorkerName} on {path} with {settings.Workers} threads, {settings.Budget} per candidate; " +
                    "Ctrl+C (or SIGTERM) stops it gracefully, a second one at once");
                // The host's console lifetime stops the worker at the first signal; StopSignals adds the second.
                using var signals = new StopSignals();
                session.RunUntilStopped();
                return ExitCodes.Success;
            }
        }

        var startedAt = DateTime.UtcNow;
        var clock = Stopwatch.StartNew();
        using var stop = new StopSignals();
        var final = interactive ? RunWithProgressBar(session, clock, stop.Token) : session.RunToCompletion(
            c => output.WriteLine($"{clock.Elapsed:hh\\:mm\\:ss}  {Progress(c, clock, session)}"), TimeSpan.FromSeconds(10), stop.Token);
        output.WriteLine();
        output.WriteLine(stop.Stopping ? "stopped; the rest stays pending for the next run" : "done");
        output.WriteLine($"  {final.Settled} of {final.Total} candidates settled in {clock.Elapsed.TotalSeconds:F1} s: " +
            $"{final.Refuted} refuted, {final.Survived} survived (very likely true), {final.Undecided} undecided, {final.Invalid} invalid, {final.Failed} failed");
        output.WriteLine("  Screening is evidence, not proof: each survivor's error bound is only as good as its degree bound.");
        output.WriteLine($"  idq status {location.Option}    idq sql \"select * from survivors\" {location.Option}");
        var code = final.Failed > 0 ? ExitCodes.Found : ExitCodes.Success;
        if (summaryPath is not null || onFinish is not null)
            Finish(output, error, location, summaryPath, onFinish, new RunSummary.Facts(path, startedAt, clock.Elapsed, settledBefore, final, stop.Stopping, code));
        return code;
    }

    /// <summary>Writes the summary and runs the --on-finish command; a failure of either is reported, never the run's exit code.</summary>
    private static void Finish(TextWriter output, TextWriter error, StoreLocation location, string? summaryPath, string? onFinish, RunSummary.Facts facts)
    {
        var written = summaryPath ?? Path.Combine(Path.GetTempPath(), $"idq-summary-{Environment.ProcessId}-{Guid.NewGuid():N}.json");
        try
        {
            using var store = StoreConnection.Open(location);
            RunSummary.Write(written, store, facts);
            if (summaryPath is not null) output.WriteLine($"  summary: {summaryPath}");
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException or StoreUnavailableException or System.Data.Common.DbException)
        {
            error.WriteLine($"idq: the summary could not be written to {written}: {e.Message}");
        }
        if (onFinish is null) return;
        var (exit, problem) = RunSummary.OnFinish(onFinish, written, facts.ExitCode, facts.Store);
        if (problem is not null) error.WriteLine($"idq: --on-finish could not run: {problem}");
        else if (exit == 0) output.WriteLine($"  --on-finish: exit code 0");
        else error.WriteLine($"idq: --on-finish exited with code {exit} (the run's own exit code is unchanged)");
        if (summaryPath is null) File.Delete(written);
    }

    /// <summary>The log of worker processes on a PostgreSQL store: in the working directory, shared by the processes there.</summary>
    internal const string SharedLogPath = "idq-worker.log.jsonl";

    /// <summary>A candidate screened longer than this is named in the progress line.</summary>
    private static readonly TimeSpan SlowAfter = TimeSpan.FromSeconds(5);

    private static string Progress(StateCounts c, Stopwatch clock, WorkerSession session)
    {
        var rate = c.Settled / Math.Max(clock.Elapsed.TotalSeconds, 1e-3);
        var left = c.Total - c.Settled;
        var eta = rate > 0 && left > 0 ? TimeSpan.FromSeconds(left / rate).ToString(@"hh\:mm\:ss") : "-";
        var line = $"{c.Settled}/{c.Total} settled, {c.Refuted} refuted, {c.Survived} survived, {rate:F0}/s, ETA {eta}";
        if (session.LongestInFlight is { } slow && DateTime.UtcNow - slow.Since >= SlowAfter)
            line += $"; waiting on one slow candidate: {slow.Label} (#{slow.Id}) for {(DateTime.UtcNow - slow.Since).TotalSeconds:F0} s";
        return line;
    }

    private static StateCounts RunWithProgressBar(WorkerSession session, Stopwatch clock, CancellationToken cancellation)
    {
        StateCounts final = null!;
        AnsiConsole.Progress()
            .AutoClear(false)
            .Columns(new TaskDescriptionColumn(), new ProgressBarColumn(), new PercentageColumn(), new RemainingTimeColumn())
            .Start(ctx =>
            {
                var task = ctx.AddTask("screening", maxValue: 1);
                final = session.RunToCompletion(c =>
                {
                    task.MaxValue = Math.Max(1, c.Total);
                    task.Value = c.Settled;
                    task.Description = Progress(c, clock, session);
                }, TimeSpan.FromMilliseconds(250), cancellation);
            });
        return final;
    }
}
