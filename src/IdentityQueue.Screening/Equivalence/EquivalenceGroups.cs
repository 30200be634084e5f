namespace IdentityQueue.Screening.Equivalence;

/// <summary>
/// An entry that is the same identity as an earlier one (up to the chance <see cref="Fingerprint.FalseMatchLog2(double, double)"/> bounds):
/// it shares the evidence of <paramref name="RepresentativeId"/>, the smallest id of its group; <paramref name="Swapped"/>
/// when its left side is the representative's right side (and not its left).
/// </summary>
public readonly record struct EquivalentEntry(long Id, long RepresentativeId, bool Swapped);

/// <summary>Groups entries by fingerprint: the same field and shape and the same unordered pair of side prints. Pure.</summary>
public static class EquivalenceGroups
{
    /// <summary>
    /// One row per entry that has an earlier (smaller) id in its group, in id order; representatives and entries without a
    /// fingerprint (null) get none. An id given twice counts once (its first fingerprint).
    /// </summary>
    public static IReadOnlyList<EquivalentEntry> Build(IEnumerable<(long Id, Fingerprint? Print)> entries)
    {
        var representatives = new Dictionary<(string Field, string Shape, UInt128 Low, UInt128 High), (long Id, Fingerprint Print)>();
        var seen = new HashSet<long>();
        var rows = new List<EquivalentEntry>();
        foreach (var (id, print) in entries.OrderBy(e => e.Id))
        {
            if (!seen.Add(id) || print is not { } p) continue;
            var key = (p.Field, p.Shape, UInt128.Min(p.Left, p.Right), UInt128.Max(p.Left, p.Right));
            if (representatives.TryGetValue(key, out var representative))
                rows.Add(new EquivalentEntry(id, representative.Id, p.Left != representative.Print.Left));
            else
                representatives.Add(key, (id, p));
        }
        return rows;
    }
}
