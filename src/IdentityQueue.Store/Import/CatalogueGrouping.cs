using System.Collections.Concurrent;
using System.Data.Common;
using System.Diagnostics;
using System.Globalization;
using System.Numerics;
using IdentityQueue.Algebra;
using IdentityQueue.Algebra.Syntax;
using IdentityQueue.Screening.Equivalence;
using IdentityQueue.Store.Work;

namespace IdentityQueue.Store.Import;

/// <summary>What grouping a catalogue found: fingerprinted candidates, members written (entries after the first of their group), groups, time.</summary>
public sealed record GroupingSummary(int Candidates, int Fingerprinted, int Members, int Groups, TimeSpan Elapsed)
{
    /// <summary>Fingerprints computed (the others were of a text seen before, or its sides swapped).</summary>
    public int Computed { get; init; }

    /// <summary>Chance bounds computed (one per distinct pair of representative and member texts).</summary>
    public int Pairs { get; init; }

    /// <summary>Time to read the candidates.</summary>
    public TimeSpan ReadTime { get; init; }

    /// <summary>Time to fingerprint them.</summary>
    public TimeSpan FingerprintTime { get; init; }

    /// <summary>Time to bound the chance of a false match of the members.</summary>
    public TimeSpan BoundTime { get; init; }
}

/// <summary>
/// Groups the candidates of one catalogue that are the same identity written differently (#15 point 4): each candidate is
/// bound from its stored text and fingerprinted (<see cref="Fingerprint.Of"/>, the catalogue's seed; in parallel), the
/// prints grouped (<see cref="EquivalenceGroups.Build"/>: the same field and shape and the same unordered pair of side
/// prints, sides swapped count as the same), and one <c>equivalence</c> row written per member (the representative is the
/// smallest id) with k of "chance of a false match ≤ 2^-k" from <see cref="Fingerprint.FalseMatchLog2(IdentityEntry, IReadOnlyDictionary{string, BigInteger}, IdentityEntry, IReadOnlyDictionary{string, BigInteger}, bool, Limits?)"/>.
/// <para>
/// Groups never cross catalogues: a catalogue's seed draws its fingerprint fields and points, and a catalogue is what a
/// run screens. Within a catalogue it looks at every candidate, so calling it again after candidates were added (a new
/// version of the catalogue) puts the new ones into the existing groups; rows already written are kept (a candidate that
/// already screened on its own stays so). Uses the connection it is given; not thread-safe (its fingerprints run on
/// several threads, its SQL on the caller's).
/// </para>
/// </summary>
public sealed class CatalogueGrouping(StoreConnection store)
{
    private readonly StoreConnection _store = store;
    private readonly DbConnection _db = store.Connection;

