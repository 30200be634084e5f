using System.Diagnostics;
using Xunit.Abstractions;

namespace IdentityQueue.Store.Tests.Import;

public sealed class ImportStreamingTests(ITestOutputHelper output)
{
    [Fact]
    public void TwoHundredThousandLines_ImportInBatches()
    {
        const int lines = 200_000;
        using var store = TempStore.Create();
        var path = Path.Combine(store.Folder, "large.idq");
        using (var writer = new StreamWriter(path))
        {
            for (var i = 0; i < lines; i++)
            {
                if (i % 1000 == 999) writer.WriteLine($"bad{i}: (x + {i} = x");
                else writer.WriteLine($"l{i}: (x + {i})^2 = x^2 + {2L * i}*x + {(long)i * i}");
            }
        }
        var clock = Stopwatch.StartNew();
        var summary = store.Import(path);
        clock.Stop();

        Assert.Equal(lines, summary.Lines);
        Assert.Equal(lines - lines / 1000, summary.Instances);
        Assert.Equal(lines / 1000, summary.Rejections);
        Assert.Equal(summary.Instances, store.Count("SELECT COUNT(*) FROM candidate"));
        Assert.Equal(summary.Instances, store.Count("SELECT COUNT(*) FROM result WHERE state = 'pending'"));
        Assert.Equal("(x + 199998)^2", store.Scalar("SELECT lhs FROM candidate WHERE label = 'l199998'"));
        output.WriteLine($"imported {lines} lines in {clock.Elapsed.TotalSeconds:F2} s: {lines / clock.Elapsed.TotalSeconds:F0} lines/s; " +
            $"peak working set {Process.GetCurrentProcess().PeakWorkingSet64 / (1 << 20)} MiB");
    }
}
