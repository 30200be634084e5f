using static IdentityQueue.Cli.Tests.StoreFolder;

namespace IdentityQueue.Cli.Tests;

/// <summary><c>idq import</c> run in-process against real SQLite files: counts, rejections and exit codes (SPEC §2).</summary>
public class ImportCommandTests
{
    // The catalogue of the project's contract check (shared/contract/check-contract.sh).
    private const string Catalogue = """
        two-squares: (a^2+b^2)*(c^2+d^2) = (a*c-b*d)^2 + (a*d+b*c)^2
        wrong: (x+y)^2 = x^2 + y^2
        binomial: sum(k in 0..n: binom(n,k)) = 2^n for n in 0..5
        broken: (x+1 = x
        """;

    [Fact]
    public void Import_PrintsTheCounts_AndTheRejection_AndExitsZero()
    {
        using var folder = new StoreFolder();
        Assert.Equal(0, Run("init", "--db", folder.Db).Code);
        var file = folder.Write("c.idq", Catalogue);
        var (code, output, _) = Run("import", file, "--db", folder.Db, "--seed", "5");
        Assert.Equal(0, code);
        Assert.Contains("catalogue 'c' (id 1, seed 5): 3 entries, 8 instances, 1 rejection", output);
        Assert.Contains($"rejected {file}:4: line 4, column 14: expected ')'", output);
    }

    [Fact]
    public void ImportingTheSameNameTwice_IsRefusedWithExitTwo_UntilRenamed()
    {
        using var folder = new StoreFolder();
        Run("init", "--db", folder.Db);
        var file = folder.Write("c.idq", Catalogue);
        Assert.Equal(0, Run("import", file, "--db", folder.Db).Code);
        var (code, _, error) = Run("import", file, "--db", folder.Db);
        Assert.Equal(2, code);
        Assert.Contains("already has a catalogue named 'c'", error);
        Assert.Contains("--catalogue", error);
        Assert.Equal(0, Run("import", file, "--db", folder.Db, "--catalogue", "c2").Code);
    }

    [Fact]
    public void Import_OfAMissingFile_ImportsNoneOfTheFiles_AndExitsTwo()
    {
        using var folder = new StoreFolder();
        Run("init", "--db", folder.Db);
        var good = folder.Write("good.idq", "a: x = x\n");
        var (code, _, error) = Run("import", good, folder.File("missing.idq"), "--db", folder.Db);
        Assert.Equal(2, code);
        Assert.Contains("missing.idq: no such file", error);
        Assert.Equal(0, Run("import", good, "--db", folder.Db).Code);
    }

    [Fact]
    public void Import_IntoAMissingStore_SaysToRunInit_AndExitsTwo()
    {
        using var folder = new StoreFolder();
        var file = folder.Write("c.idq", Catalogue);
        var (code, _, error) = Run("import", file, "--db", folder.Db);
        Assert.Equal(2, code);
        Assert.Contains("idq init", error);
        Assert.False(File.Exists(folder.Db));
    }

    [Fact]
    public void Import_WithCatalogueAndSeveralFiles_IsBadUsage()
    {
        using var folder = new StoreFolder();
        Run("init", "--db", folder.Db);
        var (code, _, error) = Run("import", folder.Write("a.idq", "x = x\n"), folder.Write("b.idq", "y = y\n"), "--db", folder.Db, "--catalogue", "one");
        Assert.Equal(2, code);
        Assert.Contains("one file at a time", error);
    }

    [Fact]
    public void Store_DefaultsToIdqDb()
    {
        using var folder = new StoreFolder();
        Environment.SetEnvironmentVariable("IDQ_DB", folder.Db);
        try
        {
            Assert.Equal(0, Run("init").Code);
            Assert.True(File.Exists(folder.Db));
            Assert.Equal(0, Run("import", folder.Write("c.idq", "x = x\n")).Code);
        }
        finally
        {
            Environment.SetEnvironmentVariable("IDQ_DB", null);
        }
    }
}
