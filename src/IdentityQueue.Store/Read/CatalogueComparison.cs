using IdentityQueue.Algebra;
using IdentityQueue.Store.Import;
using IdentityQueue.Store.Work;

namespace IdentityQueue.Store.Read;

/// <summary>One entry on one side of a comparison: a candidate (or an earlier version's record of one) and its verdict. Immutable.</summary>
/// <param name="CandidateId">The candidate's id (for an earlier version, its id then; it may be gone).</param>
/// <param name="Label">Its label.</param>
/// <param name="Text">Its catalogue line (sides and field; a family instance's parameters follow in <paramref name="Params"/>).</param>
/// <param name="Params">A family instance's parameters as JSON; null for a plain line.</param>
/// <param name="Identity">Its canonical identity; null when its sides do not parse.</param>
/// <param name="State">Its result state (stored text).</param>
/// <param name="ErrorBoundLog2">Its accumulated error bound, when it survived or is under way.</param>
public sealed record ComparedEntry(long CandidateId, string Label, string Text, string? Params, string? Identity, string State, double? ErrorBoundLog2);

/// <summary>An entry found on both sides whose verdict or identity differs. Immutable.</summary>
/// <param name="From">The entry on the first side.</param>
/// <param name="To">The entry on the second side.</param>
public sealed record ComparedChange(ComparedEntry From, ComparedEntry To)
{
    /// <summary>The result states differ.</summary>
    public bool VerdictChanged => From.State != To.State;

    /// <summary>Same label, another canonical identity (the entry was edited).</summary>
    public bool IdentityChanged => From.Identity is null || To.Identity is null ? From.Text != To.Text || From.Params != To.Params : From.Identity != To.Identity;
}

