using System.Diagnostics;

namespace IdentityQueue.Cli.Tests.Report;

/// <summary>Debian's headless Chromium, run as a person would open a file, with a fresh profile and no network services.</summary>
internal static class Chromium
{
    public const string Executable = "/usr/bin/chromium";

    /// <summary>A guard against a hung browser, not a measurement.</summary>
    private static readonly TimeSpan Patience = TimeSpan.FromMinutes(10);

    public static void Require()
    {
        if (!File.Exists(Executable)) Assert.Fail($"{Executable} is missing: install chromium (apt-get install chromium)");
    }

    /// <summary>The DOM after the browser has loaded and laid out the page.</summary>
    public static string DumpDom(string file) => Run("--dump-dom", new Uri(file).AbsoluteUri);

    /// <summary>A PNG screenshot of the page's first <paramref name="width"/> × <paramref name="height"/> pixels.</summary>
    public static byte[] Screenshot(string file, string png, int width = 1200, int height = 2000)
    {
        Run($"--screenshot={png}", $"--window-size={width},{height}", "--hide-scrollbars", new Uri(file).AbsoluteUri);
        return File.ReadAllBytes(png);
    }

    private static string Run(params string[] args)
    {
        Require();
        var profile = Directory.CreateTempSubdirectory("idq-chromium-").FullName;
        try
        {
            var start = new ProcessStartInfo(Executable) { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false };
            foreach (var a in new[] { "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking",
                         "--disable-component-update", "--disable-sync", $"--user-data-dir={profile}" }.Concat(args))
                start.ArgumentList.Add(a);
            using var process = Process.Start(start)!;
            var stdout = process.StandardOutput.ReadToEndAsync();
            var stderr = process.StandardError.ReadToEndAsync();
            if (!process.WaitForExit(Patience))
            {
                process.Kill(entireProcessTree: true);
                Assert.Fail($"chromium did not finish: {string.Join(' ', args)}");
            }
            process.WaitForExit();
            Assert.True(process.ExitCode == 0, $"chromium exited {process.ExitCode}: {stderr.Result}");
            return stdout.Result;
        }
        finally
        {
            try { Directory.Delete(profile, recursive: true); } catch (IOException) { } catch (UnauthorizedAccessException) { }
        }
    }
}
