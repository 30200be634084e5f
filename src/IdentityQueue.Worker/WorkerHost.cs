using Hangfire;
using Hangfire.Storage.SQLite;
using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using Serilog;
using Serilog.Events;
using Serilog.Formatting.Compact;

namespace IdentityQueue.Worker;

/// <summary>How a worker host is set up: where its queue and log live, and how loud its console is.</summary>
public sealed record HostPlan(string QueuePath, string LogPath, LogEventLevel ConsoleLevel, bool RunPlannerService);

/// <summary>
/// The generic host of a worker process: Hangfire (queue storage in its own SQLite file, rebuilt from the store at each
/// start), the screening job, the planner, and Serilog (readable console, compact JSON file; levels from
/// appsettings.json and IDQ_-prefixed or Serilog__ environment variables, as the generic host reads them).
/// </summary>
public static class WorkerHost
{
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
            .WriteTo.File(new CompactJsonFormatter(), plan.LogPath));

        builder.Services.AddHangfire(c => c
            .SetDataCompatibilityLevel(CompatibilityLevel.Version_180)
            .UseSimpleAssemblyNameTypeSerializer()
            .UseRecommendedSerializerSettings()
            .UseSQLiteStorage(plan.QueuePath, new SQLiteStorageOptions { QueuePollInterval = TimeSpan.FromMilliseconds(25) }));
        builder.Services.AddHangfireServer(o =>
        {
            o.WorkerCount = settings.Workers;
            o.ServerName = settings.WorkerName;
            o.ShutdownTimeout = TimeSpan.FromSeconds(30);
            o.SchedulePollingInterval = TimeSpan.FromSeconds(1);
        });
        builder.Services.AddSingleton(settings);
        builder.Services.AddTransient<ScreeningJob>();
        builder.Services.AddSingleton<Planner>();
        if (plan.RunPlannerService) builder.Services.AddHostedService<PlannerService>();
        addStore(builder.Services);
        return builder.Build();
    }

    /// <summary>Deletes a queue file and its journal files: the store is the truth, and the queue is rebuilt from it.</summary>
    public static void ResetQueue(string queuePath)
    {
        foreach (var suffix in new[] { "", "-wal", "-shm", "-journal" })
            if (File.Exists(queuePath + suffix)) File.Delete(queuePath + suffix);
    }
}

/// <summary>The planner loop of a long-running worker, plus a progress line in the log now and then.</summary>
internal sealed class PlannerService(Planner planner, IScreeningStore store, WorkerSettings settings, Microsoft.Extensions.Logging.ILogger<PlannerService> log)
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
