using System.Globalization;
using IdentityQueue.Cli.Report;
using IdentityQueue.Store;
using Microsoft.Data.Sqlite;
using static IdentityQueue.Cli.Tests.StoreFolder;

namespace IdentityQueue.Cli.Tests.Report;

/// <summary>
/// The report's data from a real SQLite store after init, import and run. The oracle is the store itself: each figure is
/// compared with a direct SQL count over the public tables and views, or with the same binning done here in C#.
/// The identities' verdicts are published ones (sources beside each line).
/// </summary>
public sealed class ReportDataTests(ReportDataTests.Store store) : IClassFixture<ReportDataTests.Store>
{
    /// <summary>The store every test here reads: two catalogues, imported and run once.</summary>
    public sealed class Store : IDisposable
    {
        internal StoreFolder Folder { get; } = new();

        // Krattenthaler, Advanced Determinant Calculus (1999) (2.1) [memory]; reversed: false exactly when C(n,2) is odd
        private const string Catalogue = """
            square: (a+b)^2 = a^2 + 2*a*b + b^2
            not-square: (a+b)^2 = a^2 + b^2
            vdm-reversed: det(matrix(i in 1..n, j in 1..n: x[i]^(j-1))) = prod(i in 1..n: prod(j in i+1..n: x[i] - x[j])) for n in 2..7
            pairs: sum(k in 0..n: binom(n, k)) = 2^n + m - m for n in 0..2, m in 1..2
            broken <b>&: (x+1 = x
            """;

        public Store()
        {
            var file = Folder.Write("first.idq", Catalogue);
            Assert.Equal(0, Run("init", "--db", Folder.Db).Code);
            Assert.Equal(0, Run("import", file, "--db", Folder.Db, "--seed", "5").Code);
            // Lidl & Niederreiter, Finite Fields, Thm 1.46 [memory]: false over Q; commutativity holds
            var other = Folder.Write("second.idq", "frobenius-q: (x+y)^5 = x^5 + y^5\nlucky: x*y = y*x\n");
            Assert.Equal(0, Run("import", other, "--db", Folder.Db, "--catalogue", "o'brien", "--seed", "6").Code);
            var run = Run("run", "--db", Folder.Db, "--workers", "2");
            Assert.True(run.Code == 0, run.Out + run.Err);
        }

        public void Dispose()
        {
            SqliteConnection.ClearAllPools();
            Folder.Dispose();
        }
    }

    private readonly StoreFolder _folder = store.Folder;

    private ReportData Load(params string[] catalogues)
    {
        using var connection = StoreConnection.OpenSqlite(_folder.Db);
        return ReportData.Load(connection, catalogues);
    }

    private List<object?[]> Sql(string sql) => [.. ReadOnlyQuery.Run(_folder.Db, sql).Rows];

    private static long L(object? v) => Convert.ToInt64(v, CultureInfo.InvariantCulture);

    [Fact]
    public void StateCounts_AreTheVerdictsViewsCounts()
    {
        var data = Load();
        var expected = Sql("SELECT catalogue, state, count(*) FROM verdicts GROUP BY catalogue, state")
            .Select(r => new StateCount((string)r[0]!, (string)r[1]!, L(r[2]))).OrderBy(s => s.Catalogue).ThenBy(s => s.State).ToList();
        Assert.Equal(expected, data.StateCounts.OrderBy(s => s.Catalogue).ThenBy(s => s.State).ToList());
        Assert.Equal(L(Sql("SELECT count(*) FROM candidate").Single()[0]), data.Candidates);
        Assert.Equal(["first", "o'brien"], data.Catalogues.Select(c => c.Name));
    }

    [Fact]
    public void Stages_CountEachRefutationOnceAtItsWitnessTrial()
    {
        var data = Load();
        var expected = Sql("""
            SELECT t.seq, t.field_bits, count(*) FROM result r JOIN trial t ON t.id = r.witness_trial_id
            WHERE r.state = 'refuted' GROUP BY t.seq, t.field_bits ORDER BY 1, 2
            """).Select(r => new StageCount((int)L(r[0]), (int)L(r[1]), L(r[2]))).ToList();
        Assert.Equal(expected, data.Stages);
        Assert.Equal(data.Total("refuted"), data.Stages.Sum(s => s.Count));
    }

    [Fact]
    public void EvidenceAndTimeHistograms_BinInSqlAsTheBinsDoInCSharp()
    {
        var data = Load();
        var evidence = new long[Bins.EvidenceBits.Count];
        foreach (var r in Sql("SELECT error_bound_log2 FROM survivors WHERE error_bound_log2 IS NOT NULL")) evidence[Bins.EvidenceBits.IndexOf(-Convert.ToDouble(r[0], CultureInfo.InvariantCulture))]++;
        Assert.Equal(evidence, data.EvidenceBins);
        // survivors decided exactly have no error bound: counted apart
        Assert.Equal(L(Sql("SELECT count(*) FROM survivors WHERE error_bound_log2 IS NULL").Single()[0]), data.ExactSurvivors);
        Assert.Equal(data.Total("survived"), data.EvidenceBins.Sum() + data.ExactSurvivors);

        var perCandidate = Sql("SELECT candidate_id, elapsed_us FROM trial").GroupBy(r => L(r[0])).Select(g => g.Sum(r => L(r[1]))).ToList();
        var time = new long[Bins.Microseconds.Count];
        foreach (var us in perCandidate) time[Bins.Microseconds.IndexOf(us)]++;
        Assert.Equal(time, data.TimeBins);
        Assert.Equal(perCandidate.Count, data.TimedCandidates);
        Assert.Equal(perCandidate.Sum(), data.TotalMicroseconds);
    }

