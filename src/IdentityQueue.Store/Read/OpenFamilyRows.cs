namespace IdentityQueue.Store.Read;

/// <summary>
/// An open-ended family (<c>for n &gt;= A</c>) as the <c>families</c> view gives it: its instances so far, its open family
/// budget, how far it holds and where it fails, and why it stopped growing (null while it can still grow). Immutable.
/// </summary>
public sealed record OpenFamilySummary(string Catalogue, string Family, long Instances, long Budget, string? HoldsFor, string? FailsFor, string? Stop)
{
    /// <summary>"8 instances, holds for 1..5, fails for 6..8: first refuted at n = 6", or "… growing (budget 64)".</summary>
    public string Describe()
    {
        var text = $"{Instances} instance{(Instances == 1 ? "" : "s")}";
        if (HoldsFor is not null) text += $", holds for {HoldsFor}";
        if (FailsFor is not null) text += $", fails for {FailsFor}";
        return text + (Stop is null ? $"; growing (budget {Budget})" : $": {Stop}");
    }

    /// <summary>The open-ended families of the store in catalogue and family order, at most <paramref name="limit"/>.</summary>
    public static IReadOnlyList<OpenFamilySummary> Read(StoreConnection store, int limit = 20) =>
        ReadSql.Rows(store, """
            SELECT f.catalogue, f.family, f.instances, f.open_budget, f.holds_for, f.fails_for, f.open_stop
              FROM families f WHERE f.open_ended = 1
             ORDER BY f.catalogue, f.family
             LIMIT @limit
            """, [("@limit", limit)], r => new OpenFamilySummary(r.Text("catalogue"), r.Text("family"), r.Long("instances"),
            r.Long("open_budget"), r.NullableText("holds_for"), r.NullableText("fails_for"), r.NullableText("open_stop")));
}
