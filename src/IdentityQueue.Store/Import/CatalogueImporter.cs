using System.Data.Common;
using System.Diagnostics;
using System.Globalization;
using IdentityQueue.Algebra;
using IdentityQueue.Screening;
using IdentityQueue.Screening.Catalogues;
using IdentityQueue.Store.Schema;
using IdentityQueue.Store.Work;

namespace IdentityQueue.Store.Import;

/// <summary>
/// Loads a catalogue file (<c>.idq</c>, <c>.jsonl</c>, <c>.csv</c>) into the store as one <c>catalogue</c> row, a
/// <c>candidate</c> row per identity (one per instance of a family line) with a pending <c>result</c>, and a
/// <c>rejection</c> row per entry that cannot be imported — a bad entry never stops the import. The file is streamed:
/// one line in memory at a time, rows written by prepared commands in transactions of <see cref="ImportOptions.BatchSize"/>.
/// A catalogue name already in the store is refused, so importing the same file twice does not double it. An open-ended
/// family (<c>for n &gt;= A</c>) gets its first chunk here and an <c>open_family</c> row; workers grow it (<see cref="OpenFamilies"/>).
/// Uses the connection it is given; not thread-safe.
/// </summary>
public sealed class CatalogueImporter(StoreConnection store)
{
    public static readonly IReadOnlyList<string> Extensions = CatalogueReader.Extensions;

    private readonly DbConnection _db = store.Connection;

    /// <summary>The catalogue name a file gets without <c>--catalogue</c>: its file name without the extension.</summary>
    public static string DefaultName(string path) => Path.GetFileNameWithoutExtension(path);

    /// <summary>Why importing <paramref name="path"/> would be refused (no such file, unknown format, the name is taken), or null.</summary>
    public string? Check(string path, ImportOptions? options = null)
    {
        options ??= new ImportOptions();
        if (CheckFile(path, options) is { } refusal) return refusal;
        var name = options.CatalogueName ?? DefaultName(path);
        if (NameTaken(name))
            return $"{path}: the store already has a catalogue named '{name}'; import it under another name with --catalogue NAME";
        return null;
    }

    /// <summary>Why <paramref name="path"/> cannot be read as a catalogue at all (no such file, unknown format, not text, no name, a bad seed), or null.</summary>
    internal static string? CheckFile(string path, ImportOptions options)
    {
        if (!File.Exists(path)) return $"{path}: no such file";
        var extension = Path.GetExtension(path).ToLowerInvariant();
        if (!Extensions.Contains(extension))
            return $"{path}: unknown catalogue format '{extension}' (the formats are {string.Join(", ", Extensions)})";
        if (options.Seed is < 0) return $"the seed must be between 0 and 2^63 - 1, got {options.Seed}";
        if (NotText(path) is { } notText) return $"{path}: {notText}; nothing was imported";
        var name = options.CatalogueName ?? DefaultName(path);
        if (string.IsNullOrWhiteSpace(name)) return $"{path}: the catalogue name is empty; give one with --catalogue NAME";
        return null;
    }

