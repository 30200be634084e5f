using System.Text;
using System.Text.Json;

namespace IdentityQueue.Screening.Tests;

/// <summary>
/// Tutte's theorem (J. London Math. Soc. 22 (1947) 107–111; Lovász 1979): the determinant of a graph's Tutte matrix is the
/// zero polynomial exactly when the graph has no perfect matching. The fixture (tests/fixtures/tutte-graphs.jsonl, made by
/// make_tutte_fixture.py) records networkx's maximum-cardinality matching answer for each graph; the screen's verdict on
/// det(T) = 0 must agree on every one.
/// </summary>
public class TutteMatrixTests
{
    private sealed record Graph(string Name, int N, int[][] Edges, bool PerfectMatching);

    private static IEnumerable<Graph> Fixture()
    {
        var path = Path.Combine(AppContext.BaseDirectory, "fixtures", "tutte-graphs.jsonl");
        var options = new JsonSerializerOptions { PropertyNameCaseInsensitive = true };
        foreach (var line in File.ReadLines(path))
            if (line.Length > 0) yield return JsonSerializer.Deserialize<Graph>(line, options)!;
    }

    /// <summary>det(T) = 0 with T_ij = t[i,j], T_ji = −t[i,j] for each edge i &lt; j, and 0 elsewhere.</summary>
    internal static string TutteIdentity(int n, int[][] edges)
    {
        var entries = new string[n, n];
        for (var i = 0; i < n; i++) for (var j = 0; j < n; j++) entries[i, j] = "0";
        foreach (var e in edges)
        {
            int i = Math.Min(e[0], e[1]), j = Math.Max(e[0], e[1]);
            entries[i - 1, j - 1] = $"t[{i},{j}]";
            entries[j - 1, i - 1] = $"-t[{i},{j}]";
        }
        var text = new StringBuilder("det([");
        for (var i = 0; i < n; i++)
        {
            if (i > 0) text.Append(", ");
            text.Append('[');
            for (var j = 0; j < n; j++) text.Append(j > 0 ? ", " : "").Append(entries[i, j]);
            text.Append(']');
        }
        return text.Append("]) = 0").ToString();
    }

    [Fact]
    public void ScreenAgreesWithTheMatchingOracle_OnEveryGraph()
    {
        var graphs = Fixture().ToList();
        Assert.True(graphs.Count >= 200, $"only {graphs.Count} graphs in the fixture");
        Assert.Contains(graphs, g => g.PerfectMatching);
        Assert.Contains(graphs, g => !g.PerfectMatching);
        var disagreements = new List<string>();
        foreach (var g in graphs)
        {
            var r = Some.Screen(TutteIdentity(g.N, g.Edges));
            var expected = g.PerfectMatching ? Verdict.Refuted : Verdict.Survived;
            if (r.Verdict != expected) disagreements.Add($"{g.Name}: expected {expected}, got {r.Verdict} {r.Message}");
        }
        Assert.Empty(disagreements);
    }

    // Known cases: the Petersen graph and the 3-cube have perfect matchings; K_{1,3} and odd cycles have none.
    [Fact]
    public void KnownGraphs_AreInTheFixtureWithTheirKnownAnswers()
    {
        var byName = Fixture().ToDictionary(g => g.Name);
        Assert.True(byName["petersen"].PerfectMatching);
        Assert.True(byName["cube-3"].PerfectMatching);
        Assert.False(byName["star-k13"].PerfectMatching);
        Assert.False(byName["cycle-5"].PerfectMatching);
    }
}
