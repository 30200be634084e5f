using System.Data.Common;
using System.Globalization;
using System.Numerics;
using IdentityQueue.Screening.Catalogues;
using IdentityQueue.Store.Schema;

namespace IdentityQueue.Store.Work;

/// <summary>
/// The open-ended families of a store (<c>open_family</c>, one row per <c>for n &gt;= A</c> family): recorded at import with
/// their first chunk, and grown by <see cref="Grow"/> in increasing n, a chunk at a time. A family grows when every
/// instance made so far is final and none is refuted (an <c>invalid</c>, <c>undecided</c> or <c>failed</c> instance counts
/// as not refuted, so a bad instance never stops the family nor blocks the batch), until its open family budget; at its
/// first refuted instance it stops (the rest of that chunk is still screened). Safe when several processes grow at once:
/// the chunk is claimed by a compare-and-set on <c>open_family.made</c> in the transaction that inserts it, so a chunk is
/// made once (a concurrent grower's update matches no row and it inserts nothing). Uses the connection it is given;
/// not thread-safe.
/// </summary>
public sealed class OpenFamilies(StoreConnection store)
{
    private readonly DbConnection _db = store.Connection;

    // Every state in which an instance is final and not refuted; any other state (refuted, or waiting, or being
    // screened) holds the family where it is.
    private static readonly string NotHolding = string.Join(", ",
        ResultStates.Final.Where(s => s != ResultState.Refuted).Select(s => $"'{s.Text()}'"));

    /// <summary>Records an open-ended family of catalogue <paramref name="catalogueId"/> whose first <paramref name="made"/> instances exist.</summary>
    public void Add(long catalogueId, string family, OpenFamily open, int made, DbTransaction? transaction = null)
    {
        using var insert = _db.Command("""
            INSERT INTO open_family (catalogue_id, family, parameter, first_value, budget, chunk, made)
            VALUES (@catalogue, @family, @parameter, @first, @budget, @chunk, @made)
            """, transaction);
        insert.Parameter("@catalogue", catalogueId);
        insert.Parameter("@family", family);
        insert.Parameter("@parameter", open.Parameter);
        insert.Parameter("@first", (long)open.First);
        insert.Parameter("@budget", open.Budget.Instances);
        insert.Parameter("@chunk", open.Budget.Chunk);
        insert.Parameter("@made", made);
        insert.ExecuteNonQuery();
    }

    private sealed record Growable(long Id, long CatalogueId, string Family, string Parameter, long First, int Budget, int Chunk, int Made);

    /// <summary>
    /// Adds the next chunk of every open-ended family that may grow now (pending candidates with pending results);
    /// returns how many instances were added. Cheap when there are none: one query on <c>open_family</c>.
    /// </summary>
    public int Grow()
    {
        var growable = new List<Growable>();
        using (var find = _db.Command($"""
            SELECT o.id, o.catalogue_id, o.family, o.parameter, o.first_value, o.budget, o.chunk, o.made
              FROM open_family o
             WHERE o.made < o.budget
               AND NOT EXISTS (SELECT 1 FROM candidate c LEFT JOIN result r ON r.candidate_id = c.id
                                WHERE c.catalogue_id = o.catalogue_id AND c.family = o.family
                                  AND (r.state IS NULL OR r.state NOT IN ({NotHolding})))
             ORDER BY o.id
            """))
        using (var rows = find.ExecuteReader())
            while (rows.Read())
                growable.Add(new Growable(rows.GetInt64(0), rows.GetInt64(1), rows.GetString(2), rows.GetString(3), rows.GetInt64(4),
                    Convert.ToInt32(rows.GetValue(5), CultureInfo.InvariantCulture), Convert.ToInt32(rows.GetValue(6), CultureInfo.InvariantCulture),
                    Convert.ToInt32(rows.GetValue(7), CultureInfo.InvariantCulture)));
        var added = 0;
        foreach (var family in growable) added += GrowOne(family);
        return added;
    }

    private int GrowOne(Growable family)
    {
        var count = Math.Max(0, Math.Min(family.Chunk, family.Budget - family.Made));
        if (count == 0) return 0;
        using var transaction = _db.BeginTransaction();
        // Checkpoint: the chunk is claimed here. A concurrent grower that read the same 'made' matches no row (PostgreSQL
        // re-reads the row after the first commits; SQLite has one writer) and adds nothing. If the process dies before the
        // commit, nothing of the chunk exists and the next look adds it.
        using (var claim = _db.Command("UPDATE open_family SET made = @next WHERE id = @id AND made = @made", transaction))
        {
            claim.Parameter("@next", family.Made + count);
            claim.Parameter("@id", family.Id);
            claim.Parameter("@made", family.Made);
            if (claim.ExecuteNonQuery() != 1) return 0;
        }
        long template;
        using (var first = _db.Command("SELECT MIN(id) FROM candidate WHERE catalogue_id = @catalogue AND family = @family", transaction))
        {
            first.Parameter("@catalogue", family.CatalogueId);
            first.Parameter("@family", family.Family);
            if (first.ExecuteScalar() is not { } id || id is DBNull) return 0; // the instances were deleted by hand: nothing to copy
            template = Convert.ToInt64(id, CultureInfo.InvariantCulture);
        }
        using var insert = _db.Command("""
            INSERT INTO candidate (catalogue_id, label, family, params, lhs, rhs, field, position, lhs_column, rhs_column)
            SELECT catalogue_id, @label, family, @params, lhs, rhs, field, position, lhs_column, rhs_column
              FROM candidate WHERE id = @template
            RETURNING id
            """, transaction);
        insert.Parameter("@template", template);
        var label = insert.Parameter("@label");
        var parameters = insert.Parameter("@params");
        using var result = _db.Command($"INSERT INTO result (candidate_id, state) VALUES (@id, '{ResultStates.Pending}')", transaction);
        var resultId = result.Parameter("@id");
        for (var i = 0; i < count; i++)
        {
            KeyValuePair<string, BigInteger>[] value = [new(family.Parameter, new BigInteger(family.First) + family.Made + i)];
            label.Set(CatalogueEntry.InstanceLabel(family.Family, value));
            parameters.Set(ParamsText.Write(value));
            resultId.Set(Convert.ToInt64(insert.ExecuteScalar(), CultureInfo.InvariantCulture));
            result.ExecuteNonQuery();
        }
        transaction.Commit();
        return count;
    }
}
