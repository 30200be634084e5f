using Npgsql;

namespace IdentityQueue.Cli.Tests.Postgres;

/// <summary>
/// The real PostgreSQL server the scale-out tests run against: <c>IDQ_TEST_POSTGRES</c> is an administrator's connection
/// string (CI's <c>.ci/run</c> starts a cluster on loopback with <c>tests/postgres/pg-cluster.sh</c> and sets it), and
/// <c>IDQ_TEST_PG_CLUSTER</c> that cluster's folder, for the restart test. Each test gets a database of its own, dropped at
/// the end.
/// </summary>
internal static class PostgresServer
{
    public const string ConnectionVariable = "IDQ_TEST_POSTGRES";
    public const string ClusterVariable = "IDQ_TEST_PG_CLUSTER";

    public static string? Admin => Environment.GetEnvironmentVariable(ConnectionVariable) is { Length: > 0 } s ? s : null;

    public static string? ClusterFolder => Environment.GetEnvironmentVariable(ClusterVariable) is { Length: > 0 } s ? s : null;

    /// <summary>Why PostgreSQL tests cannot run here, or null when they can.</summary>
    public static string? Missing => Admin is null
        ? $"no PostgreSQL server configured: set {ConnectionVariable} (bash tests/postgres/pg-cluster.sh start DIR PORT prints one); .ci/run always does"
        : null;

    /// <summary>A fresh, empty database; its connection string. Drop it with <see cref="DropDatabase"/>.</summary>
    public static string CreateDatabase()
    {
        var admin = Admin ?? throw new InvalidOperationException(Missing);
        var name = "idq_test_" + Guid.NewGuid().ToString("N")[..12];
        using (var c = new NpgsqlConnection(admin))
        {
            c.Open();
            using var cmd = new NpgsqlCommand($"CREATE DATABASE {name}", c);
            cmd.ExecuteNonQuery();
        }
        return new NpgsqlConnectionStringBuilder(admin) { Database = name, Pooling = true }.ConnectionString;
    }

    public static void DropDatabase(string connectionString)
    {
        var name = new NpgsqlConnectionStringBuilder(connectionString).Database;
        NpgsqlConnection.ClearAllPools();
        try
        {
            using var c = new NpgsqlConnection(Admin);
            c.Open();
            using var cmd = new NpgsqlCommand($"DROP DATABASE IF EXISTS {name} WITH (FORCE)", c);
            cmd.ExecuteNonQuery();
        }
        catch (NpgsqlException)
        {
            // The server may be restarting at the end of the restart test; a leftover test database is harmless.
        }
    }

    /// <summary>Stops the server (fast shutdown), as an operator would mid-run; <see cref="Start"/> brings it back with its data.</summary>
    public static void Stop() => Cluster("stop");

    /// <summary>Starts the stopped server again on its port, keeping the data.</summary>
    public static void Start() => Cluster("start", new NpgsqlConnectionStringBuilder(Admin).Port.ToString(System.Globalization.CultureInfo.InvariantCulture));

    private static void Cluster(string action, params string[] more)
    {
        var folder = ClusterFolder ?? throw new InvalidOperationException($"{ClusterVariable} is not set: the restart test needs the cluster's folder");
        var script = Path.Combine(RepositoryRoot(), "tests", "postgres", "pg-cluster.sh");
        var start = new System.Diagnostics.ProcessStartInfo("bash") { RedirectStandardOutput = true, UseShellExecute = false };
        foreach (var a in new[] { script, action, folder }.Concat(more)) start.ArgumentList.Add(a);
        using var p = System.Diagnostics.Process.Start(start)!;
        p.StandardOutput.ReadToEnd();
        // pg_ctl itself waits at most 60 s (-w -t 60); this only guards against a hung script
        if (!p.WaitForExit(300_000)) throw new TimeoutException($"pg-cluster.sh {action} did not finish in five minutes");
        if (p.ExitCode != 0) throw new InvalidOperationException($"pg-cluster.sh {action} failed with exit code {p.ExitCode}");
    }

    public static string RepositoryRoot()
    {
        var dir = new DirectoryInfo(AppContext.BaseDirectory);
        while (dir is not null && !File.Exists(Path.Combine(dir.FullName, "IdentityQueue.sln"))) dir = dir.Parent;
        return dir?.FullName ?? throw new DirectoryNotFoundException("the repository root (IdentityQueue.sln) was not found above the test binaries");
    }
}

/// <summary>
/// A test that needs the PostgreSQL server. Without one it is skipped with the reason shown in the test report — except
/// when <see cref="ExternalTools.RequireVariable"/> is set (as .ci/run does), where a missing server must fail the run.
/// </summary>
[AttributeUsage(AttributeTargets.Method)]
public sealed class PostgresFactAttribute : FactAttribute
{
    public PostgresFactAttribute(bool restartsServer = false)
    {
        if (ExternalTools.Required) return;
        if (PostgresServer.Missing is { } reason) Skip = reason;
        else if (restartsServer && PostgresServer.ClusterFolder is null)
            Skip = $"{PostgresServer.ClusterVariable} is not set: this test restarts the server and needs the folder of a cluster made by tests/postgres/pg-cluster.sh";
    }
}
