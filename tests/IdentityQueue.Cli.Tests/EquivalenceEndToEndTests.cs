using Microsoft.Data.Sqlite;
using static IdentityQueue.Cli.Tests.StoreEndToEndTests;

namespace IdentityQueue.Cli.Tests;

/// <summary>
/// The same identity written differently (#15 point 4), end to end on a real SQLite file: import groups the entries, the
/// run screens one per group and the others share its result (marked), and the view, <c>idq show</c> and the report say so.
/// </summary>
public sealed class EquivalenceEndToEndTests : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("idq-eq-").FullName;
    private string Db => Path.Combine(_dir, "s.db");

    public void Dispose()
    {
        SqliteConnection.ClearAllPools();
        try { Directory.Delete(_dir, recursive: true); } catch (IOException) { }
    }

    internal const string Catalogue = """
        # (x+y)^2 = x^2 + 2xy + y^2, the binomial theorem for n = 2 (common practice): expanded, swapped, as a product
        square: (x+y)^2 = x^2 + 2*x*y + y^2
        square-swapped: x^2 + 2*x*y + y^2 = (x+y)^2
        square-product: (x+y)*(x+y) = y^2 + 2*y*x + x^2
        # without the cross term it is false (lhs - rhs = 2xy), and the same false identity written with its sides swapped
        wrong: (x+y)^2 = x^2 + y^2
        wrong-swapped: x^2 + y^2 = (y+x)^2
        # similar but different: one more constant, and the cross term halved
        near: (x+y)^2 = x^2 + 2*x*y + y^2 + 1
        half: (x+y)^2 = x^2 + x*y + y^2
        # the binomial theorem for n = 4 with binom(n, k), and with its quotient of factorials n!/(k!(n-k)!) (common practice)
        binom-form: sum(k in 0..n: binom(n,k)*x^k) = (1+x)^n for n in 4..4
        fact-form: sum(k in 0..n: fact(n)/(fact(k)*fact(n-k))*x^k) = (x+1)^n for n in 4..4
        # the Vandermonde determinant det(x_i^(j-1)) = prod_{i<j} (x_j - x_i) (any linear algebra text) for n = 3, as a
        # bound matrix and as a literal; with every factor negated it is false for n = 3 (three factors: the sign flips)
        vdm-matrix: det(matrix(i in 1..3, j in 1..3: x[i]^(j-1))) = prod(j in 2..3: prod(i in 1..j-1: x[j]-x[i]))
        vdm-literal: det([[1, x[1], x[1]^2], [1, x[2], x[2]^2], [1, x[3], x[3]^2]]) = (x[2]-x[1])*(x[3]-x[1])*(x[3]-x[2])
        vdm-flipped: det([[1, x[1], x[1]^2], [1, x[2], x[2]^2], [1, x[3], x[3]^2]]) = (x[1]-x[2])*(x[1]-x[3])*(x[2]-x[3])
        # the same polynomial over GF(5) is another identity: (x+y)^5 = x^5 + y^5 there (Frobenius; Lidl & Niederreiter,
        # Finite Fields, Thm 1.46 [memory]), not over Q
        frobenius-gf5: (x+y)^5 = x^5 + y^5 over GF(5)
        frobenius-q: (x+y)^5 = x^5 + y^5
        """;

    /// <summary>member → (representative, swapped): what the entries above are, by construction.</summary>
    private static readonly string[] Groups =
    [
        "square-swapped|square|0", "square-product|square|0", "wrong-swapped|wrong|1",
        "fact-form[n=4]|binom-form[n=4]|0", "vdm-literal|vdm-matrix|0",
    ];

    private static List<string> Rows(string db, string sql) =>
        Query(db, sql).Select(r => string.Join("|", r.Select(v => Convert.ToString(v, System.Globalization.CultureInfo.InvariantCulture)))).ToList();

    [Fact]
    public void EntriesWrittenSeveralWays_AreScreenedOnce_AndTheOthersShareTheResultMarked()
    {
        var file = Path.Combine(_dir, "eq.idq");
        File.WriteAllText(file, Catalogue);
        Assert.Equal(0, Idq("init", "--db", Db).Code);
        var import = Idq("import", file, "--db", Db, "--seed", "11");
        Assert.Equal(0, import.Code);
        Assert.Contains("5 entries are the same identity as an earlier one (4 groups;", import.Out);
        Assert.Equal(Groups.Order(StringComparer.Ordinal),
            Rows(Db, "SELECT label, group_label, swapped FROM equivalents").Order(StringComparer.Ordinal));

        Assert.Equal(0, Idq("run", "--db", Db).Code);
        // Every member is final, with its representative's state, degree bound and error bound, marked as shared.
        var shared = Rows(Db, """
            SELECT c.label, r.state, r.shared_from = g.id, COALESCE(r.degree_bound = gr.degree_bound, r.degree_bound IS NULL AND gr.degree_bound IS NULL),
                   COALESCE(r.error_bound_log2 = gr.error_bound_log2, r.error_bound_log2 IS NULL AND gr.error_bound_log2 IS NULL),
                   r.message, (SELECT COUNT(*) FROM trial t WHERE t.candidate_id = c.id)
            FROM equivalence e JOIN candidate c ON c.id = e.candidate_id JOIN result r ON r.candidate_id = c.id
                 JOIN candidate g ON g.id = e.group_candidate_id JOIN result gr ON gr.candidate_id = g.id
            ORDER BY c.id
            """);
        Assert.Equal(5, shared.Count);
        foreach (var row in shared)
        {
            var f = row.Split('|');
            Assert.True(f[2] == "1" && f[3] == "1" && f[4] == "1", row);
            Assert.Equal("0", f[6]); // not screened itself
            Assert.Matches(@"^same identity as \S+ \((sides swapped, )?fingerprint match, chance of a false match ≤ 2\^-\d+\)$", f[5]);
        }
        Assert.Contains("wrong-swapped|refuted|1|1|1|same identity as wrong (sides swapped, fingerprint match, chance of a false match ≤ 2^-", shared[2]);
        // The representatives and the similar-but-different entries are screened on their own (sympy agrees on each
        // verdict: expand(lhs - rhs) is 0 exactly for the true ones).
        Assert.Equal(
            ["binom-form[n=4]|survived|", "frobenius-gf5|survived|", "frobenius-q|refuted|", "half|refuted|", "near|refuted|",
             "square|survived|", "vdm-flipped|refuted|", "vdm-matrix|survived|", "wrong|refuted|"],
            Rows(Db, "SELECT c.label, r.state, r.shared_from FROM candidate c JOIN result r ON r.candidate_id = c.id WHERE c.id NOT IN (SELECT candidate_id FROM equivalence) ORDER BY c.label"));

        var member = Idq("show", "wrong-swapped", "--db", Db);
        Assert.Contains("same identity  as wrong (candidate 4, sides swapped; fingerprint match, chance of a false match ≤ 2^-", member.Out);
        Assert.Contains("its result is shared from there, not screened here", member.Out);
        Assert.Contains("written also as square-swapped, square-product", Idq("show", "square", "--db", Db).Out);
        Assert.Contains("\"group_label\":\"wrong\"", Idq("show", "wrong-swapped", "--json", "--db", Db).Out.Replace(" ", ""));

        var report = Path.Combine(_dir, "report");
        Assert.Equal(0, Idq("report", "--db", Db, "--out", report).Code);
        var html = File.ReadAllText(Path.Combine(report, "index.html"));
        Assert.Contains("<h2>Same identity, written differently</h2>", html);
        Assert.Equal(4, System.Text.RegularExpressions.Regex.Count(html, "<tr data-key=\"\\d+\" data-members="));
        Assert.Contains("<th title=\"eq\">wrong</th><td>refuted</td><td>wrong-swapped <span class=\"tag\">swapped</span>", html);
    }

    [Fact]
    public void WithGroupingOff_EveryEntryIsScreenedOnItsOwn()
    {
        var file = Path.Combine(_dir, "eq.idq");
        File.WriteAllText(file, Catalogue);
        Assert.Equal(0, Idq("init", "--db", Db).Code);
        Assert.Equal(0, Idq("import", file, "--db", Db, "--seed", "11", "--no-grouping").Code);
        Assert.Equal(0, Idq("run", "--db", Db).Code);
        Assert.Equal(["0"], Rows(Db, "SELECT COUNT(*) FROM equivalents"));
        Assert.Equal(["0"], Rows(Db, "SELECT COUNT(*) FROM result WHERE shared_from IS NOT NULL"));
        Assert.Equal(["0"], Rows(Db, "SELECT COUNT(*) FROM result r WHERE NOT EXISTS (SELECT 1 FROM trial t WHERE t.candidate_id = r.candidate_id)"));
    }
}