/// <summary>
/// What differs between two catalogues, or two versions of one: entries added (only on the second side), removed (only on
/// the first), and changed (on both, with another verdict or another identity). Entries are paired by canonical identity
/// first (so a relabelled entry is the same entry), then the rest by label. Immutable.
/// </summary>
/// <param name="From">What the first side is, as shown ("algebra", "algebra version 1").</param>
/// <param name="To">What the second side is.</param>
/// <param name="Added">Entries only on the second side, in its order.</param>
/// <param name="Removed">Entries only on the first side, in its order.</param>
/// <param name="Changed">Pairs whose verdict or identity differs, in the second side's order.</param>
/// <param name="Unchanged">How many pairs have the same identity and verdict.</param>
public sealed record CatalogueComparison(string From, string To, IReadOnlyList<ComparedEntry> Added, IReadOnlyList<ComparedEntry> Removed,
    IReadOnlyList<ComparedChange> Changed, int Unchanged)
{
    /// <summary>Compares the candidates of catalogue <paramref name="first"/> with those of <paramref name="second"/>, or says which name is unknown.</summary>
    public static Result<CatalogueComparison> Catalogues(StoreConnection store, string first, string second)
    {
        var a = Live(store, first);
        if (a is null) return Result<CatalogueComparison>.Fail($"the store has no catalogue named '{first}'");
        var b = Live(store, second);
        if (b is null) return Result<CatalogueComparison>.Fail($"the store has no catalogue named '{second}'");
        return Result<CatalogueComparison>.Ok(Compare(first, second, a, b));
    }

    /// <summary>
    /// Compares an earlier version of catalogue <paramref name="name"/> (<paramref name="version"/>, or the one before the
    /// current when null) with its current candidates, or says why it cannot.
    /// </summary>
    public static Result<CatalogueComparison> Versions(StoreConnection store, string name, int? version)
    {
        var current = ReadSql.Rows(store, "SELECT id, version FROM catalogue WHERE name = @name", [("@name", name)], r => (Id: r.Long("id"), Version: r.Long("version")));
        if (current.Count == 0) return Result<CatalogueComparison>.Fail($"the store has no catalogue named '{name}'");
        var (id, now) = current[0];
        if (now <= 1)
            return Result<CatalogueComparison>.Fail($"catalogue '{name}' has one version only; import a new one with 'idq import FILE --catalogue {name} --new-version', or compare it with another catalogue");
        var from = version ?? (int)(now - 1);
        if (from < 1 || from >= now)
            return Result<CatalogueComparison>.Fail($"catalogue '{name}' is at version {now}; its earlier versions are 1 to {now - 1}");
        var old = ReadSql.Rows(store, """
            SELECT candidate_id, label, params, lhs, rhs, field, identity, state, error_bound_log2
            FROM catalogue_version_entry WHERE catalogue_id = @id AND version = @version ORDER BY id
            """, [("@id", id), ("@version", from)], r => new ComparedEntry(r.Long("candidate_id"), r.Text("label"),
            LineOf(r.Text("lhs"), r.Text("rhs"), r.Text("field")), r.NullableText("params"), r.NullableText("identity"), r.Text("state"),
            r.NullableDouble("error_bound_log2")));
        return Result<CatalogueComparison>.Ok(Compare($"{name} version {from}", $"{name} version {now}", old, Live(store, name)!));
    }

    private static string LineOf(string lhs, string rhs, string field) => Algebra.Syntax.ExprPrinter.Line(lhs, rhs, field);

    /// <summary>The current candidates of a catalogue with their verdicts and canonical identities; null when there is no such catalogue.</summary>
    private static List<ComparedEntry>? Live(StoreConnection store, string name)
    {
        var found = ReadSql.Rows(store, "SELECT id FROM catalogue WHERE name = @name", [("@name", name)], r => r.Long("id"));
        if (found.Count == 0) return null;
        var sides = new StoredSides();
        return ReadSql.Rows(store, """
            SELECT c.id, c.label, c.params, c.lhs, c.rhs, c.field, COALESCE(r.state, 'pending') AS state, r.error_bound_log2
            FROM candidate c LEFT JOIN result r ON r.candidate_id = c.id
            WHERE c.catalogue_id = @id ORDER BY c.id
            """, [("@id", found[0])], r =>
        {
            var (lhs, rhs, field, parameters) = (r.Text("lhs"), r.Text("rhs"), r.Text("field"), r.NullableText("params"));
            return new ComparedEntry(r.Long("id"), r.Text("label"), LineOf(lhs, rhs, field), parameters,
                CatalogueReimporter.Identity(lhs, rhs, field, parameters, Limits.Default, sides), r.Text("state"), r.NullableDouble("error_bound_log2"));
        });
    }

    /// <summary>Pairs the two sides (by identity, then by label) and sorts the pairs into added, removed, changed and unchanged.</summary>
    internal static CatalogueComparison Compare(string fromName, string toName, IReadOnlyList<ComparedEntry> from, IReadOnlyList<ComparedEntry> to)
    {
        var partner = new ComparedEntry?[to.Count];
        var used = new bool[from.Count];
        var byIdentity = new Dictionary<string, Queue<int>>(StringComparer.Ordinal);
        for (var i = 0; i < from.Count; i++)
            if (from[i].Identity is { } key)
            {
                if (!byIdentity.TryGetValue(key, out var queue)) byIdentity[key] = queue = new Queue<int>();
                queue.Enqueue(i);
            }
        for (var j = 0; j < to.Count; j++)
            if (to[j].Identity is { } key && byIdentity.TryGetValue(key, out var queue) && queue.Count > 0)
            {
                var i = queue.Dequeue();
                used[i] = true;
                partner[j] = from[i];
            }
        var byLabel = new Dictionary<string, int>(StringComparer.Ordinal);
        for (var i = 0; i < from.Count; i++)
            if (!used[i]) byLabel.TryAdd(from[i].Label, i);
        for (var j = 0; j < to.Count; j++)
            if (partner[j] is null && byLabel.Remove(to[j].Label, out var i))
            {
                used[i] = true;
                partner[j] = from[i];
            }
        var added = new List<ComparedEntry>();
        var changed = new List<ComparedChange>();
        var unchanged = 0;
        for (var j = 0; j < to.Count; j++)
        {
            if (partner[j] is not { } p) added.Add(to[j]);
            else if (new ComparedChange(p, to[j]) is { VerdictChanged: false, IdentityChanged: false }) unchanged++;
            else changed.Add(new ComparedChange(p, to[j]));
        }
        var removed = from.Where((_, i) => !used[i]).ToList();
        return new CatalogueComparison(fromName, toName, added, removed, changed, unchanged);
    }
}
