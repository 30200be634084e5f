using System.Globalization;

namespace IdentityQueue.Store.Read;

/// <summary>
/// A candidate's place in an equivalence group (#15 point 4; rows of <c>equivalence</c>): the representative it is the
/// same identity as (null for a representative or a candidate in no group), and for a representative the other members.
/// </summary>
/// <param name="RepresentativeId">The group's representative (its smallest id), or null when this candidate is it or is in no group.</param>
/// <param name="RepresentativeLabel">Its label.</param>
/// <param name="Swapped">True when this candidate's sides are the representative's swapped.</param>
/// <param name="FalseMatchBits">k of "chance of a false match ≤ 2^-k", or null when not bounded.</param>
/// <param name="SharedFrom">The candidate whose result this one shares (<c>result.shared_from</c>), or null when it was screened on its own or waits.</param>
/// <param name="Members">For a representative: the labels of the other members, by id (empty otherwise).</param>
public sealed record StoredEquivalence(long? RepresentativeId, string? RepresentativeLabel, bool Swapped, int? FalseMatchBits, long? SharedFrom,
    IReadOnlyList<string> Members)
{
    /// <summary>"≤ 2^-k" or "not bounded".</summary>
    public string Chance => FalseMatchBits is { } k ? $"≤ 2^-{k.ToString(CultureInfo.InvariantCulture)}" : "not bounded";
}

/// <summary>One equivalence group of a catalogue: the representative and its members, with their states.</summary>
/// <param name="Catalogue">The catalogue's name.</param>
/// <param name="RepresentativeId">The representative's id (the group's smallest).</param>
/// <param name="RepresentativeLabel">Its label.</param>
/// <param name="State">The representative's result state.</param>
/// <param name="Members">The other members by id: label, whose sides are swapped, whether their result is shared, the chance bound's k.</param>
public sealed record EquivalenceGroupRow(string Catalogue, long RepresentativeId, string RepresentativeLabel, string State,
    IReadOnlyList<(string Label, bool Swapped, bool Shared, int? FalseMatchBits)> Members);

/// <summary>Reads equivalence groups, every value a parameter, portable SQL. Uses the connection it is given.</summary>
public static class EquivalenceReads
{
    /// <summary>Candidate <paramref name="id"/>'s place in its group, or null when it is in none.</summary>
    public static StoredEquivalence? Of(StoreConnection store, long id)
    {
        var member = ReadSql.Rows(store, """
            SELECT e.group_candidate_id, g.label, CASE WHEN e.swapped THEN 1 ELSE 0 END AS swapped, e.false_match_bits, r.shared_from
            FROM equivalence e JOIN candidate g ON g.id = e.group_candidate_id LEFT JOIN result r ON r.candidate_id = e.candidate_id
            WHERE e.candidate_id = @id
            """, [("@id", id)], r => new StoredEquivalence(r.Long("group_candidate_id"), r.Text("label"), r.Long("swapped") != 0,
                r.NullableLong("false_match_bits") is { } k ? (int)k : null, r.NullableLong("shared_from"), []));
        if (member.Count > 0) return member[0];
        var members = ReadSql.Rows(store, """
            SELECT c.label FROM equivalence e JOIN candidate c ON c.id = e.candidate_id WHERE e.group_candidate_id = @id ORDER BY e.candidate_id
            """, [("@id", id)], r => r.Text("label"));
        return members.Count == 0 ? null : new StoredEquivalence(null, null, false, null, null, members);
    }

    /// <summary>
    /// The groups of the store (of <paramref name="catalogues"/> when given), by representative id, at most
    /// <paramref name="maxGroups"/>; and the number of groups and members in all.
    /// </summary>
    public static (IReadOnlyList<EquivalenceGroupRow> Groups, long GroupCount, long MemberCount) Groups(StoreConnection store,
        IReadOnlyList<string>? catalogues = null, int maxGroups = 50)
    {
        var (filter, parameters) = ReadSql.In("k.name", "k", catalogues ?? []);
        var totals = ReadSql.Rows(store, $"""
            SELECT COUNT(DISTINCT e.group_candidate_id) AS group_count, COUNT(*) AS member_count
            FROM equivalence e JOIN candidate g ON g.id = e.group_candidate_id JOIN catalogue k ON k.id = g.catalogue_id
            WHERE 1 = 1{filter}
            """, parameters, r => (r.Long("group_count"), r.Long("member_count")))[0];
        var listed = new List<(string Name, object? Value)>(parameters) { ("@max", maxGroups) };
        var rows = ReadSql.Rows(store, $"""
            SELECT k.name AS catalogue, g.id AS representative_id, g.label AS representative, COALESCE(gr.state, 'pending') AS state,
                   c.label AS member, CASE WHEN e.swapped THEN 1 ELSE 0 END AS swapped,
                   CASE WHEN mr.shared_from IS NULL THEN 0 ELSE 1 END AS shared, e.false_match_bits AS bits
            FROM equivalence e JOIN candidate g ON g.id = e.group_candidate_id JOIN candidate c ON c.id = e.candidate_id
                 JOIN catalogue k ON k.id = g.catalogue_id
                 LEFT JOIN result gr ON gr.candidate_id = g.id LEFT JOIN result mr ON mr.candidate_id = c.id
            WHERE e.group_candidate_id IN (
                SELECT e2.group_candidate_id FROM equivalence e2 JOIN candidate g2 ON g2.id = e2.group_candidate_id
                     JOIN catalogue k ON k.id = g2.catalogue_id
                WHERE 1 = 1{filter}
                GROUP BY e2.group_candidate_id ORDER BY e2.group_candidate_id LIMIT @max)
            ORDER BY g.id, c.id
            """, listed, r => (Catalogue: r.Text("catalogue"), Id: r.Long("representative_id"), Label: r.Text("representative"),
                State: r.Text("state"), Member: r.Text("member"), Swapped: r.Long("swapped") != 0, Shared: r.Long("shared") != 0,
                Bits: r.NullableLong("bits")));
        var groups = rows.GroupBy(r => r.Id).Select(g => new EquivalenceGroupRow(g.First().Catalogue, g.Key, g.First().Label, g.First().State,
            g.Select(m => (m.Member, m.Swapped, m.Shared, m.Bits is { } k ? (int?)k : null)).ToList())).ToList();
        return (groups, totals.Item1, totals.Item2);
    }
}
