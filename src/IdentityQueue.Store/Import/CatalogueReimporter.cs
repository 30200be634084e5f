using System.Data.Common;
using System.Diagnostics;
using System.Globalization;
using System.Numerics;
using IdentityQueue.Algebra;
using IdentityQueue.Screening;
using IdentityQueue.Screening.Catalogues;
using IdentityQueue.Store.Schema;
using IdentityQueue.Store.Work;

namespace IdentityQueue.Store.Import;

/// <summary>What a new version of a catalogue did to the store. Immutable.</summary>
/// <param name="CatalogueId">The catalogue's row id (unchanged).</param>
/// <param name="Catalogue">The catalogue's name.</param>
/// <param name="Source">The file read.</param>
/// <param name="Version">The catalogue's version now (the replaced one is <c>Version - 1</c>, kept in <c>catalogue_version_entry</c>).</param>
/// <param name="Lines">Physical lines read.</param>
/// <param name="Entries">Lines that gave an identity or a family.</param>
/// <param name="Instances">Candidates of the new version.</param>
/// <param name="Rejections">Lines rejected.</param>
/// <param name="Kept">Candidates whose canonical identity was already there: their rows, results and trials are kept.</param>
/// <param name="Relabelled">Of <paramref name="Kept"/>, those whose label or family label changed (updated in place, as is a changed line or spacing).</param>
/// <param name="Added">New or changed identities, inserted pending.</param>
/// <param name="Removed">Candidates of the old version whose identity is not in the file: deleted with their evidence (their verdicts stay in <c>catalogue_version_entry</c>).</param>
/// <param name="FirstRejections">The first rejections, for the summary.</param>
/// <param name="Elapsed">How long it took.</param>
public sealed record ReimportSummary(
    long CatalogueId,
    string Catalogue,
    string Source,
    int Version,
    int Lines,
    int Entries,
    int Instances,
    int Rejections,
    int Kept,
    int Relabelled,
    int Added,
    int Removed,
    IReadOnlyList<Rejection> FirstRejections,
    TimeSpan Elapsed)
{
    /// <summary>What was accepted but deserves a word, as in <see cref="ImportSummary.Warnings"/>.</summary>
    public IReadOnlyList<string> Warnings { get; init; } = [];
}

/// <summary>
/// <c>idq import --new-version</c>: replaces the candidates of an existing catalogue by a file's, keeping the evidence of
/// every instance whose canonical identity (<see cref="CandidateKey.Canonical"/>: both sides printed from the tree, the
/// field, the parameters — what the trials are seeded with) is unchanged. Such a candidate keeps its row (its id), its
/// result, its trials and its refutation details; a changed label, family or line is updated in place. A new or changed
/// identity is inserted pending; a candidate whose identity is no longer in the file is deleted with its evidence. Before
/// anything changes, every candidate of the old version is written to <c>catalogue_version_entry</c> with its text,
/// canonical identity and verdict, so that <c>idq compare</c> can show what changed. The catalogue keeps its name, id and
/// seed (so that kept evidence and new trials come from one seed); its version goes up by one. Everything happens in one
/// transaction: the store holds the old version or the new one. Refused while any candidate of the catalogue is queued or
/// being screened. Uses the connection it is given; not thread-safe.
/// </summary>
public sealed class CatalogueReimporter(StoreConnection store)
{
    private readonly DbConnection _db = store.Connection;

    /// <summary>Why replacing the catalogue by <paramref name="path"/> would be refused, or null.</summary>
    public string? Check(string path, ImportOptions? options = null)
    {
        options ??= new ImportOptions();
        if (CatalogueImporter.CheckFile(path, options) is { } refusal) return refusal;
        var name = options.CatalogueName ?? CatalogueImporter.DefaultName(path);
        if (Find(name) is not { } catalogue)
            return $"{path}: the store has no catalogue named '{name}' to replace; import it without --new-version (or name the one to replace with --catalogue NAME)";
        if (options.Seed is { } seed && seed != catalogue.Seed)
            return $"{path}: a new version keeps the catalogue's seed {catalogue.Seed} (the kept evidence was drawn with it); leave out --seed";
        var busy = Busy(catalogue.Id);
        if (busy > 0)
            return $"{path}: {busy} candidates of '{name}' are queued or being screened; stop the workers (or let the run finish) before importing a new version";
        return null;
    }

