using System.Globalization;
using Microsoft.Data.Sqlite;

namespace IdentityQueue.Cli.Tests;

/// <summary>
/// The product as users meet it, on a real SQLite file: init, import, run, then plain SQL on the public views.
/// The identities are published ones (sources beside each), with known verdicts.
/// </summary>
public sealed class StoreEndToEndTests : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("idq-e2e-").FullName;
    private string Db => Path.Combine(_dir, "s.db");

    public void Dispose()
    {
        SqliteConnection.ClearAllPools();
        try { Directory.Delete(_dir, recursive: true); } catch (IOException) { }
    }

    internal static (int Code, string Out, string Err) Idq(params string[] args)
    {
        var output = new StringWriter();
        var error = new StringWriter();
        var code = CliApp.Run(args, output, error);
        return (code, output.ToString(), error.ToString());
    }

    internal static List<object?[]> Query(string db, string sql)
    {
        using var c = new SqliteConnection($"Data Source={db};Mode=ReadOnly;Pooling=False");
        c.Open();
        using var cmd = c.CreateCommand();
        cmd.CommandText = sql;
        using var r = cmd.ExecuteReader();
        var rows = new List<object?[]>();
        while (r.Read())
        {
            var row = new object?[r.FieldCount];
            for (var i = 0; i < row.Length; i++) row[i] = r.IsDBNull(i) ? null : r.GetValue(i);
            rows.Add(row);
        }
        return rows;
    }

    private const string Catalogue = """
        # Brahmagupta (628); Fibonacci, Liber Quadratorum (1225)
        two-squares: (a^2+b^2)*(c^2+d^2) = (a*c-b*d)^2 + (a*d+b*c)^2
        # the same with a sign flipped: difference 4abcd (from the above)
        two-squares-flipped: (a^2+b^2)*(c^2+d^2) = (a*c+b*d)^2 + (a*d+b*c)^2
        # Krattenthaler, Advanced Determinant Calculus (1999) (2.1) [memory]; reversed: false exactly when C(n,2) is odd
        vdm: det(matrix(i in 1..n, j in 1..n: x[i]^(j-1))) = prod(i in 1..n: prod(j in i+1..n: x[j] - x[i])) for n in 2..6
        vdm-reversed: det(matrix(i in 1..n, j in 1..n: x[i]^(j-1))) = prod(i in 1..n: prod(j in i+1..n: x[i] - x[j])) for n in 2..7
        # Lidl & Niederreiter, Finite Fields, Thm 1.46 [memory]; false over Q (common practice)
        frobenius-gf5: (x+y)^5 = x^5 + y^5 over GF(5)
        frobenius-q: (x+y)^5 = x^5 + y^5
        # Lander & Parkin, Bull. AMS 72 (1966) 1079
        lander-parkin: 27^5 + 84^5 + 110^5 + 133^5 = 144^5
        # Cayley, Phil. Trans. 148 (1858)
        cayley-hamilton: [[a,b],[c,d]]^2 - tr([[a,b],[c,d]])*[[a,b],[c,d]] + det([[a,b],[c,d]])*id(2) = 0
        broken: (x+1 = x
        bad-field: x = x over GF(12)
        """;

    [Fact]
    public void ImportRunAndQuery_GiveThePublishedVerdicts()
    {
        var file = Path.Combine(_dir, "reference.idq");
        File.WriteAllText(file, Catalogue);
        Assert.Equal(0, Idq("init", "--db", Db).Code);
        var import = Idq("import", file, "--db", Db, "--seed", "11");
        Assert.Equal(0, import.Code);
        Assert.Contains("2 rejections", import.Out);
        var run = Idq("run", "--db", Db, "--workers", "2");
        Assert.True(run.Code == 0, run.Out + run.Err);

        var states = Query(Db, "SELECT label, state FROM verdicts").ToDictionary(r => (string)r[0]!, r => (string)r[1]!);
        Assert.Equal("survived", states["two-squares"]);
        Assert.Equal("refuted", states["two-squares-flipped"]);
        Assert.Equal("survived", states["frobenius-gf5"]);
        Assert.Equal("refuted", states["frobenius-q"]);
        Assert.Equal("survived", states["lander-parkin"]);
        Assert.Equal("survived", states["cayley-hamilton"]);
        foreach (var n in new[] { 2, 3, 4, 5, 6 }) Assert.Equal("survived", states[$"vdm[n={n}]"]);
        foreach (var (n, expected) in new[] { (2, "refuted"), (3, "refuted"), (4, "survived"), (5, "survived"), (6, "refuted"), (7, "refuted") })
            Assert.Equal(expected, states[$"vdm-reversed[n={n}]"]);

        // every survivor reached the target; every refutation has a witness that is certified
        // (lander-parkin has no variables: decided exactly, with no error bound)
        Assert.All(Query(Db, "SELECT error_bound_log2, message FROM survivors"), r =>
        {
            if (r[0] is null) Assert.StartsWith(Screening.ExactDecision.Prefix, (string)r[1]!);
            else Assert.True(Convert.ToDouble(r[0], CultureInfo.InvariantCulture) <= -64);
        });
        Assert.All(Query(Db, "SELECT r.certified, v.witness_modulus FROM verdicts v JOIN result r ON r.candidate_id = v.candidate_id WHERE v.state = 'refuted'"),
            r => { Assert.Equal(1L, r[0]); Assert.NotNull(r[1]); });

        var rejections = Query(Db, "SELECT line, reason FROM rejection ORDER BY line");
        Assert.Equal(2, rejections.Count);
        Assert.Contains("column", (string)rejections[0][1]!);
        Assert.Contains("GF(12)", (string)rejections[1][1]!);

        var family = Query(Db, "SELECT instances, survived, refuted, first_refuted FROM families WHERE family = 'vdm-reversed'").Single();
        Assert.Equal((6L, 2L, 4L), ((long)family[0]!, (long)family[1]!, (long)family[2]!));
        Assert.Contains("\"n\":2", ((string)family[3]!).Replace(" ", ""));
        // refuted at n = 2, 3, 6, 7 and survived at 4, 5 (the states asserted above), as runs of instances
        Assert.Equal(["4..5", "2..3, 6..7"], Query(Db, "SELECT holds_for, fails_for FROM families WHERE family = 'vdm-reversed'").Single());

        Assert.Equal(0, Idq("recheck", "--all", "--db", Db).Code);
    }

    [Fact]
    public void HandInsertedRow_IsPickedUpByTheNextRun()
    {
        var file = Path.Combine(_dir, "one.idq");
        File.WriteAllText(file, "one: x + x = 2*x\n");
        Idq("init", "--db", Db);
        Idq("import", file, "--db", Db);
        using (var c = new SqliteConnection($"Data Source={Db};Pooling=False"))
        {
            c.Open();
            using var cmd = c.CreateCommand();
            cmd.CommandText = "INSERT INTO candidate (catalogue_id, label, lhs, rhs) SELECT id, 'by-hand', '(x+1)^2', 'x^2 + 1' FROM catalogue";
            cmd.ExecuteNonQuery();
        }
        Assert.Equal(0, Idq("run", "--db", Db).Code);
        var states = Query(Db, "SELECT label, state FROM verdicts").ToDictionary(r => (string)r[0]!, r => (string)r[1]!);
        Assert.Equal("survived", states["one"]);
        Assert.Equal("refuted", states["by-hand"]);
    }

    /// <summary>The SQL of the README's cookbook entry "add a candidate by hand", as written there.</summary>
    private static string ReadmeInsert()
    {
        var folder = new DirectoryInfo(AppContext.BaseDirectory);
        while (folder is not null && !File.Exists(Path.Combine(folder.FullName, "IdentityQueue.sln"))) folder = folder.Parent;
        Assert.NotNull(folder);
        var lines = File.ReadAllLines(Path.Combine(folder.FullName, "README.md"));
        var start = Array.FindIndex(lines, l => l.StartsWith("-- add a candidate by hand", StringComparison.Ordinal));
        Assert.True(start > 0, "the README's cookbook has no 'add a candidate by hand' entry");
        return string.Join("\n", lines.Skip(start + 1).TakeWhile(l => !l.StartsWith("```", StringComparison.Ordinal) && !l.StartsWith("-- ", StringComparison.Ordinal)));
    }

    [Fact]
    public void ReadmeCookbookInsert_WorksAsWritten_AndIdqSqlSaysItIsReadOnly()
    {
        Idq("init", "--db", Db);
        var insert = ReadmeInsert();
        Assert.Contains("INSERT INTO candidate", insert);

        var refused = Idq("sql", insert, "--db", Db);
        Assert.Equal(2, refused.Code);
        Assert.Contains("idq sql is read-only and does not run INSERT", refused.Err);
        Assert.Contains($"sqlite3 {Db} \"INSERT INTO candidate", refused.Err);
        Assert.Equal(0L, Query(Db, "SELECT COUNT(*) FROM candidate").Single()[0]);

        // As the README says: run it with a SQLite client, then idq run.
        using (var c = new SqliteConnection($"Data Source={Db};Pooling=False"))
        {
            c.Open();
            using var cmd = c.CreateCommand();
            cmd.CommandText = insert;
            cmd.ExecuteNonQuery();
        }
        Assert.Equal(0, Idq("run", "--db", Db).Code);
        // (x+1)^3 = x^3 + 3x^2 + 3x + 1: the binomial theorem for n = 3 (common practice).
        Assert.Equal(["my-guess", "survived"], Query(Db, "SELECT label, state FROM verdicts").Single());
    }

    [Fact]
    public void ImportOfACsvWithAnExtraColumn_WarnsOnce_AndImportsEveryRow()
    {
        var file = Path.Combine(_dir, "extra.csv");
        File.WriteAllText(file, "label,lhs,rhs,reference\na,(x+1)^2,x^2 + 2*x + 1,Knuth\nb,x*y,y*x,\n");
        Idq("init", "--db", Db);
        var import = Idq("import", file, "--db", Db);
        Assert.Equal(0, import.Code);
        Assert.Contains("2 instances, 0 rejections", import.Out);
        Assert.Equal($"idq import: warning: {file}: line 1: the header's column \"reference\" is not one of label, lhs, rhs, identity, over, for and is ignored in every row",
            import.Err.Trim());
    }

    [Fact]
    public void HigherTarget_AddsTrialsToSurvivorsOnly()
    {
        var file = Path.Combine(_dir, "t.idq");
        File.WriteAllText(file, "t: (x+y)^2 = x^2 + 2*x*y + y^2\nf: (x+y)^2 = x^2 + y^2\n");
        Idq("init", "--db", Db);
        Idq("import", file, "--db", Db, "--seed", "3");
        Idq("run", "--db", Db);
        var before = Query(Db, "SELECT candidate_id, seq, modulus, point FROM trial ORDER BY candidate_id, seq").Select(r => string.Join("|", r)).ToList();
        Assert.Equal(0, Idq("run", "--db", Db, "--target-bits", "256").Code);
        var after = Query(Db, "SELECT candidate_id, seq, modulus, point FROM trial ORDER BY candidate_id, seq").Select(r => string.Join("|", r)).ToList();
        Assert.True(after.Count > before.Count);
        Assert.All(before, t => Assert.Contains(t, after));
        Assert.True(Convert.ToDouble(Query(Db, "SELECT error_bound_log2 FROM verdicts WHERE label = 't'").Single()[0], CultureInfo.InvariantCulture) <= -256);
        Assert.Equal(1L, Query(Db, "SELECT count(*) FROM trial t JOIN candidate c ON c.id = t.candidate_id WHERE c.label = 'f'").Single()[0]);
    }

    [Fact]
    public void ConstantIdentities_AreDecidedExactly_WithBothValuesAndNoErrorBound()
    {
        // Lander & Parkin, Bull. AMS 72 (1966) 1079: 27^5 + 84^5 + 110^5 + 133^5 = 144^5; 2^5 = 32 (common practice).
        var file = Path.Combine(_dir, "c.idq");
        File.WriteAllText(file, "lp: 27^5 + 84^5 + 110^5 + 133^5 = 144^5\nfive: 2^5 = 31\n");
        Idq("init", "--db", Db);
        Idq("import", file, "--db", Db);
        Assert.Equal(0, Idq("run", "--db", Db).Code);
        var rows = Query(Db, "SELECT label, state, trials, error_bound_log2, message FROM verdicts ORDER BY label");
        Assert.Equal(("five", "refuted", 0L), ((string)rows[0][0]!, (string)rows[0][1]!, Convert.ToInt64(rows[0][2], CultureInfo.InvariantCulture)));
        Assert.Null(rows[0][3]);
        Assert.Equal($"{Screening.ExactDecision.Prefix}: 32 ≠ 31", rows[0][4]);
        Assert.Equal(("lp", "survived"), ((string)rows[1][0]!, (string)rows[1][1]!));
        Assert.Null(rows[1][3]);
        var show = Idq("show", "five", "--db", Db);
        Assert.Contains("32 ≠ 31", show.Out);
        Assert.Contains("decided exactly", show.Out);
        Assert.DoesNotContain("4096", show.Out);
        Assert.DoesNotContain("4096", Idq("show", "lp", "--db", Db).Out);
        Assert.Equal(0, Idq("recheck", "--all", "--db", Db).Code);
    }

    // Where a family breaks. Moser's circle problem: n points on a circle joined by all chords cut it into
    // 1, 2, 4, 8, 16 regions for n = 1..5 but 31 (not 32) for n = 6; the count is sum(k in 0..4: binom(n-1, k))
    // (R. K. Guy, "The strong law of small numbers", Amer. Math. Monthly 95 (1988), example 4). So "= 2^(n-1)" holds
    // for n = 1..5 and fails for every n >= 6. (-1)^n = 1 holds exactly at the even n (common practice): runs of one value.
    [Fact]
    public void FamiliesView_SaysForWhichValuesAFamilyHoldsAndFails()
    {
        var file = Path.Combine(_dir, "m.idq");
        File.WriteAllText(file, """
            moser: sum(k in 0..4: binom(n-1, k)) = 2^(n-1) for n in 1..10
            parity: (-1)^n = 1 for n in -3..3
            two: x^(m+n) = x^m*x^n for m in 0..1, n in 0..1
            """);
        Idq("init", "--db", Db);
        Idq("import", file, "--db", Db);
        Assert.Equal(0, Idq("run", "--db", Db).Code);
        var rows = Query(Db, "SELECT family, holds_for, fails_for, first_refuted FROM families ORDER BY family");
        Assert.Equal(["moser", "1..5", "6..10", "{\"n\":6}"], rows[0]);
        Assert.Equal(["parity", "-2, 0, 2", "-3, -1, 1, 3", "{\"n\":-3}"], rows[1]);
        // two parameters: no ranges in one parameter (the report shows a grid)
        Assert.Equal(["two", null, null, null], rows[2]);
    }

    // A screening-time invalid names the catalogue line and the column in that line (the stored side is the text as
    // written, and the column where it starts is stored), the side and the values of the parameters and bound variables.
    // Columns counted by hand on the lines below.
    [Fact]
    public void InvalidAtScreening_NamesTheLineTheColumnTheSideAndTheValues()
    {
        var file = Path.Combine(_dir, "i.idq");
        File.WriteAllText(file, "# first line\nok: x = x\nbad: x + sum(j in 0..n: x^j/(j-1)) = 0 for n in 2..3\nbad-rhs:   x   =   x + fact(n - 3)*0   for n in 2..2\n");
        Idq("init", "--db", Db);
        Idq("import", file, "--db", Db);
        Idq("run", "--db", Db);
        var rows = Query(Db, "SELECT label, message FROM verdicts WHERE state = 'invalid' ORDER BY label");
        // "bad-rhs:   x   =   x + fact(n - 3)*0": fact's argument starts at column 29.
        Assert.Equal("bad-rhs[n=2]", rows[0][0]);
        Assert.StartsWith("line 4, column 29, rhs, at n=2: ", (string)rows[0][1]!);
        // "bad: x + sum(j in 0..n: x^j/(j-1)) = 0": the '/' is column 28 of the line.
        Assert.Equal("line 3, column 28, lhs, at n=2, j=1: division by zero", rows[1][1]);
        Assert.Equal("line 3, column 28, lhs, at n=3, j=1: division by zero", rows[2][1]);
    }

    // A .jsonl object's sides are its fields: the column is counted inside the stored side, which is the field as written.
    [Fact]
    public void InvalidAtScreening_OfAJsonlLine_CountsInTheStoredSide()
    {
        var file = Path.Combine(_dir, "i.jsonl");
        File.WriteAllText(file, "{\"label\": \"bad\", \"lhs\": \"x + sum(j in 0..n: x^j/(j-1))\", \"rhs\": \"x\", \"for\": {\"n\": [2, 2]}}\n");
        Idq("init", "--db", Db);
        Idq("import", file, "--db", Db);
        Idq("run", "--db", Db);
        var rows = Query(Db, "SELECT label, message FROM verdicts WHERE state = 'invalid'");
        Assert.Equal("line 1, column 23 of the stored lhs, at n=2, j=1: division by zero", rows[0][1]);
    }

    // Where and how a refuted identity fails. (x+y)^2 = x^2 + 2xy + y^2 (the binomial theorem), so "(x+y)^2 = x^2 + y^2"
    // differs by 2xy: its least counterexample by max-norm, then sum of absolute values, then the variables' order
    // (0, 1, -1, …) is x = 1, y = 1, where lhs = 4 and rhs = 2. Moser's circle count at n = 6 is 31, not 2^5 = 32
    // (R. K. Guy, "The strong law of small numbers", Amer. Math. Monthly 95 (1988)): a constant identity fails with no point.
    [Fact]
    public void RefutedCandidates_GetTheirSmallestCounterexampleAndTheirDifference()
    {
        var file = Path.Combine(_dir, "r.idq");
        File.WriteAllText(file, "wrong: (x+y)^2 = x^2 + y^2\nright: (x+y)^2 = x^2 + 2*x*y + y^2\nmoser6: sum(k in 0..4: binom(5, k)) = 2^5\n");
        Idq("init", "--db", Db);
        Idq("import", file, "--db", Db);
        Assert.Equal(0, Idq("run", "--db", Db).Code);
        var rows = Query(Db, "SELECT label, point, lhs_value, rhs_value, max_abs, exhaustive FROM counterexamples ORDER BY label");
        Assert.Equal(2, rows.Count);
        Assert.Equal(["moser6", "{}", "31", "32", 0L, 1L], rows[0]);
        Assert.Equal(["wrong", "{\"x\":\"1\",\"y\":\"1\"}", "4", "2", 1L, 1L], rows[1]);
        var difference = Query(Db, "SELECT difference, terms, total_degree FROM differences WHERE label = 'wrong'").Single();
        Assert.Equal(["2*x*y", 1L, 2L], difference);
        var show = Idq("show", "wrong", "--db", Db);
        Assert.Contains("counterexample fails at x = 1, y = 1: lhs = 4, rhs = 2", show.Out);
        Assert.Contains("difference     lhs - rhs = 2*x*y (1 term, total degree 2)", show.Out);
        var json = Idq("show", "wrong", "--db", Db, "--json").Out;
        Assert.Contains("\"lhs_value\": \"4\"", json);
        Assert.Contains("\"difference\": \"2*x*y\"", json);
        Assert.DoesNotContain("counterexample fails", Idq("show", "right", "--db", Db).Out);
    }

    [Fact]
    public void SqlStatusShowAndExport_Work()
    {
        var file = Path.Combine(_dir, "s.idq");
        File.WriteAllText(file, "t: (x+1)^2 = x^2 + 2*x + 1\nf: (x+1)^2 = x^2 + 1\n");
        Idq("init", "--db", Db);
        Idq("import", file, "--db", Db);
        Idq("run", "--db", Db);
        var sql = Idq("sql", "select label, state from verdicts order by label", "--db", Db, "--csv");
        Assert.Equal(0, sql.Code);
        Assert.Contains("f,refuted", sql.Out);
        Assert.Equal(2, Idq("sql", "delete from candidate", "--db", Db).Code); // read-only
        Assert.Contains("\"survived\": 1", Idq("status", "--db", Db, "--json").Out);
        var show = Idq("show", "f", "--db", Db, "--json");
        Assert.Equal(0, show.Code);
        Assert.Contains("\"outcome\": \"nonzero\"", show.Out);
        var export = Idq("export", "--state", "refuted", "--db", Db);
        Assert.Single(export.Out.Split('\n', StringSplitOptions.RemoveEmptyEntries));
        Assert.Contains("\"witness_modulus\"", export.Out);
    }

    [Fact]
    public void SecondWorkerOnTheSameStore_IsRefused()
    {
        Idq("init", "--db", Db);
        using var held = Worker.StoreLock.TryAcquire(Db).Value;
        Assert.NotNull(held);
        var run = Idq("run", "--db", Db);
        Assert.Equal(2, run.Code);
        Assert.Contains("another worker", run.Err);
    }

    [Fact]
    public void Enqueue_MarksPendingWorkThatTheNextRunFinishes()
    {
        var file = Path.Combine(_dir, "e.idq");
        File.WriteAllText(file, "e: (x+2)^2 = x^2 + 4*x + 4 for n in 1..5\n");
        Idq("init", "--db", Db);
        // Grouping off: the five instances are one identity (n does not occur), which would queue one and share (#15 point 4).
        Idq("import", file, "--db", Db, "--no-grouping");
        var enqueue = Idq("enqueue", "--db", Db);
        Assert.Equal(0, enqueue.Code);
        Assert.Contains("enqueued 5 candidates", enqueue.Out);
        Assert.Equal(5L, Query(Db, "SELECT count(*) FROM result WHERE state = 'queued'").Single()[0]);
        Assert.Equal(0, Idq("run", "--db", Db).Code);
        Assert.Equal(5L, Query(Db, "SELECT count(*) FROM survivors").Single()[0]);
    }

    [Fact]
    public void Demo_BuildsAStoreRunsItAndPrintsTheExampleQueries()
    {
        var demo = Idq("demo", "--db", Db);
        Assert.True(demo.Code == 0, demo.Out + demo.Err);
        Assert.Contains("families that fail only at some n", demo.Out);
        Assert.Equal(0L, Query(Db, "SELECT count(*) FROM result WHERE state IN ('pending', 'queued', 'screening')").Single()[0]);
        Assert.True((long)Query(Db, "SELECT count(*) FROM survivors").Single()[0]! > 100);
        Assert.True((long)Query(Db, "SELECT count(*) FROM rejection").Single()[0]! >= 3);
    }

    [Fact]
    public void CommandsOnAMissingStore_SayToRunInit()
    {
        var status = Idq("status", "--db", Db);
        Assert.Equal(2, status.Code);
        Assert.Contains("idq init", status.Err);
        Assert.Equal(2, Idq("run", "--db", Db).Code);
    }
}
