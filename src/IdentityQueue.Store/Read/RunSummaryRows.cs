using IdentityQueue.Store.Schema;

namespace IdentityQueue.Store.Read;

/// <summary>A catalogue as the end-of-run summary shows it: name, seed, version, and the first survived and refuted labels. Immutable.</summary>
/// <param name="Name">The catalogue's name.</param>
/// <param name="Seed">Its run seed (every trial derives from it).</param>
/// <param name="Version">Its version (1 unless re-imported with <c>--new-version</c>).</param>
/// <param name="Survived">Labels of survived candidates, strongest evidence first, at most the limit asked for.</param>
/// <param name="Refuted">Labels of refuted candidates, in id order, at most the limit asked for.</param>
public sealed record RunSummaryCatalogue(string Name, long Seed, long Version, IReadOnlyList<string> Survived, IReadOnlyList<string> Refuted);

/// <summary>The read model of <c>idq run --summary</c>: the catalogues with their seeds and first labels per verdict. Stateless.</summary>
public static class RunSummaryRows
{
    /// <summary>Every catalogue in name order, with up to <paramref name="labels"/> survived and refuted labels each.</summary>
    public static IReadOnlyList<RunSummaryCatalogue> Read(StoreConnection store, int labels)
    {
        var catalogues = ReadSql.Rows(store, "SELECT id, name, seed, version FROM catalogue ORDER BY name",
            r => (Id: r.Long("id"), Name: r.Text("name"), Seed: r.Long("seed"), Version: r.Long("version")));
        return [.. catalogues.Select(c => new RunSummaryCatalogue(c.Name, c.Seed, c.Version,
            Labels(store, c.Id, ResultStates.Survived, "r.error_bound_log2, c.id", labels), Labels(store, c.Id, ResultStates.Refuted, "c.id", labels)))];
    }

    private static List<string> Labels(StoreConnection store, long catalogueId, string state, string order, int limit) =>
        ReadSql.Rows(store, $"""
            SELECT c.label AS label FROM candidate c JOIN result r ON r.candidate_id = c.id
            WHERE c.catalogue_id = @id AND r.state = @state ORDER BY {order} LIMIT @limit
            """, [("@id", catalogueId), ("@state", state), ("@limit", limit)], r => r.Text("label"));
}