    private (long Id, long Seed, int Version)? Find(string name)
    {
        using var command = _db.Command("SELECT id, seed, version FROM catalogue WHERE name = @name");
        command.Parameter("@name", name);
        using var reader = command.ExecuteReader();
        if (!reader.Read()) return null;
        return (Convert.ToInt64(reader.GetValue(0), CultureInfo.InvariantCulture), Convert.ToInt64(reader.GetValue(1), CultureInfo.InvariantCulture),
            Convert.ToInt32(reader.GetValue(2), CultureInfo.InvariantCulture));
    }

    private long Busy(long catalogueId, DbTransaction? transaction = null)
    {
        using var command = _db.Command($"""
            SELECT COUNT(*) FROM result r JOIN candidate c ON c.id = r.candidate_id
            WHERE c.catalogue_id = @id AND r.state IN ('{ResultStates.Queued}', '{ResultStates.Screening}')
            """, transaction);
        command.Parameter("@id", catalogueId);
        return Convert.ToInt64(command.ExecuteScalar(), CultureInfo.InvariantCulture);
    }

    /// <summary>Replaces the catalogue by the file's entries: the summary, or why it was refused (nothing changed).</summary>
    public Result<ReimportSummary> Reimport(string path, ImportOptions? options = null)
    {
        options ??= new ImportOptions();
        if (Check(path, options) is { } refusal) return Result<ReimportSummary>.Fail(refusal);
        var name = options.CatalogueName ?? CatalogueImporter.DefaultName(path);
        var (catalogueId, _, version) = Find(name)!.Value;
        var clock = Stopwatch.StartNew();
        var sides = new StoredSides();

        var file = ReadFile(path, options, sides, GrownFamilies(catalogueId));
        if (file.Instances.Count == 0 && file.Rejections.Count == 0)
            return Result<ReimportSummary>.Fail($"{path}: the file has no entries ({file.Lines} lines, all blank, comments or a header); nothing was changed");
        var old = ReadCandidates(catalogueId, options.Limits, sides);

        using var transaction = _db.BeginTransaction();
        if (store.IsPostgreSql)
        {
            // Workers claim with FOR UPDATE SKIP LOCKED: with the catalogue's result rows locked, none can claim them until this commits.
            using var claimLock = _db.Command("""
                SELECT r.candidate_id FROM result r JOIN candidate c ON c.id = r.candidate_id WHERE c.catalogue_id = @id FOR UPDATE OF r
                """, transaction);
            claimLock.Parameter("@id", catalogueId);
            claimLock.ExecuteNonQuery();
        }
        Snapshot(transaction, catalogueId, version, old);
        // Checked again inside the transaction (on SQLite after its first write, which holds the single writer's lock): a
        // worker that claimed since Check keeps the old version whole.
        if (Busy(catalogueId, transaction) is > 0 and var claimed)
            return Result<ReimportSummary>.Fail($"{path}: {claimed} candidates of '{name}' were claimed by a worker meanwhile; nothing was changed");

        var byIdentity = new Dictionary<string, Queue<OldCandidate>>(StringComparer.Ordinal);
        foreach (var o in old)
            if (o.Identity is { } key)
            {
                if (!byIdentity.TryGetValue(key, out var queue)) byIdentity[key] = queue = new Queue<OldCandidate>();
                queue.Enqueue(o);
            }
        var kept = new HashSet<long>();
        int relabelled = 0, added = 0;
        using (var update = _db.Command("""
            UPDATE candidate SET label = @label, family = @family, params = @params, lhs = @lhs, rhs = @rhs, position = @position,
                lhs_column = @lhs_column, rhs_column = @rhs_column
            WHERE id = @id
            """, transaction))
        using (var insert = _db.Command(CatalogueImporter.CandidateInsert, transaction))
        {
            var updateRow = new CandidateParameters(update);
            var id = update.Parameter("@id");
            var insertRow = new CandidateParameters(insert);
            insert.Parameter("@catalogue", catalogueId);
            var field = insert.Parameter("@field");
            foreach (var n in file.Instances)
            {
                if (n.Identity is { } key && byIdentity.TryGetValue(key, out var matches) && matches.Count > 0)
                {
                    var o = matches.Dequeue();
                    kept.Add(o.Id);
                    if (o.Label == n.Label && o.Family == n.Family && o.Params == n.Params && o.Lhs == n.Sides.Lhs && o.Rhs == n.Sides.Rhs && o.Position == n.Position)
                        continue;
                    if (o.Label != n.Label || o.Family != n.Family) relabelled++;
                    updateRow.Set(n);
                    id.Set(o.Id);
                    update.ExecuteNonQuery();
                }
                else
                {
                    insertRow.Set(n);
                    field.Set(n.Field);
                    insert.ExecuteNonQuery();
                    added++;
                }
            }
        }

        // What the file no longer holds goes, with its result, trials and details (foreign keys cascade); its verdict stays in the snapshot.
        var removed = old.Where(o => !kept.Contains(o.Id)).Select(o => o.Id).ToList();
        if (removed.Count > 0)
        {
            using var delete = _db.Command($"DELETE FROM candidate WHERE {store.IdIn("id", "@ids")}", transaction);
            delete.Parameter("@ids", store.IdList(removed));
            delete.ExecuteNonQuery();
        }

        // The open-ended families are the new file's, each with the instances made for it above.
        using (var clearOpen = _db.Command("DELETE FROM open_family WHERE catalogue_id = @id", transaction))
        {
            clearOpen.Parameter("@id", catalogueId);
            clearOpen.ExecuteNonQuery();
        }
        var families = new OpenFamilies(store);
        foreach (var (family, o, made) in file.Open) families.Add(catalogueId, family, o, made, transaction);

        using (var clear = _db.Command("DELETE FROM rejection WHERE catalogue_id = @id", transaction))
        {
            clear.Parameter("@id", catalogueId);
            clear.ExecuteNonQuery();
        }
        using (var reject = _db.Command("""
            INSERT INTO rejection (catalogue_id, source, line, raw, reason) VALUES (@catalogue, @source, @line, @raw, @reason)
            """, transaction))
        {
            reject.Parameter("@catalogue", catalogueId);
            reject.Parameter("@source", path);
            var line = reject.Parameter("@line");
            var raw = reject.Parameter("@raw");
            var reason = reject.Parameter("@reason");
            foreach (var r in file.Rejections)
            {
                line.Set(r.Line);
                raw.Set(r.Raw);
                reason.Set(r.Reason);
                reject.ExecuteNonQuery();
            }
        }
        CatalogueImporter.InsertPendingResults(_db, catalogueId, transaction);
        using (var counts = _db.Command("""
            UPDATE catalogue SET source = @source, version = @version, entries = @entries, instances = @instances, rejections = @rejections
            WHERE id = @id
            """, transaction))
        {
            counts.Parameter("@source", path);
            counts.Parameter("@version", version + 1);
            counts.Parameter("@entries", file.Entries);
            counts.Parameter("@instances", file.Instances.Count);
            counts.Parameter("@rejections", file.Rejections.Count);
            counts.Parameter("@id", catalogueId);
            counts.ExecuteNonQuery();
        }
        transaction.Commit();
        // New or edited instances join the catalogue's equivalence groups (kept rows stay; a group whose representative
        // went has its row removed with it and is grouped afresh).
        if (options.GroupEquivalents && added > 0) new CatalogueGrouping(store).Group(catalogueId, options.Limits, options.GroupingThreads);

        return Result<ReimportSummary>.Ok(new ReimportSummary(catalogueId, name, path, version + 1, file.Lines, file.Entries, file.Instances.Count,
            file.Rejections.Count, kept.Count, relabelled, added, removed.Count, [.. file.Rejections.Take(options.RejectionsListed)], clock.Elapsed)
        {
            Warnings = file.Warnings,
        });
    }