    /// <summary>Why the file cannot be a catalogue from its first bytes: it is empty, or holds NUL bytes (binary, or UTF-16 text); else null.</summary>
    private static string? NotText(string path)
    {
        using var stream = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.Read);
        if (stream.Length == 0) return "the file is empty";
        var head = new byte[8192];
        var count = stream.ReadAtLeast(head, head.Length, throwOnEndOfStream: false);
        var nul = Array.IndexOf(head, (byte)0, 0, count);
        if (nul < 0) return null;
        var utf16 = count >= 2 && (head[0], head[1]) is (0xFF, 0xFE) or (0xFE, 0xFF);
        return utf16
            ? "the file is UTF-16 text; a catalogue is UTF-8 text (convert it, e.g. iconv -f UTF-16 -t UTF-8)"
            : $"the file is not text (byte {nul + 1} is NUL); a catalogue is UTF-8 text, one entry per line";
    }

    private bool NameTaken(string name)
    {
        using var command = _db.Command("SELECT COUNT(*) FROM catalogue WHERE name = @name");
        command.Parameter("@name", name);
        return Convert.ToInt64(command.ExecuteScalar(), CultureInfo.InvariantCulture) > 0;
    }

    /// <summary>Imports one file: its summary, or why it was refused (nothing stored) for the reasons of <see cref="Check"/>.</summary>
    public Result<ImportSummary> Import(string path, ImportOptions? options = null)
    {
        options ??= new ImportOptions();
        if (Check(path, options) is { } refusal) return Result<ImportSummary>.Fail(refusal);
        var name = options.CatalogueName ?? DefaultName(path);
        var seed = options.Seed ?? RunSeed.Random().Stored;
        var clock = Stopwatch.StartNew();

        long catalogueId;
        try
        {
            using var insert = _db.Command("INSERT INTO catalogue (name, source, seed) VALUES (@name, @source, @seed) RETURNING id");
            insert.Parameter("@name", name);
            insert.Parameter("@source", path);
            insert.Parameter("@seed", seed);
            catalogueId = Convert.ToInt64(insert.ExecuteScalar(), CultureInfo.InvariantCulture);
        }
        catch (DbException) when (NameTaken(name))
        {
            // The unique index on catalogue.name: another import took the name between the check and this insert.
            return Result<ImportSummary>.Fail($"{path}: the store already has a catalogue named '{name}'; import it under another name with --catalogue NAME");
        }

        try
        {
            var summary = Load(path, catalogueId, name, seed, options, clock);
            if (summary.Entries > 0 || summary.Rejections > 0) return Result<ImportSummary>.Ok(WithGroups(summary, options, clock));
            // Only blank lines, comments or a CSV header: no catalogue is left behind for it.
            using var delete = _db.Command("DELETE FROM catalogue WHERE id = @id");
            delete.Parameter("@id", catalogueId);
            delete.ExecuteNonQuery();
            return Result<ImportSummary>.Fail($"{path}: the file has no entries ({summary.Lines} lines, all blank, comments or a header); nothing was imported");
        }
        catch
        {
            // Leave no half catalogue behind (its candidates and rejections go with it: foreign keys cascade).
            using var delete = _db.Command("DELETE FROM catalogue WHERE id = @id");
            delete.Parameter("@id", catalogueId);
            delete.ExecuteNonQuery();
            throw;
        }
    }

    /// <summary>The equivalence groups of the new catalogue (#15 point 4, <see cref="CatalogueGrouping"/>), unless <see cref="ImportOptions.GroupEquivalents"/> is off.</summary>
    private ImportSummary WithGroups(ImportSummary summary, ImportOptions options, Stopwatch clock)
    {
        if (!options.GroupEquivalents || summary.Instances == 0) return summary;
        var grouping = new CatalogueGrouping(store).Group(summary.CatalogueId, options.Limits, options.GroupingThreads);
        return summary with { Grouping = grouping, Elapsed = clock.Elapsed };
    }

    /// <summary>The insert of one catalogue candidate, its values as parameters (<c>@catalogue</c>, <c>@label</c>, …); the re-import uses it too.</summary>
    internal const string CandidateInsert = """
        INSERT INTO candidate (catalogue_id, label, family, params, lhs, rhs, field, position, lhs_column, rhs_column)
        VALUES (@catalogue, @label, @family, @params, @lhs, @rhs, @field, @position, @lhs_column, @rhs_column)
        """;

    /// <summary>Gives every candidate of the catalogue that has no result row a pending one (after an import or a new version).</summary>
    internal static void InsertPendingResults(DbConnection db, long catalogueId, DbTransaction transaction)
    {
        using var results = db.Command($"""
            INSERT INTO result (candidate_id, state)
            SELECT c.id, '{ResultStates.Pending}' FROM candidate c
            WHERE c.catalogue_id = @id AND NOT EXISTS (SELECT 1 FROM result r WHERE r.candidate_id = c.id)
            ON CONFLICT (candidate_id) DO NOTHING
            """, transaction);
        results.Parameter("@id", catalogueId);
        results.ExecuteNonQuery();
    }

    private ImportSummary Load(string path, long catalogueId, string name, long seed, ImportOptions options, Stopwatch clock)
    {
        var reader = new CatalogueReader(path, options.Limits, options.OpenBudget);
        var open = new List<(string Family, OpenFamily Open, int Made)>();
        using var rows = new Rows(_db, catalogueId, path);
        int lines = 0, entries = 0, instances = 0, rejections = 0;
        var first = new List<Rejection>();
        using (var stream = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.Read, 1, FileOptions.SequentialScan))
        {
            foreach (var line in reader.Read(stream))
            {
                lines++;
                if (!line.Read.Success)
                {
                    var reason = line.Read.Error.ToString();
                    rows.Rejection(line.Number, line.Raw, reason);
                    rejections++;
                    if (first.Count < options.RejectionsListed) first.Add(new Rejection(path, line.Number, line.Raw, reason));
                }
                else if (line.Read.Value is { } made)
                {
                    entries++;
                    if (made.Open is { } family) open.Add((made.Family!, family, made.Instances.Count));
                    foreach (var c in made.Instances)
                    {
                        rows.Candidate(c.Label, made.Family, made.Family is null ? null : ParamsText.Write(c.Parameters),
                            made.Sides, c.Field ?? made.Field, line.Number);
                        instances++;
                    }
                }
                if (rows.Pending >= options.BatchSize) rows.Commit();
            }
        }
        rows.Finish();

        using var finish = _db.BeginTransaction();
        InsertPendingResults(_db, catalogueId, finish);
        // An open-ended family is recorded with its first chunk, in the transaction that makes the chunk's results pending.
        var families = new OpenFamilies(store);
        foreach (var (family, o, count) in open) families.Add(catalogueId, family, o, count, finish);
        using (var counts = _db.Command("UPDATE catalogue SET entries = @entries, instances = @instances, rejections = @rejections WHERE id = @id", finish))
        {
            counts.Parameter("@entries", entries);
            counts.Parameter("@instances", instances);
            counts.Parameter("@rejections", rejections);
            counts.Parameter("@id", catalogueId);
            counts.ExecuteNonQuery();
        }
        finish.Commit();
        return new ImportSummary(catalogueId, name, path, seed, lines, entries, instances, rejections, first, clock.Elapsed)
        {
            Warnings = reader.Warnings.ToList(),
        };
    }

    /// <summary>The prepared inserts of one import and its open transaction, committed every batch.</summary>
    private sealed class Rows : IDisposable
    {
        private readonly DbConnection _db;
        private readonly DbCommand _candidate, _rejection;
        private readonly DbParameter _label, _family, _params, _lhs, _rhs, _field, _position, _lhsColumn, _rhsColumn, _line, _raw, _reason;
        private DbTransaction _transaction;
        private bool _finished;

        public Rows(DbConnection db, long catalogueId, string source)
        {
            _db = db;
            _transaction = db.BeginTransaction();
            _candidate = db.Command(CandidateInsert, _transaction);
            _candidate.Parameter("@catalogue", catalogueId);
            _label = _candidate.Parameter("@label");
            _family = _candidate.Parameter("@family");
            _params = _candidate.Parameter("@params");
            _lhs = _candidate.Parameter("@lhs");
            _rhs = _candidate.Parameter("@rhs");
            _field = _candidate.Parameter("@field");
            _position = _candidate.Parameter("@position");
            _lhsColumn = _candidate.Parameter("@lhs_column");
            _rhsColumn = _candidate.Parameter("@rhs_column");
            _rejection = db.Command("""
                INSERT INTO rejection (catalogue_id, source, line, raw, reason)
                VALUES (@catalogue, @source, @line, @raw, @reason)
                """, _transaction);
            _rejection.Parameter("@catalogue", catalogueId);
            _rejection.Parameter("@source", source);
            _line = _rejection.Parameter("@line");
            _raw = _rejection.Parameter("@raw");
            _reason = _rejection.Parameter("@reason");
            _candidate.Prepare();
            _rejection.Prepare();
        }

        /// <summary>Rows written since the last commit.</summary>
        public int Pending { get; private set; }

        public void Candidate(string label, string? family, string? parameters, CatalogueSides sides, string field, int position)
        {
            var (lhs, rhs, lhsColumn, rhsColumn) = sides;
            _label.Set(label);
            _family.Set(family);
            _params.Set(parameters);
            _lhs.Set(lhs);
            _rhs.Set(rhs);
            _field.Set(field);
            _position.Set(position);
            _lhsColumn.Set(lhsColumn);
            _rhsColumn.Set(rhsColumn);
            _candidate.ExecuteNonQuery();
            Pending++;
        }

        public void Rejection(int line, string raw, string reason)
        {
            _line.Set(line);
            _raw.Set(raw);
            _reason.Set(reason);
            _rejection.ExecuteNonQuery();
            Pending++;
        }

        /// <summary>Commits the batch. If the process dies before this, the batch is lost with the catalogue row kept: see the README.</summary>
        public void Commit()
        {
            _transaction.Commit();
            _transaction.Dispose();
            _transaction = _db.BeginTransaction();
            _candidate.Transaction = _transaction;
            _rejection.Transaction = _transaction;
            Pending = 0;
        }

        /// <summary>Commits the last batch and ends the transactions.</summary>
        public void Finish()
        {
            _transaction.Commit();
            _transaction.Dispose();
            _finished = true;
        }

        /// <summary>Rolls back an unfinished batch (after an exception) and releases the commands.</summary>
        public void Dispose()
        {
            if (!_finished) _transaction.Dispose();
            _candidate.Dispose();
            _rejection.Dispose();
        }
    }
}
