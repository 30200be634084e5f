using System.Diagnostics;
using System.Reflection;
using System.Text.RegularExpressions;
using static IdentityQueue.Cli.Tests.StoreFolder;

namespace IdentityQueue.Cli.Tests;

/// <summary>
/// <c>--help</c> and <c>--version</c> as users meet them. The list of commands is SPEC §2's table; the root's own help
/// listing is checked against it, so a new command without examples cannot slip in (compare: issue #15 point 5).
/// </summary>
public class CliHelpTests
{
    private static readonly string[] Names =
        ["init", "import", "run", "worker", "enqueue", "status", "show", "check", "recheck", "export", "demo", "report", "bench", "sql", "compare"];

    public static TheoryData<string> Commands => new(Names);

    [Fact]
    public void RootHelp_ListsExactlyTheCommandsOfTheSpec()
    {
        var (code, output, _) = Run("--help");
        Assert.Equal(0, code);
        var section = output[output.IndexOf("Commands:", StringComparison.Ordinal)..];
        var listed = Regex.Matches(section, @"^  ([a-z]+)\b", RegexOptions.Multiline).Select(m => m.Groups[1].Value).Order().ToList();
        Assert.Equal(Names.Order().ToList(), listed);
    }

    [Theory]
    [MemberData(nameof(Commands))]
    public void EveryCommandsHelp_HasExamplesThatUseIt(string command)
    {
        var (code, output, error) = Run(command, "--help");
        Assert.True(code == 0, error);
        Assert.Contains("Examples:", output);
        var examples = output[output.IndexOf("Examples:", StringComparison.Ordinal)..];
        Assert.Contains($"idq {command}", examples);
    }

    [Fact]
    public void Version_OfTheRealExecutable_PrintsThePackageVersionAndExitsZero()
    {
        // In process the entry assembly is the test host, so this runs idq.dll as users do.
        var start = new ProcessStartInfo("dotnet") { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false };
        start.ArgumentList.Add(Path.Combine(AppContext.BaseDirectory, "idq.dll"));
        start.ArgumentList.Add("--version");
        using var process = Process.Start(start)!;
        var output = process.StandardOutput.ReadToEnd().Trim();
        process.WaitForExit();
        Assert.Equal(0, process.ExitCode);
        var expected = typeof(CliApp).Assembly.GetName().Version!;
        Assert.Equal($"{expected.Major}.{expected.Minor}.{expected.Build}", output);
        Assert.Equal(output, typeof(CliApp).Assembly.GetCustomAttribute<AssemblyInformationalVersionAttribute>()!.InformationalVersion);
    }
}
