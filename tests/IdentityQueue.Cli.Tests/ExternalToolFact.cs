namespace IdentityQueue.Cli.Tests;

/// <summary>
/// The switch that turns a missing outside tool (z3, Chromium, a PostgreSQL server) from a visible skip into a failure.
/// <c>.ci/run</c> installs every tool and sets it; a developer's plain <c>dotnet test</c> on a fresh machine skips those
/// tests with the reason in the report instead of failing.
/// </summary>
internal static class ExternalTools
{
    public const string RequireVariable = "IDQ_TEST_REQUIRE_TOOLS";

    public static bool Required => Environment.GetEnvironmentVariable(RequireVariable) is { Length: > 0 } v && v != "0";
}

/// <summary>A test that runs an outside program (z3, Chromium): skipped with the reason when it is not installed, unless required.</summary>
[AttributeUsage(AttributeTargets.Method)]
public sealed class ExternalToolFactAttribute : FactAttribute
{
    public ExternalToolFactAttribute(string executable, string debianPackage)
    {
        if (!File.Exists(executable) && !ExternalTools.Required)
            Skip = $"{executable} is not installed (apt-get install {debianPackage}); {ExternalTools.RequireVariable}=1, as .ci/run sets, makes this a failure";
    }
}
