using Hangfire;
using Hangfire.PostgreSql;
using Hangfire.Storage.SQLite;
using IdentityQueue.Screening.Ports;
using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using Npgsql;
using Serilog;
using Serilog.Events;
using Serilog.Formatting.Compact;

namespace IdentityQueue.Worker;

/// <summary>
/// Where the queue lives: a SQLite file of its own beside a SQLite store (one process per store), or the PostgreSQL
/// database of a shared store, through the process's one data source (any number of processes).
/// </summary>
public sealed record QueueStorage(string? SqlitePath, NpgsqlDataSource? PostgreSql)
{
    public static QueueStorage Sqlite(string path) => new(path, null);

    public static QueueStorage Shared(NpgsqlDataSource dataSource) => new(null, dataSource);

    /// <summary>Several worker processes may share this queue (and the store behind it).</summary>
    public bool IsShared => PostgreSql is not null;
}

/// <summary>How a worker host is set up: where its queue and log live, and how loud its console is.</summary>
public sealed record HostPlan(QueueStorage Queue, string LogPath, LogEventLevel ConsoleLevel, bool RunPlannerService);

/// <summary>
/// The generic host of a worker process: Hangfire (queue storage in its own SQLite file, rebuilt from the store at each
/// start), the screening job, the planner, and Serilog (readable console, compact JSON file; levels from
/// appsettings.json and IDQ_-prefixed or Serilog__ environment variables, as the generic host reads them).
/// </summary>
public static class WorkerHost
{
    /// <param name="settings">The worker's settings.</param>
    /// <param name="plan">What the host runs.</param>
    /// <param name="addStore">
    /// Registers the store's implementations of the ports (<see cref="IWorkSource"/>, <see cref="IOutcomeSink"/>,
    /// <see cref="IWorkerRegistry"/>, <see cref="IRecovery"/>); the command line wires them.
    /// </param>
    public static IHost Build(WorkerSettings settings, HostPlan plan, Action<IServiceCollection> addStore)
    {
        var builder = Host.CreateApplicationBuilder(new HostApplicationBuilderSettings
        {
            ContentRootPath = AppContext.BaseDirectory,
            Args = [],
            DisableDefaults = false,
        });
        builder.Configuration.AddEnvironmentVariables("IDQ_");

        builder.Services.AddSerilog((_, log) => log
            .MinimumLevel.Information()
            .MinimumLevel.Override("Hangfire", LogEventLevel.Warning)
            .MinimumLevel.Override("Microsoft", LogEventLevel.Warning)
            .ReadFrom.Configuration(builder.Configuration)
            .Enrich.WithProperty("Worker", settings.WorkerName)
            .WriteTo.Console(restrictedToMinimumLevel: plan.ConsoleLevel, standardErrorFromLevel: LogEventLevel.Verbose,
                outputTemplate: "{Timestamp:HH:mm:ss} {Level:u3} {Message:lj}{NewLine}{Exception}")
            // shared: several worker processes on one machine may write the same file.
            .WriteTo.File(new CompactJsonFormatter(), plan.LogPath, shared: plan.Queue.IsShared));

        builder.Services.AddHangfire(c => c
            .SetDataCompatibilityLevel(CompatibilityLevel.Version_180)
            .UseSimpleAssemblyNameTypeSerializer()
            .UseRecommendedSerializerSettings()
            .UseQueueStorage(plan.Queue, settings));
        // Before the Hangfire server: hosted services stop in reverse order, so the worker signs off after its jobs ended.
        builder.Services.AddHostedService<HeartbeatService>();
        builder.Services.AddHangfireServer(o =>
        {
            o.WorkerCount = settings.Workers;
            o.ServerName = settings.WorkerName;
            o.ShutdownTimeout = TimeSpan.FromSeconds(30);
            o.SchedulePollingInterval = TimeSpan.FromSeconds(1);
        });
        builder.Services.AddSingleton(settings);
        builder.Services.AddSingleton(plan);
        builder.Services.AddSingleton(TimeProvider.System);
        builder.Services.AddSingleton(provider => new WorkerStats(provider.GetRequiredService<TimeProvider>()));
        builder.Services.AddSingleton(new IdentityQueue.Screening.CandidateCompiler(settings.Limits));
        builder.Services.AddTransient<ScreeningJob>();
        builder.Services.AddSingleton<Planner>();
        if (plan.RunPlannerService) builder.Services.AddHostedService<PlannerService>();
        addStore(builder.Services);
        return builder.Build();
    }

    /// <summary>The Hangfire schema's name in a PostgreSQL store (beside the store's own tables in the default schema).</summary>
    public const string QueueSchema = "hangfire";

    /// <summary>
    /// Creates or upgrades Hangfire's tables in a PostgreSQL store. <c>idq init</c> calls it once; workers never do
    /// (PrepareSchemaIfNecessary is off), so that they never race to create schemas.
    /// </summary>
    public static void InstallQueueSchema(NpgsqlDataSource dataSource)
    {
        using var connection = dataSource.OpenConnection();
        PostgreSqlObjectsInstaller.Install(connection, QueueSchema);
    }

