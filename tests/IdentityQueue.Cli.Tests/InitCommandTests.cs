using static IdentityQueue.Cli.Tests.StoreFolder;

namespace IdentityQueue.Cli.Tests;

/// <summary><c>idq init</c> run in-process against real SQLite files.</summary>
public class InitCommandTests
{
    [Fact]
    public void Init_CreatesTheStore_ThenSaysItIsUpToDate()
    {
        using var folder = new StoreFolder();
        var (code, output, _) = Run("init", "--db", folder.Db);
        Assert.Equal(0, code);
        Assert.StartsWith("created store", output);
        Assert.True(File.Exists(folder.Db));
        (code, output, _) = Run("init", "--db", folder.Db);
        Assert.Equal(0, code);
        Assert.Contains("up to date", output);
    }

    [Fact]
    public void Init_OfAFileThatIsNotADatabase_ExitsTwo()
    {
        using var folder = new StoreFolder();
        var path = folder.Write("junk.db", new string('j', 8192));
        var (code, _, error) = Run("init", "--db", path);
        Assert.Equal(2, code);
        Assert.Contains("cannot open the store", error);
    }
}
