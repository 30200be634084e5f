using System.Diagnostics;
using Microsoft.Data.Sqlite;

namespace IdentityQueue.Cli.Tests;

/// <summary>
/// <c>idq export --format smtlib|tex|md</c> on a real store (init, import, run), with Debian's z3 as the outside prover:
/// the scripts for published true identities must be <c>unsat</c>, the script of a false one <c>sat</c>.
/// </summary>
public sealed class HandOffExportTests : IDisposable
{
    private const string Z3 = "/usr/bin/z3";

    private readonly StoreFolder _folder = new();

    public void Dispose()
    {
        SqliteConnection.ClearAllPools();
        _folder.Dispose();
    }

    private const string Catalogue = """
        # Euclid, Elements II.4 (the square of a sum, in geometric form) [memory]
        square: (a+b)^2 = a^2 + 2*a*b + b^2
        # Vandermonde determinant: Knuth, TAOCP vol. 1, §1.2.3 exercise 37 [memory]
        vdm: det(matrix(i in 1..n, j in 1..n: x[i]^(j-1))) = prod(i in 1..n: prod(j in i+1..n: x[j] - x[i])) for n in 2..3
        # Sum of the first n integers: Graham, Knuth, Patashnik, Concrete Mathematics, §2.1 [memory]
        gauss: sum(k in 1..n: k) = n*(n+1)/2 for n in 1..6
        # Cauchy–Binet, a 2×3 times a 3×2 matrix: Horn & Johnson, Matrix Analysis, §0.8.7 [memory]
        cauchy-binet: det([[a,b,c],[d,e,f]]*[[g,h],[i,j],[k,l]]) = det([[a,b],[d,e]])*det([[g,h],[i,j]]) + det([[a,c],[d,f]])*det([[g,h],[k,l]]) + det([[b,c],[e,f]])*det([[i,j],[k,l]])
        # Partial fractions: Graham, Knuth, Patashnik, Concrete Mathematics, §2.6 [memory]
        partial: 1/(x*(x+1)) = 1/x - 1/(x+1)
        # Pfaffian squared is the determinant: Cayley (1849) [memory]
        pfaffian: pf([[0,a,b,c],[-a,0,d,e],[-b,-d,0,f],[-c,-e,-f,0]])^2 = det([[0,a,b,c],[-a,0,d,e],[-b,-d,0,f],[-c,-e,-f,0]])
        # Cayley–Hamilton for 2×2 matrices: Cayley, Phil. Trans. 148 (1858)
        cayley-hamilton: [[a,b],[c,d]]^2 - tr([[a,b],[c,d]])*[[a,b],[c,d]] + det([[a,b],[c,d]])*id(2) = 0
        # x^n = Σ_k {n,k} k! binom(x, k): Graham, Knuth, Patashnik, Concrete Mathematics (6.10) [memory]
        stirling-power: x^n = sum(k in 0..n: stirling2(n, k)*fact(k)*binom(x, k)) for n in 2..3
        # Gaussian binomial at 1/q (a negative power of q): Kac & Cheung, Quantum Calculus, ch. 6 [memory]
        q-inverse: qbinom(n, 2, 1/q) = q^(-2*(n-2))*qbinom(n, 2, q) for n in 3..4
        # Frobenius over GF(5): Lidl & Niederreiter, Finite Fields, Thm 1.46 [memory]; not a statement over the reals
        frobenius: (x+y)^5 = x^5 + y^5 over GF(5)
        # false: the difference is 2xy (common practice)
        false-square: (x+y)^2 = x^2 + y^2
        # false: the right side is (2x+1)/(x(x+1)) (from the partial fractions above)
        false-partial: 1/(x*(x+1)) = 1/x + 1/(x+1)
        """;

    private static readonly string[] TrueLabels =
    [
        "square", "vdm[n=2]", "vdm[n=3]", "gauss[n=1]", "gauss[n=2]", "gauss[n=3]", "gauss[n=4]", "gauss[n=5]", "gauss[n=6]",
        "cauchy-binet", "partial", "pfaffian", "cayley-hamilton",
        "stirling-power[n=2]", "stirling-power[n=3]", "q-inverse[n=3]", "q-inverse[n=4]",
    ];

    private string MakeStore()
    {
        var file = _folder.Write("handoff.idq", Catalogue);
        Assert.Equal(0, StoreFolder.Run("init", "--db", _folder.Db).Code);
        Assert.Equal(0, StoreFolder.Run("import", file, "--db", _folder.Db, "--seed", "7").Code);
        var run = StoreFolder.Run("run", "--db", _folder.Db, "--workers", "2");
        Assert.True(run.Code == 0, run.Out + run.Err);
        return _folder.Db;
    }