    /// <summary>The columns a new version writes to a candidate row, as parameters of one command.</summary>
    private sealed class CandidateParameters(DbCommand command)
    {
        private readonly DbParameter _label = command.Parameter("@label"), _family = command.Parameter("@family"), _params = command.Parameter("@params"),
            _lhs = command.Parameter("@lhs"), _rhs = command.Parameter("@rhs"), _position = command.Parameter("@position"),
            _lhsColumn = command.Parameter("@lhs_column"), _rhsColumn = command.Parameter("@rhs_column");

        public void Set(NewInstance n)
        {
            _label.Set(n.Label);
            _family.Set(n.Family);
            _params.Set(n.Params);
            _lhs.Set(n.Sides.Lhs);
            _rhs.Set(n.Sides.Rhs);
            _position.Set(n.Position);
            _lhsColumn.Set(n.Sides.LhsColumn);
            _rhsColumn.Set(n.Sides.RhsColumn);
        }
    }

    private sealed record NewInstance(string Label, string? Family, string? Params, CatalogueSides Sides, string Field, int Position, string? Identity);

    private sealed record OldCandidate(long Id, string Label, string? Family, string? Params, string Lhs, string Rhs, string Field, int? Position,
        string State, double? ErrorBoundLog2, int TrialsZero, string? Identity);

