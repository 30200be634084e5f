using IdentityQueue.Store.Schema;

namespace IdentityQueue.Store.Read;

/// <summary>How many candidates of a catalogue are in a state. Immutable.</summary>
public sealed record CatalogueStateCount(string Catalogue, ResultState State, long Count);

/// <summary>
/// What <c>idq status</c> shows of the store: candidates per catalogue and state (from their result rows), and how many
/// were settled lately. Immutable.
/// </summary>
public sealed record StatusCounts(IReadOnlyList<CatalogueStateCount> Counts, long SettledLastMinute)
{
    public bool Equals(StatusCounts? other) =>
        other is not null && SettledLastMinute == other.SettledLastMinute && Counts.SequenceEqual(other.Counts);

    public override int GetHashCode() => HashCode.Combine(Counts.Count, SettledLastMinute);

    /// <summary>The catalogues in name order, each with its count per state (states without candidates are absent).</summary>
    public IReadOnlyList<(string Catalogue, IReadOnlyDictionary<ResultState, long> States)> ByCatalogue() =>
        [.. Counts.GroupBy(c => c.Catalogue).Select(g => (g.Key, (IReadOnlyDictionary<ResultState, long>)g.ToDictionary(c => c.State, c => c.Count)))];

    /// <summary>Candidates waiting or being screened.</summary>
    public long Open => Counts.Where(c => !c.State.IsFinal()).Sum(c => c.Count);

    /// <summary>Reads the counts, every state named by a parameter.</summary>
    public static StatusCounts Read(StoreConnection store)
    {
        var counts = ReadSql.Rows(store, """
            SELECT k.name AS catalogue, r.state AS state, count(*) AS n
            FROM result r JOIN candidate c ON c.id = r.candidate_id JOIN catalogue k ON k.id = c.catalogue_id
            GROUP BY k.name, r.state ORDER BY k.name, r.state
            """, r => new CatalogueStateCount(r.Text("catalogue"), ResultStates.Parse(r.Text("state")), r.Long("n")));
        var (final, parameters) = ReadSql.In("state", "s", [.. ResultStates.Final.Select(s => s.Text())]);
        var settled = ReadSql.Rows(store, $"SELECT count(*) AS n FROM result WHERE updated_at >= {store.SecondsAgo(60)}{final}", parameters, r => r.Long("n"));
        return new StatusCounts(counts, settled[0]);
    }
}