    /// <summary>z3's answers for a script, one per check-sat. Fails with how to install z3 when it is missing.</summary>
    private static List<string> RunZ3(string script)
    {
        Assert.True(File.Exists(Z3), $"{Z3} is missing: install z3 (apt-get install z3); .ci/run installs it");
        var start = new ProcessStartInfo(Z3) { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false };
        start.ArgumentList.Add("-smt2");
        start.ArgumentList.Add("-T:20");
        start.ArgumentList.Add(script);
        using var z3 = Process.Start(start)!;
        var output = z3.StandardOutput.ReadToEnd();
        z3.WaitForExit();
        return output.Split('\n', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries).ToList();
    }

    [ExternalToolFact(Z3, "z3")]
    public void SmtLibScripts_OfTrueSurvivorsAreUnsat_InOneFilePerCandidate()
    {
        var db = MakeStore();
        var dir = _folder.File("proofs");
        var export = StoreFolder.Run("export", "--format", "smtlib", "--out", dir, "--db", db);
        Assert.Equal(0, export.Code);
        // the GF(5) survivor cannot be stated over the reals: skipped with the reason, and counted
        Assert.Contains("(frobenius): it is stated over GF(5)", export.Err);
        Assert.Contains($"wrote {TrueLabels.Length} SMT-LIB scripts to {dir}; skipped 1", export.Out);

        var files = Directory.GetFiles(dir, "*.smt2");
        Assert.Equal(TrueLabels.Length, files.Length);
        Assert.Contains(files, f => Path.GetFileName(f).EndsWith("-vdm_n_3.smt2", StringComparison.Ordinal));
        foreach (var file in files)
        {
            var text = File.ReadAllText(file);
            Assert.StartsWith("; candidate ", text);
            Assert.Contains("very likely true, not proven", text);
            Assert.Equal(["unsat"], RunZ3(file));
        }
    }

    [ExternalToolFact(Z3, "z3")]
    public void SmtLibScript_OnStandardOutput_HasOnePushPopBlockPerCandidate()
    {
        var db = MakeStore();
        var export = StoreFolder.Run("export", "--format", "smtlib", "--db", db);
        Assert.Equal(0, export.Code);
        Assert.Equal(TrueLabels.Length, export.Out.Split('\n').Count(l => l == "(push 1)"));
        Assert.Contains("skipped 1", export.Err);
        var script = _folder.Write("all.smt2", export.Out);
        Assert.Equal(Enumerable.Repeat("unsat", TrueLabels.Length), RunZ3(script));
    }

    [ExternalToolFact(Z3, "z3")]
    public void SmtLibScripts_OfFalseIdentitiesExportedByMistake_AreSat()
    {
        var db = MakeStore();
        var dir = _folder.File("refuted");
        Assert.Equal(0, StoreFolder.Run("export", "--format", "smtlib", "--state", "refuted", "--out", dir, "--db", db).Code);
        var files = Directory.GetFiles(dir, "*.smt2");
        Assert.Equal(2, files.Length);
        foreach (var file in files) Assert.Equal(["sat"], RunZ3(file));
    }

    [Fact]
    public void TexAndMarkdown_TabulateTheSurvivorsWithTheCaution()
    {
        var db = MakeStore();
        var tex = StoreFolder.Run("export", "--format", "tex", "--db", db);
        Assert.Equal(0, tex.Code);
        Assert.Contains(@"\begin{longtable}", tex.Out);
        Assert.Contains(@"\texttt{vdm[n=3]}", tex.Out);
        Assert.Contains("very likely true, not proven", tex.Out);
        Assert.DoesNotContain("false-square", tex.Out);

        var mdFile = _folder.File("survivors.md");
        var md = StoreFolder.Run("export", "--format", "md", "--out", mdFile, "--db", db);
        Assert.Equal(0, md.Code);
        var text = File.ReadAllText(mdFile);
        Assert.Contains("| `gauss[n=6]` | `gauss` | n=6 | `sum(k in 1..n: k) = n*(n + 1)/2` |", text);
        Assert.Contains("2^-", text);
        Assert.Contains("very likely true, not proven", text);
        Assert.Equal(TrueLabels.Length + 1, text.Split('\n').Count(l => l.StartsWith("| `", StringComparison.Ordinal)));
    }

    [Fact]
    public void JsonLines_CarryTheEvidenceColumns()
    {
        var db = MakeStore();
        var export = StoreFolder.Run("export", "--state", "survived", "--db", db);
        var first = export.Out.Split('\n', StringSplitOptions.RemoveEmptyEntries)[0];
        foreach (var key in new[] { "label", "family", "params", "lhs", "rhs", "field", "state", "degree_bound", "error_bound_log2", "trials", "witness_point", "height_bound_log2", "trials_zero" })
            Assert.Contains($"\"{key}\":", first);
    }
}