    /// <summary>Fingerprints the candidates of catalogue <paramref name="catalogueId"/> and writes the equivalence rows of its groups.</summary>
    /// <param name="catalogueId">The catalogue's row id.</param>
    /// <param name="limits">The limits the stored sides are parsed and compiled under.</param>
    /// <param name="threads">Threads for the fingerprints; null for the number of cores.</param>
    public GroupingSummary Group(long catalogueId, Limits? limits = null, int? threads = null)
    {
        limits ??= Limits.Default;
        var clock = Stopwatch.StartNew();
        var candidates = new List<StoredCandidate>();
        using (var select = _db.Command(CandidateStore.CandidateColumns + " WHERE c.catalogue_id = @id ORDER BY c.id"))
        {
            select.Parameter("@id", catalogueId);
            using var r = select.ExecuteReader();
            while (r.Read()) candidates.Add(CandidateStore.ReadCandidate(r));
        }
        var read = clock.Elapsed;
        var prints = new Fingerprint?[candidates.Count];
        // A text seen before (the same sides, field and parameters, or the sides swapped) has that print: the same
        // identity, computed once. Consecutive ranges, so that a family's instances (adjacent ids, the same stored sides)
        // share one parse per range.
        var known = new ConcurrentDictionary<(string Lhs, string Rhs, string Field, string? Params), Fingerprint?>();
        var computed = 0;
        var parallel = new ParallelOptions { MaxDegreeOfParallelism = threads ?? Environment.ProcessorCount };
        Parallel.ForEach(Partitioner.Create(0, candidates.Count, 256), parallel, range =>
        {
            var sides = new StoredSides();
            for (var i = range.Item1; i < range.Item2; i++)
            {
                var c = candidates[i];
                if (known.TryGetValue((c.Lhs, c.Rhs, c.Field, c.Params), out var same)) prints[i] = same;
                else if (known.TryGetValue((c.Rhs, c.Lhs, c.Field, c.Params), out var mirrored))
                    prints[i] = mirrored is { } m ? m with { Left = m.Right, Right = m.Left } : null;
                else
                {
                    prints[i] = known[(c.Lhs, c.Rhs, c.Field, c.Params)] = PrintOf(c, limits, sides);
                    Interlocked.Increment(ref computed);
                }
            }
        });
        var fingerprinted = clock.Elapsed;
        var rows = EquivalenceGroups.Build(candidates.Select((c, i) => (c.Id, prints[i])));
        var byId = new Dictionary<long, int>(candidates.Count);
        for (var i = 0; i < candidates.Count; i++) byId[candidates[i].Id] = i;
        // The chance bound per distinct pair of texts (members written exactly like an earlier member share it), in parallel.
        var pairs = rows.Select(r => (Representative: byId[r.RepresentativeId], Member: byId[r.Id], r.Swapped))
            .GroupBy(p => (Text(candidates[p.Representative]), Text(candidates[p.Member]), p.Swapped))
            .Select(g => g.First()).ToList();
        var bounds = new ConcurrentDictionary<((string, string, string, string?), (string, string, string, string?), bool), int?>();
        Parallel.ForEach(pairs, parallel, p => bounds[(Text(candidates[p.Representative]), Text(candidates[p.Member]), p.Swapped)] =
            FalseMatchBits(candidates[p.Representative], prints[p.Representative]!.Value, candidates[p.Member], p.Swapped, limits));
        var bounded = clock.Elapsed;

        using var transaction = _db.BeginTransaction();
        using var insert = _db.Command("""
            INSERT INTO equivalence (candidate_id, group_candidate_id, swapped, false_match_bits)
            VALUES (@candidate, @group, @swapped, @bits)
            ON CONFLICT (candidate_id) DO NOTHING
            """, transaction);
        var candidate = insert.Parameter("@candidate");
        var group = insert.Parameter("@group");
        var swapped = insert.Parameter("@swapped");
        var bits = insert.Parameter("@bits");
        insert.Prepare();
        foreach (var row in rows)
        {
            var representative = byId[row.RepresentativeId];
            candidate.Set(row.Id);
            group.Set(row.RepresentativeId);
            swapped.Set(row.Swapped);
            bits.Set(bounds[(Text(candidates[representative]), Text(candidates[byId[row.Id]]), row.Swapped)]);
            insert.ExecuteNonQuery();
        }
        transaction.Commit();
        var groups = rows.Select(r => r.RepresentativeId).Distinct().Count();
        return new GroupingSummary(candidates.Count, prints.Count(p => p is not null), rows.Count, groups, clock.Elapsed)
        {
            Computed = computed,
            Pairs = pairs.Count,
            ReadTime = read,
            FingerprintTime = fingerprinted - read,
            BoundTime = bounded - fingerprinted,
        };
    }

    private static (string, string, string, string?) Text(StoredCandidate c) => (c.Lhs, c.Rhs, c.Field, c.Params);

    /// <summary>The fingerprint of a stored candidate, or null when it has none (it does not bind, compile or evaluate; a series identity).</summary>
    internal static Fingerprint? PrintOf(StoredCandidate candidate, Limits limits, StoredSides? sides = null)
    {
        try
        {
            var bound = candidate.Bind(limits, sides);
            return bound.Success ? Fingerprint.Of(bound.Entry, bound.Parameters, candidate.Seed, limits) : null;
        }
        catch (Exception e) when (e is not OutOfMemoryException)
        {
            // A candidate the screen would call invalid or failed gets no print: it is screened on its own.
            return null;
        }
    }

    /// <summary>k with "the chance that <paramref name="member"/> is grouped with <paramref name="representative"/> although it is not the same identity is ≤ 2^-k", or null when not bounded.</summary>
    private static int? FalseMatchBits(StoredCandidate representative, Fingerprint print, StoredCandidate member, bool swapped, Limits limits)
    {
        try
        {
            var a = representative.Bind(limits);
            var b = member.Bind(limits);
            if (!a.Success || !b.Success) return null;
            var log2 = print.FalseMatchLog2(a.Entry, a.Parameters, b.Entry, b.Parameters, swapped, limits);
            return log2 is { } l && double.IsFinite(l) ? (int)Math.Floor(-l) : null;
        }
        catch (Exception e) when (e is not OutOfMemoryException)
        {
            return null;
        }
    }

    /// <summary>The text a shared result's message starts with (SQL of <see cref="CandidateStore"/> writes the same words).</summary>
    public static string SharedMessage(string representativeLabel, int? falseMatchBits, bool swapped) =>
        $"same identity as {representativeLabel} ({(swapped ? "sides swapped, " : "")}fingerprint match, chance of a false match "
        + (falseMatchBits is { } k ? $"≤ 2^-{k.ToString(CultureInfo.InvariantCulture)})" : "not bounded)");
}
