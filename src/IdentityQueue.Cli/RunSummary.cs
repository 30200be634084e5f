using System.Diagnostics;
using System.Globalization;
using System.Text.Json;
using IdentityQueue.Screening.Ports;
using IdentityQueue.Store;
using IdentityQueue.Store.Read;
using IdentityQueue.Store.Schema;

namespace IdentityQueue.Cli;

/// <summary>
/// The end of <c>idq run</c>: the JSON summary file (<c>--summary FILE</c>) and the command run when the run ends
/// (<c>--on-finish "COMMAND"</c>, through <c>/bin/sh -c</c>, or <c>cmd.exe /c</c> on Windows), which finds the summary's path
/// in <see cref="SummaryVariable"/>. Neither changes the run's exit code.
/// </summary>
internal static class RunSummary
{
    /// <summary>The environment variable holding the summary file's path, for the <c>--on-finish</c> command.</summary>
    public const string SummaryVariable = "IDQ_SUMMARY";

    /// <summary>The environment variable holding the run's exit code, for the <c>--on-finish</c> command.</summary>
    public const string ExitCodeVariable = "IDQ_EXIT_CODE";

    /// <summary>The environment variable holding the store (path or redacted PostgreSQL address), for the <c>--on-finish</c> command.</summary>
    public const string StoreVariable = "IDQ_STORE";

    /// <summary>How many survived and how many refuted labels the summary lists per catalogue (the counts are always complete).</summary>
    public const int LabelsListed = 100;

    /// <summary>Why <paramref name="path"/> cannot take the summary (its folder does not exist), or null.</summary>
    public static string? Check(string path)
    {
        var folder = Path.GetDirectoryName(Path.GetFullPath(path));
        return folder is not null && !Directory.Exists(folder) ? $"--summary {path}: the folder {folder} does not exist" : null;
    }

    /// <summary>What the run did, as the summary needs it.</summary>
    public sealed record Facts(string Store, DateTime StartedAt, TimeSpan Elapsed, long SettledBefore, StateCounts Final, bool Stopped, int ExitCode);

    /// <summary>Writes the summary as one JSON object (indented UTF-8) to <paramref name="path"/>.</summary>
    public static void Write(string path, StoreConnection store, Facts facts)
    {
        var counts = StatusCounts.Read(store).ByCatalogue().ToDictionary(c => c.Catalogue, c => c.States, StringComparer.Ordinal);
        var catalogues = RunSummaryRows.Read(store, LabelsListed);
        var settledThisRun = Math.Max(0, facts.Final.Settled - facts.SettledBefore);
        using var stream = new FileStream(path, FileMode.Create, FileAccess.Write);
        using var w = new Utf8JsonWriter(stream, new JsonWriterOptions { Indented = true });
        w.WriteStartObject();
        w.WriteString("store", facts.Store);
        w.WriteString("startedAt", facts.StartedAt.ToString("yyyy-MM-ddTHH:mm:ssZ", CultureInfo.InvariantCulture));
        w.WriteString("finishedAt", (facts.StartedAt + facts.Elapsed).ToString("yyyy-MM-ddTHH:mm:ssZ", CultureInfo.InvariantCulture));
        w.WriteNumber("elapsedSeconds", Math.Round(facts.Elapsed.TotalSeconds, 3));
        w.WriteBoolean("stopped", facts.Stopped);
        w.WriteNumber("exitCode", facts.ExitCode);
        w.WriteNumber("settledThisRun", settledThisRun);
        w.WriteNumber("candidatesPerSecond", Math.Round(settledThisRun / Math.Max(facts.Elapsed.TotalSeconds, 1e-3), 1));
        w.WriteStartObject("totals");
        foreach (var state in ResultStates.Values)
            w.WriteNumber(state.Text(), counts.Values.Sum(c => c.GetValueOrDefault(state)));
        w.WriteEndObject();
        w.WriteNumber("labelsListed", LabelsListed);
        w.WriteStartArray("catalogues");
        foreach (var c in catalogues)
        {
            w.WriteStartObject();
            w.WriteString("name", c.Name);
            w.WriteString("seed", c.Seed.ToString(CultureInfo.InvariantCulture));
            w.WriteNumber("version", c.Version);
            w.WriteStartObject("states");
            var states = counts.GetValueOrDefault(c.Name);
            foreach (var state in ResultStates.Values) w.WriteNumber(state.Text(), states?.GetValueOrDefault(state) ?? 0);
            w.WriteEndObject();
            w.WriteStartArray("survived");
            foreach (var label in c.Survived) w.WriteStringValue(label);
            w.WriteEndArray();
            w.WriteStartArray("refuted");
            foreach (var label in c.Refuted) w.WriteStringValue(label);
            w.WriteEndArray();
            w.WriteEndObject();
        }
        w.WriteEndArray();
        w.WriteEndObject();
    }

    /// <summary>
    /// Runs <paramref name="command"/> through the shell, with the summary's path, the run's exit code and the store in the
    /// environment, its output going where idq's goes, and waits for it; its exit code, or null with the reason when it could not start.
    /// </summary>
    public static (int? ExitCode, string? Problem) OnFinish(string command, string summaryPath, int exitCode, string store)
    {
        var windows = OperatingSystem.IsWindows();
        var start = new ProcessStartInfo(windows ? "cmd.exe" : "/bin/sh") { UseShellExecute = false };
        start.ArgumentList.Add(windows ? "/c" : "-c");
        start.ArgumentList.Add(command);
        start.Environment[SummaryVariable] = summaryPath;
        start.Environment[ExitCodeVariable] = exitCode.ToString(CultureInfo.InvariantCulture);
        start.Environment[StoreVariable] = store;
        try
        {
            using var process = Process.Start(start);
            if (process is null) return (null, "the shell did not start");
            process.WaitForExit();
            return (process.ExitCode, null);
        }
        catch (System.ComponentModel.Win32Exception e)
        {
            return (null, e.Message);
        }
    }
}
