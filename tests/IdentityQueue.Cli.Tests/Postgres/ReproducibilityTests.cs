using System.Text.Json;
using IdentityQueue.Store;
using Microsoft.Data.Sqlite;
using static IdentityQueue.Cli.Tests.Postgres.PostgresStoreTests;
using static IdentityQueue.Cli.Tests.StoreEndToEndTests;

namespace IdentityQueue.Cli.Tests.Postgres;

/// <summary>
/// SPEC §5: a run is reproducible from its seed — every trial's prime and point derive from (seed, the candidate's canonical
/// identity, trial number) — so the same catalogue and seed give the same trials in a SQLite store, in a PostgreSQL store
/// and in <c>idq check --seed</c>. The stores are given different candidate ids on purpose (the SQLite store holds another
/// catalogue first): trials must not depend on them.
/// </summary>
public sealed class ReproducibilityTests : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("idq-repro-").FullName;
    private readonly List<string> _databases = [];

    public void Dispose()
    {
        foreach (var db in _databases) PostgresServer.DropDatabase(db);
        SqliteConnection.ClearAllPools();
        try { Directory.Delete(_dir, recursive: true); } catch (IOException) { }
    }

    // False ones from shared/reference-cases.md (two squares with a sign flipped; Frobenius in characteristic 0; Vandermonde
    // reversed, false for n = 2, 3), a true one, and a family instance.
    private const string Catalogue = """
        two-squares-flipped: (a^2+b^2)*(c^2+d^2) = (a*c+b*d)^2 + (a*d+b*c)^2
        frobenius-q: (x+y)^5 = x^5 + y^5
        vdm-reversed: det(matrix(i in 1..n, j in 1..n: x[i]^(j-1))) = prod(i in 1..n: prod(j in i+1..n: x[i] - x[j])) for n in 2..3
        binomial: (x+y)^2 = x^2 + 2*x*y + y^2
        """;

    private const string Seed = "8128";

    [PostgresFact]
    public void SameCatalogueAndSeed_GiveTheSameTrials_InSqliteInPostgresAndInCheck()
    {
        var file = Path.Combine(_dir, "repro.idq");
        File.WriteAllText(file, Catalogue + "\n");
        var other = Path.Combine(_dir, "other.idq");
        File.WriteAllText(other, "o1: x = x\no2: y = y\no3: (x+1)^3 = x^3 + 1\n");
        var sqlite = Path.Combine(_dir, "s.db");
        var pg = PostgresServer.CreateDatabase();
        _databases.Add(pg);

        Assert.Equal(0, Idq("init", "--db", sqlite).Code);
        Assert.Equal(0, Idq("import", other, "--db", sqlite).Code); // shifts the SQLite ids
        Assert.Equal(0, Idq("import", file, "--db", sqlite, "--seed", Seed, "--catalogue", "repro").Code);
        Assert.Equal(0, Idq("init", "--postgres", pg).Code);
        Assert.Equal(0, Idq("import", file, "--postgres", pg, "--seed", Seed, "--catalogue", "repro").Code);
        Assert.Equal(0, Idq("run", "--db", sqlite, "--workers", "1").Code);
        Assert.Equal(0, Idq("run", "--postgres", pg, "--workers", "1").Code);

        const string trials = """
            SELECT c.label, t.seq, t.modulus, t.point, t.outcome, t.difference
            FROM trial t JOIN candidate c ON c.id = t.candidate_id JOIN catalogue k ON k.id = c.catalogue_id
            WHERE k.name = 'repro' ORDER BY c.label, t.seq
            """;
        var s = Rows(StoreLocation.Sqlite(sqlite), trials);
        Assert.NotEmpty(s);
        Assert.Equal(s, Rows(StoreLocation.PostgreSql(pg), trials));
        Assert.NotEqual(
            Rows(StoreLocation.Sqlite(sqlite), "SELECT id FROM candidate WHERE label = 'frobenius-q'"),
            Rows(StoreLocation.PostgreSql(pg), "SELECT id FROM candidate WHERE label = 'frobenius-q'"));

        // idq check with the same seed refutes each false one with the stored witness: the same prime and point.
        var witnesses = ReadOnlyQuery.Run(StoreLocation.PostgreSql(pg), """
            SELECT c.lhs, c.rhs, c.params, v.witness_modulus, v.witness_point FROM verdicts v JOIN candidate c ON c.id = v.candidate_id
            WHERE v.state = 'refuted' ORDER BY v.label
            """).Rows;
        Assert.Equal(4, witnesses.Count); // two-squares-flipped, frobenius-q, vdm-reversed[n=2], vdm-reversed[n=3]
        foreach (var row in witnesses)
        {
            var text = $"{row[0]} = {row[1]}";
            if (row[2] is string p)
            {
                var n = JsonDocument.Parse(p).RootElement.GetProperty("n").GetInt32();
                text += $" for n in {n}..{n}";
            }
            var check = Idq("check", text, "--seed", Seed, "--json");
            Assert.True(check.Code == 1, check.Out + check.Err);
            var root = JsonDocument.Parse(check.Out).RootElement;
            if (root.TryGetProperty("instances", out var instances)) root = instances[0];
            var witness = root.GetProperty("witness");
            Assert.Equal((string)row[3]!, witness.GetProperty("modulus").GetString());
            Assert.Equal(Point((string)row[4]!), Point(witness.GetProperty("point").GetRawText()));
        }
    }

    private static string Point(string json) => string.Join(",",
        JsonDocument.Parse(json).RootElement.EnumerateObject().OrderBy(p => p.Name, StringComparer.Ordinal).Select(p => $"{p.Name}={p.Value}"));
}