    private sealed record FileContents(int Lines, int Entries, List<NewInstance> Instances, List<Rejection> Rejections, IReadOnlyList<string> Warnings,
        List<(string Family, OpenFamily Open, int Made)> Open);

    /// <summary>The file's instances with their canonical identities, and its rejections (the whole file in memory: a new version is compared as a whole).</summary>
    /// <remarks>
    /// An open-ended family gets as many instances as the old version had grown under the same family label and first value
    /// (within the new budget), so that the instances a run already screened keep their evidence; a new or changed one gets
    /// its first chunk, as on a first import.
    /// </remarks>
    private static FileContents ReadFile(string path, ImportOptions options, StoredSides sides, Dictionary<string, (long First, int Made)> grown)
    {
        var reader = new CatalogueReader(path, options.Limits, options.OpenBudget);
        int lines = 0, entries = 0;
        var instances = new List<NewInstance>();
        var open = new List<(string Family, OpenFamily Open, int Made)>();
        var rejections = new List<Rejection>();
        using (var stream = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.Read, 1, FileOptions.SequentialScan))
        {
            foreach (var line in reader.Read(stream))
            {
                lines++;
                if (!line.Read.Success) rejections.Add(new Rejection(path, line.Number, line.Raw, line.Read.Error.ToString()));
                else if (line.Read.Value is { } made)
                {
                    entries++;
                    foreach (var c in made.Instances)
                    {
                        var parameters = made.Family is null ? null : ParamsText.Write(c.Parameters);
                        var field = c.Field ?? made.Field;
                        instances.Add(new NewInstance(c.Label, made.Family, parameters, made.Sides, field, line.Number,
                            Identity(made.Sides.Lhs, made.Sides.Rhs, field, parameters, options.Limits, sides)));
                    }
                    if (made.Open is { } family)
                    {
                        var count = made.Instances.Count;
                        if (grown.TryGetValue(made.Family!, out var before) && before.First == family.First)
                            for (; count < Math.Min(before.Made, family.Budget.Instances); count++)
                            {
                                KeyValuePair<string, BigInteger>[] values = [new(family.Parameter, family.First + count)];
                                var parameters = ParamsText.Write(values);
                                instances.Add(new NewInstance(CatalogueEntry.InstanceLabel(made.Family!, values), made.Family, parameters, made.Sides,
                                    made.Field, line.Number, Identity(made.Sides.Lhs, made.Sides.Rhs, made.Field, parameters, options.Limits, sides)));
                            }
                        open.Add((made.Family!, family, count));
                    }
                }
            }
        }
        return new FileContents(lines, entries, instances, rejections, [.. reader.Warnings], open);
    }

    /// <summary>The open-ended families of the catalogue now: family → (first value, instances made).</summary>
    private Dictionary<string, (long First, int Made)> GrownFamilies(long catalogueId)
    {
        using var command = _db.Command("SELECT family, first_value, made FROM open_family WHERE catalogue_id = @id");
        command.Parameter("@id", catalogueId);
        using var reader = command.ExecuteReader();
        var grown = new Dictionary<string, (long, int)>(StringComparer.Ordinal);
        while (reader.Read())
            grown[reader.GetString(0)] = (Convert.ToInt64(reader.GetValue(1), CultureInfo.InvariantCulture), Convert.ToInt32(reader.GetValue(2), CultureInfo.InvariantCulture));
        return grown;
    }

    private List<OldCandidate> ReadCandidates(long catalogueId, Limits limits, StoredSides sides)
    {
        using var command = _db.Command($"""
            SELECT c.id, c.label, c.family, c.params, c.lhs, c.rhs, c.field, c.position,
                COALESCE(r.state, '{ResultStates.Pending}'), r.error_bound_log2, COALESCE(r.trials_zero, 0)
            FROM candidate c LEFT JOIN result r ON r.candidate_id = c.id
            WHERE c.catalogue_id = @id ORDER BY c.id
            """);
        command.Parameter("@id", catalogueId);
        using var reader = command.ExecuteReader();
        var rows = new List<OldCandidate>();
        while (reader.Read())
        {
            var (lhs, rhs, field, parameters) = (reader.GetString(4), reader.GetString(5), reader.GetString(6), reader.NullableString(3));
            rows.Add(new OldCandidate(Convert.ToInt64(reader.GetValue(0), CultureInfo.InvariantCulture), reader.GetString(1), reader.NullableString(2),
                parameters, lhs, rhs, field, reader.IsDBNull(7) ? null : Convert.ToInt32(reader.GetValue(7), CultureInfo.InvariantCulture),
                reader.GetString(8), reader.NullableDouble(9), Convert.ToInt32(reader.GetValue(10), CultureInfo.InvariantCulture),
                Identity(lhs, rhs, field, parameters, limits, sides)));
        }
        return rows;
    }

    private void Snapshot(DbTransaction transaction, long catalogueId, int version, List<OldCandidate> old)
    {
        using var insert = _db.Command("""
            INSERT INTO catalogue_version_entry (catalogue_id, version, candidate_id, label, family, params, lhs, rhs, field, identity, state, error_bound_log2, trials_zero)
            VALUES (@catalogue, @version, @candidate, @label, @family, @params, @lhs, @rhs, @field, @identity, @state, @error, @trials)
            """, transaction);
        insert.Parameter("@catalogue", catalogueId);
        insert.Parameter("@version", version);
        var (candidate, label, family, parameters, lhs, rhs, field, identity, state, error, trials) = (insert.Parameter("@candidate"),
            insert.Parameter("@label"), insert.Parameter("@family"), insert.Parameter("@params"), insert.Parameter("@lhs"), insert.Parameter("@rhs"),
            insert.Parameter("@field"), insert.Parameter("@identity"), insert.Parameter("@state"), insert.Parameter("@error"), insert.Parameter("@trials"));
        foreach (var o in old)
        {
            candidate.Set(o.Id);
            label.Set(o.Label);
            family.Set(o.Family);
            parameters.Set(o.Params);
            lhs.Set(o.Lhs);
            rhs.Set(o.Rhs);
            field.Set(o.Field);
            identity.Set(o.Identity);
            state.Set(o.State);
            error.Set(Sql.Real(o.ErrorBoundLog2));
            trials.Set(o.TrialsZero);
            insert.ExecuteNonQuery();
        }
    }

    /// <summary>
    /// The canonical identity of stored (or to-be-stored) sides, field and parameters (<see cref="CandidateKey.Canonical"/>,
    /// the text the trials' key is a hash of), or null when they do not parse (such a row never matches).
    /// </summary>
    internal static string? Identity(string lhs, string rhs, string field, string? parameters, Limits limits, StoredSides? sides = null)
    {
        var candidate = new StoredCandidate(0, 0, "", "", null, parameters, lhs, rhs, field, null, 0, 64);
        var bound = candidate.Bind(limits, sides);
        return bound.Success ? CandidateKey.Canonical(bound.Entry, bound.Parameters) : null;
    }
}