    [Fact]
    public void Families_CarryTheViewsCounts_AndTheirInstancesInParameterOrder()
    {
        var data = Load();
        Assert.Equal(L(Sql("SELECT count(*) FROM families").Single()[0]), data.Families.Count);
        var vdm = data.Families.Single(f => f.Family == "vdm-reversed");
        Assert.Equal((6L, 2L, 4L, 0L), (vdm.Instances, vdm.Survived, vdm.Refuted, vdm.Other));
        Assert.Equal("n=2", vdm.FirstRefuted);
        Assert.Equal(["n=2", "n=3", "n=4", "n=5", "n=6", "n=7"], vdm.Members.Select(m => m.Params));
        Assert.Equal(["refuted", "refuted", "survived", "survived", "refuted", "refuted"], vdm.Members.Select(m => m.State));
        var pairs = data.Families.Single(f => f.Family == "pairs");
        Assert.Equal(["n=0, m=1", "n=0, m=2", "n=1, m=1", "n=1, m=2", "n=2, m=1", "n=2, m=2"], pairs.Members.Select(m => m.Params));
        Assert.False(data.InstancesTruncated);
    }

    [Fact]
    public void Rejections_AreListedWithTheirRawTextAsStored()
    {
        var data = Load();
        var rejection = Assert.Single(data.Rejections);
        Assert.Equal(1, data.RejectionsTotal);
        Assert.Equal((string)Sql("SELECT raw FROM rejection").Single()[0]!, rejection.Raw);
        Assert.Contains("<b>&", rejection.Raw);
        Assert.Equal(5, rejection.Line);
    }

    [Fact]
    public void CatalogueFilter_KeepsOnlyTheNamedCatalogue_EvenWithAQuoteInItsName()
    {
        var data = Load("o'brien");
        Assert.Equal(["o'brien"], data.Catalogues.Select(c => c.Name));
        Assert.Equal(2, data.Candidates);
        Assert.Equal(1, data.Total("refuted"));
        Assert.Equal(1, data.Total("survived"));
        Assert.Empty(data.Families);
        Assert.Empty(data.Rejections);
        Assert.Equal(2, data.TimedCandidates);
    }

    [Fact]
    public void CatalogueFilter_IsBoundAsAParameter_SoSqlInANameMatchesNothing()
    {
        // A name is compared as a value, never pasted into the SQL text (common practice: parameters against injection).
        var data = Load("x') OR 1 = 1 OR k.name IN ('y");
        Assert.Empty(data.Catalogues);
        Assert.Equal(0, data.Candidates);
        Assert.Empty(data.Families);
        Assert.Empty(data.Rejections);
    }

    [Fact]
    public void ReportCommand_WritesIndexHtml_AndRefusesAnUnknownCatalogue()
    {
        var dir = _folder.File("out");
        var (code, output, error) = Run("report", "--db", _folder.Db, "--out", dir);
        Assert.True(code == 0, error);
        Assert.Contains("index.html", output);
        var html = File.ReadAllText(Path.Combine(dir, "index.html"));
        Assert.StartsWith("<!DOCTYPE html>", html);
        Assert.Contains("&lt;b&gt;&amp;", html);

        var unknown = Run("report", "--db", _folder.Db, "--out", dir, "--catalogue", "nope");
        Assert.Equal(2, unknown.Code);
        Assert.Contains("no catalogue named 'nope'", unknown.Err);
        Assert.Contains("o'brien", unknown.Err);

        var missing = Run("report", "--db", _folder.File("absent.db"), "--out", dir);
        Assert.Equal(2, missing.Code);
        Assert.Contains("idq init", missing.Err);
    }

    [Fact]
    public void Queries_UseNoSqliteOnlyFunctions()
    {
        // Functions SQLite has and PostgreSQL lacks (or spells differently), from both manuals [memory].
        var sqliteOnly = new[] { "json_", "group_concat", "ifnull", "datetime(", "strftime", "julianday", "printf", "instr(", "substr(", "iif(", "total(" };
        var queries = IdentityQueue.Store.Read.ReportReads.QueryTexts;
        Assert.Equal(13, queries.Count); // every query of the read model, the refutation details included
        foreach (var q in queries)
            foreach (var f in sqliteOnly)
                Assert.DoesNotContain(f, q, StringComparison.OrdinalIgnoreCase);
    }
}