    private static IGlobalConfiguration UseQueueStorage(this IGlobalConfiguration configuration, QueueStorage queue, WorkerSettings settings)
    {
        if (queue.PostgreSql is not { } dataSource)
            return configuration.UseSQLiteStorage(queue.SqlitePath!, new SQLiteStorageOptions { QueuePollInterval = TimeSpan.FromMilliseconds(25) });
        return configuration.UsePostgreSqlStorage(o => o.UseConnectionFactory(new DataSourceConnectionFactory(dataSource)),
            new PostgreSqlStorageOptions
            {
                SchemaName = QueueSchema,
                PrepareSchemaIfNecessary = false,
                // A chunk may run for minutes: its worker keeps extending the fetch, and only a dead worker's job becomes
                // visible again, InvisibilityTimeout after its last extension.
                UseSlidingInvisibilityTimeout = true,
                InvisibilityTimeout = settings.InvisibilityTimeout,
                QueuePollInterval = settings.QueuePollInterval,
                // Idle workers wait on LISTEN/NOTIFY and wake when a job is enqueued, instead of only at the next poll.
                EnableLongPolling = true,
                DistributedLockTimeout = TimeSpan.FromMinutes(1),
            });
    }

    /// <summary>Hangfire's connections come from the process's one data source (and its pool).</summary>
    private sealed class DataSourceConnectionFactory(NpgsqlDataSource dataSource) : IConnectionFactory
    {
        public NpgsqlConnection GetOrCreateConnection() => dataSource.CreateConnection();
    }

    /// <summary>Deletes a queue file and its journal files: the store is the truth, and the queue is rebuilt from it.</summary>
    public static void ResetQueue(string queuePath)
    {
        foreach (var suffix in new[] { "", "-wal", "-shm", "-journal" })
            if (File.Exists(queuePath + suffix)) File.Delete(queuePath + suffix);
    }
}

/// <summary>The planner loop of a long-running worker, plus a progress line in the log now and then.</summary>
internal sealed class PlannerService(Planner planner, IWorkSource store, WorkerSettings settings, Microsoft.Extensions.Logging.ILogger<PlannerService> log)
    : BackgroundService
{
    protected override async Task ExecuteAsync(CancellationToken stoppingToken)
    {
        var lastReport = DateTime.UtcNow;
        while (!stoppingToken.IsCancellationRequested)
        {
            try
            {
                planner.Plan();
                if (DateTime.UtcNow - lastReport > TimeSpan.FromSeconds(30))
                {
                    var c = store.Counts();
                    Microsoft.Extensions.Logging.LoggerExtensions.LogInformation(log,
                        "progress: {Settled} of {Total} settled ({Refuted} refuted, {Survived} survived), {InFlight} in flight",
                        c.Settled, c.Total, c.Refuted, c.Survived, c.InFlight);
                    lastReport = DateTime.UtcNow;
                }
            }
            catch (Exception e) when (e is not OutOfMemoryException)
            {
                // The database may be away for a moment (busy, I/O); keep the loop alive and try again.
                Microsoft.Extensions.Logging.LoggerExtensions.LogWarning(log, e, "planning failed; retrying");
            }
            try { await Task.Delay(settings.PlanInterval, stoppingToken); } catch (OperationCanceledException) { }
        }
    }
}

/// <summary>
/// Registers the worker process in the store, beats its heartbeat with its counters, and on a shared store returns dead
/// workers' claims to pending now and then; signs the worker off when the host stops. A store that is away for a while
/// is logged and retried at the next beat.
/// </summary>
internal sealed class HeartbeatService(IWorkerRegistry registry, IRecovery recovery, WorkerSettings settings, WorkerStats stats, HostPlan plan,
    Microsoft.Extensions.Logging.ILogger<HeartbeatService> log) : BackgroundService
{
    public override Task StartAsync(CancellationToken cancellationToken)
    {
        registry.RegisterWorker(settings.WorkerName, settings.Workers);
        return base.StartAsync(cancellationToken);
    }

    protected override async Task ExecuteAsync(CancellationToken stoppingToken)
    {
        var failing = false;
        while (!stoppingToken.IsCancellationRequested)
        {
            try { await Task.Delay(settings.HeartbeatInterval, stoppingToken); } catch (OperationCanceledException) { break; }
            try
            {
                registry.Heartbeat(settings.WorkerName, stats.ChunksDone, stats.CandidatesDone, longest: stats.Longest());
                if (plan.Queue.IsShared)
                {
                    var returned = recovery.RecoverShared(settings.DeadAfter, settings.QueuedStaleAfter);
                    if (returned > 0)
                        Microsoft.Extensions.Logging.LoggerExtensions.LogWarning(log,
                            "returned {Count} candidates of dead workers (or orphaned in the queue) to pending", returned);
                }
                if (failing) Microsoft.Extensions.Logging.LoggerExtensions.LogInformation(log, "the store is reachable again");
                failing = false;
            }
            catch (Exception e) when (e is not OutOfMemoryException)
            {
                failing = true;
                Microsoft.Extensions.Logging.LoggerExtensions.LogWarning(log, "heartbeat failed, the store is away ({Problem}); retrying in {Seconds} s",
                    e.Message, settings.HeartbeatInterval.TotalSeconds);
            }
        }
    }

    public override async Task StopAsync(CancellationToken cancellationToken)
    {
        await base.StopAsync(cancellationToken);
        try
        {
            registry.Heartbeat(settings.WorkerName, stats.ChunksDone, stats.CandidatesDone, stopped: true);
        }
        catch (Exception e) when (e is not OutOfMemoryException)
        {
            Microsoft.Extensions.Logging.LoggerExtensions.LogWarning(log, "could not sign off from the store: {Problem}", e.Message);
        }
    }
}
