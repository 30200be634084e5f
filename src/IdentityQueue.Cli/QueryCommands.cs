using System.CommandLine;
using System.Globalization;
using System.Text.Json;
using IdentityQueue.Store;
using IdentityQueue.Store.Read;
using IdentityQueue.Store.Schema;
using IdentityQueue.Store.Work;
using IdentityQueue.Worker;

namespace IdentityQueue.Cli;

/// <summary><c>idq sql</c> and <c>idq status</c>: plain SQL over the store's public tables and views.</summary>
internal static class QueryCommands
{
    public static Command Sql(TextWriter output, TextWriter error)
    {
        var query = new Argument<string>("query") { Description = "A read-only SQL query, e.g. \"select label, error_bound_log2 from survivors\"." };
        var db = new StoreOptions();
        var csv = new Option<bool>("--csv") { Description = "Print CSV instead of a table." };
        var json = new Option<bool>("--json") { Description = "Print a JSON array of objects instead of a table." };
        var command = new Command("sql", "Run a read-only SQL query against the store and print the rows. It never changes the store:\n" +
            "to add candidates, import a file (idq import FILE) or insert rows with a SQLite client (sqlite3 STORE.db \"INSERT ...\")\n" +
            "or psql; the next idq run screens them (README, SQL cookbook).\n\n" +
            "Examples:\n  idq sql \"select * from survivors\"\n  idq sql \"select family, first_refuted from families where refuted > 0\" --csv\n" +
            "  idq sql \"select label, witness_modulus, witness_point from verdicts where state = 'refuted'\" --json")
        { query, csv, json };
        db.AddTo(command);
        command.SetAction(parse =>
        {
            if (db.Conflict(parse) is { } conflict)
            {
                error.WriteLine($"idq sql: {conflict}");
                return ExitCodes.BadInput;
            }
            QueryResult result;
            var sql = parse.GetValue(query)!;
            var location = db.Location(parse);
            if (WriteKeyword(sql) is { } keyword)
            {
                error.WriteLine($"idq sql: {ReadOnlyMessage(keyword, location)}");
                return ExitCodes.BadInput;
            }
            try
            {
                result = ReadOnlyQuery.Run(location, sql);
            }
            catch (System.Data.Common.DbException e) when (ReadOnlyQuery.IsReadOnlyRefusal(e))
            {
                error.WriteLine($"idq sql: {ReadOnlyMessage(null, location)} ({e.Message})");
                return ExitCodes.BadInput;
            }
            catch (System.Data.Common.DbException e)
            {
                error.WriteLine($"idq sql: {e.Message}");
                return ExitCodes.BadInput;
            }
            catch (StoreUnavailableException e)
            {
                error.WriteLine($"idq sql: {e.Message}");
                return ExitCodes.BadInput;
            }
            if (parse.GetValue(json)) WriteJson(output, result);
            else if (parse.GetValue(csv)) WriteCsv(output, result);
            else WriteTable(output, result);
            return ExitCodes.Success;
        });
        return command;
    }

    private static readonly string[] WriteKeywords =
        ["INSERT", "UPDATE", "DELETE", "REPLACE", "UPSERT", "MERGE", "CREATE", "DROP", "ALTER", "TRUNCATE", "VACUUM", "REINDEX", "ATTACH", "DETACH", "GRANT", "REVOKE"];

    /// <summary>The first word of the statement (after spaces and comments) when it is one that writes, else null.</summary>
    internal static string? WriteKeyword(string sql)
    {
        var i = 0;
        while (i < sql.Length)
        {
            if (char.IsWhiteSpace(sql[i])) i++;
            else if (sql.AsSpan(i).StartsWith("--", StringComparison.Ordinal)) { var end = sql.IndexOf('\n', i); i = end < 0 ? sql.Length : end + 1; }
            else if (sql.AsSpan(i).StartsWith("/*", StringComparison.Ordinal)) { var end = sql.IndexOf("*/", i + 2, StringComparison.Ordinal); i = end < 0 ? sql.Length : end + 2; }
            else break;
        }
        var start = i;
        while (i < sql.Length && char.IsAsciiLetter(sql[i])) i++;
        var word = sql[start..i].ToUpperInvariant();
        return WriteKeywords.Contains(word) ? word : null;
    }

    /// <summary>What to say to a statement that would write: idq sql is read-only, and how rows are added instead.</summary>
    internal static string ReadOnlyMessage(string? keyword, StoreLocation location)
    {
        var client = location.IsPostgreSql
            ? $"psql \"{location.Display}\""
            : $"sqlite3 {(location.Target.Contains(' ', StringComparison.Ordinal) ? $"\"{location.Target}\"" : location.Target)}";
        return $"idq sql is read-only{(keyword is null ? "" : $" and does not run {keyword}")}: it answers queries (SELECT, WITH) and never changes the store. " +
            "To add candidates, import a catalogue file (idq import FILE), or insert rows with a database client, e.g. " +
            $"{client} \"INSERT INTO candidate (catalogue_id, label, lhs, rhs) VALUES (1, 'my-guess', '(x+1)^3', 'x^3 + 3*x^2 + 3*x + 1')\" " +
            "(catalogue ids: idq sql \"SELECT id, name FROM catalogue\"); the next idq run screens the new rows";
    }

    internal static string Text(object? value) => value switch
    {
        null => "",
        double d => d.ToString("R", CultureInfo.InvariantCulture),
        IFormattable f => f.ToString(null, CultureInfo.InvariantCulture),
        _ => value.ToString() ?? "",
    };

    /// <summary>One column value as a JSON property: null, a number, or text.</summary>
    internal static void WriteValue(Utf8JsonWriter w, string name, object? value)
    {
        switch (value)
        {
            case null: w.WriteNull(name); break;
            case long l: w.WriteNumber(name, l); break;
            case double d: w.WriteNumber(name, d); break;
            default: w.WriteString(name, Text(value)); break;
        }
    }

    internal static void WriteTable(TextWriter output, QueryResult result, int maxWidth = 60)
    {
        var cells = result.Rows.Select(r => r.Select(v => Clip(Text(v), maxWidth)).ToArray()).ToList();
        var widths = result.Columns.Select((c, i) => Math.Max(c.Length, cells.Count == 0 ? 0 : cells.Max(r => r[i].Length))).ToArray();
        output.WriteLine(string.Join("  ", result.Columns.Select((c, i) => c.PadRight(widths[i]))).TrimEnd());
        output.WriteLine(string.Join("  ", widths.Select(w => new string('-', w))));
        foreach (var row in cells) output.WriteLine(string.Join("  ", row.Select((v, i) => v.PadRight(widths[i]))).TrimEnd());
        output.WriteLine($"({result.Rows.Count} row{(result.Rows.Count == 1 ? "" : "s")})");
    }

    private static string Clip(string s, int width)
    {
        s = s.Replace('\n', ' ');
        return s.Length <= width ? s : s[..(width - 1)] + "…";
    }

    internal static void WriteCsv(TextWriter output, QueryResult result)
    {
        using var csv = CsvHelper.CsvWriter.Create(output, new CsvHelper.CsvWriterOptions(), true);
        csv.WriteRecord([.. result.Columns]);
        foreach (var row in result.Rows) csv.WriteRecord(row.Select(Text).ToArray());
    }

    private static void WriteJson(TextWriter output, QueryResult result)
    {
        using var stream = new MemoryStream();
        using (var w = new Utf8JsonWriter(stream, new JsonWriterOptions { Indented = true }))
        {
            w.WriteStartArray();
            foreach (var row in result.Rows)
            {
                w.WriteStartObject();
                for (var i = 0; i < row.Length; i++) WriteValue(w, result.Columns[i], row[i]);
                w.WriteEndObject();
            }
            w.WriteEndArray();
        }
        output.WriteLine(System.Text.Encoding.UTF8.GetString(stream.ToArray()));
    }

    public static Command Status(TextWriter output, TextWriter error)
    {
        var db = new StoreOptions();
        var json = new Option<bool>("--json") { Description = "Print JSON." };
        var command = new Command("status", "Counts per state per catalogue, throughput over the last minute, and an ETA.\n\nExamples:\n  idq status\n  idq status --db night.db --json") { json };
        db.AddTo(command);
        command.SetAction(parse =>
        {
            using var store = db.OpenCurrent(parse, "status", error);
            if (store is null) return ExitCodes.BadInput;
            try
            {
                var counts = StatusCounts.Read(store);
                // "alive" in the listing: a heartbeat within three beats; recovery waits longer (DeadAfter) before it takes work back.
                var workers = new WorkerRegistry(store).List(3 * new WorkerSettings().HeartbeatInterval);
                var rate = counts.SettledLastMinute / 60.0;
                var byCatalogue = counts.ByCatalogue();
                var open = counts.Open;
                var eta = rate > 0 && open > 0 ? TimeSpan.FromSeconds(open / rate) : (TimeSpan?)null;
                var openFamilies = OpenFamilySummary.Read(store);
                if (parse.GetValue(json)) WriteStatusJson(output, byCatalogue, rate, open, eta, workers, openFamilies);
                else
                {
                    var rows = byCatalogue.Select(c => new object?[] { c.Catalogue }
                        .Concat(ResultStates.Values.Select(s => (object?)(c.States.TryGetValue(s, out var n) ? n : 0))).ToArray()).ToList();
                    WriteTable(output, new QueryResult(["catalogue", .. ResultStates.All], rows));
                    output.WriteLine($"throughput {rate * 60:F0} candidates settled in the last minute; {open} open" + (eta is { } e ? $", ETA {e:hh\\:mm\\:ss}" : ""));
                    foreach (var f in openFamilies) output.WriteLine($"open-ended family {f.Family} ({f.Catalogue}): {f.Describe()}");
                    WriteWorkers(output, workers);
                }
                return ExitCodes.Success;
            }
            catch (StoreUnavailableException e)
            {
                error.WriteLine($"idq status: {e.Message}");
                return ExitCodes.BadInput;
            }
        });
        return command;
    }

    /// <summary>The worker processes that have not signed off: live ones, and silent ones (presumed dead) so that they are noticed.</summary>
    private static void WriteWorkers(TextWriter output, IReadOnlyList<WorkerInfo> workers)
    {
        if (workers.Count == 0)
        {
            output.WriteLine("no worker is running");
            return;
        }
        output.WriteLine();
        var now = DateTime.UtcNow;
        WriteTable(output, new QueryResult(["worker", "host", "pid", "threads", "chunks done", "candidates done", "last heartbeat", "state", "longest on"],
            workers.Select(w => new object?[]
            {
                w.Name, w.Host, w.Pid, w.Threads, w.ChunksDone, w.CandidatesDone,
                $"{Math.Max(0, (now - AsUtc(w.HeartbeatAt)).TotalSeconds):F0} s ago", w.Live ? "alive" : "silent (presumed dead)",
                LongestOn(w, now),
            }).ToList()));
    }

    /// <summary>"#42 perm30 for 95 s": the candidate a live worker has been on the longest, as of its last heartbeat; "-" when idle.</summary>
    private static string LongestOn(WorkerInfo w, DateTime now) =>
        w.Live && w.CurrentCandidateId is long id && w.CurrentSince is DateTime since
            ? $"#{id} {w.CurrentLabel} for {Math.Max(0, (now - AsUtc(since)).TotalSeconds):F0} s"
            : "-";

    /// <summary>SQLite gives back its UTC text timestamps as unspecified-kind values; PostgreSQL as UTC or local.</summary>
    private static DateTime AsUtc(DateTime t) => t.Kind switch
    {
        DateTimeKind.Utc => t,
        DateTimeKind.Local => t.ToUniversalTime(),
        _ => DateTime.SpecifyKind(t, DateTimeKind.Utc),
    };

    private static void WriteStatusJson(TextWriter output, IReadOnlyList<(string Catalogue, IReadOnlyDictionary<ResultState, long> States)> byCatalogue,
        double rate, long open, TimeSpan? eta,
        IReadOnlyList<WorkerInfo> workers, IReadOnlyList<OpenFamilySummary> openFamilies)
    {
        using var stream = new MemoryStream();
        using (var w = new Utf8JsonWriter(stream, new JsonWriterOptions { Indented = true }))
        {
            w.WriteStartObject();
            w.WriteStartObject("catalogues");
            foreach (var (name, states) in byCatalogue)
            {
                w.WriteStartObject(name);
                foreach (var (state, n) in states) w.WriteNumber(state.Text(), n);
                w.WriteEndObject();
            }
            w.WriteEndObject();
            w.WriteStartObject("total");
            foreach (var g in byCatalogue.SelectMany(c => c.States).GroupBy(kv => kv.Key)) w.WriteNumber(g.Key.Text(), g.Sum(kv => kv.Value));
            w.WriteEndObject();
            w.WriteNumber("open", open);
            w.WriteNumber("settledPerSecond", Math.Round(rate, 3));
            if (eta is { } e) w.WriteNumber("etaSeconds", Math.Round(e.TotalSeconds)); else w.WriteNull("etaSeconds");
            w.WriteStartArray("workers");
            foreach (var worker in workers)
            {
                w.WriteStartObject();
                w.WriteString("name", worker.Name);
                w.WriteString("host", worker.Host);
                w.WriteNumber("pid", worker.Pid);
                w.WriteNumber("threads", worker.Threads);
                w.WriteNumber("chunksDone", worker.ChunksDone);
                w.WriteNumber("candidatesDone", worker.CandidatesDone);
                w.WriteString("lastHeartbeat", AsUtc(worker.HeartbeatAt).ToString("O", CultureInfo.InvariantCulture));
                w.WriteBoolean("alive", worker.Live);
                if (worker.Live && worker.CurrentCandidateId is long id && worker.CurrentSince is DateTime since)
                {
                    w.WriteStartObject("longestOn");
                    w.WriteNumber("candidateId", id);
                    if (worker.CurrentLabel is { } label) w.WriteString("label", label); else w.WriteNull("label");
                    w.WriteNumber("seconds", Math.Round(Math.Max(0, (DateTime.UtcNow - AsUtc(since)).TotalSeconds)));
                    w.WriteEndObject();
                }
                else w.WriteNull("longestOn");
                w.WriteEndObject();
            }
            w.WriteEndArray();
            // Open-ended families (for n >= A): how far each holds and why it stopped (null while it can still grow).
            w.WriteStartArray("openFamilies");
            foreach (var f in openFamilies)
            {
                w.WriteStartObject();
                w.WriteString("catalogue", f.Catalogue);
                w.WriteString("family", f.Family);
                w.WriteNumber("instances", f.Instances);
                w.WriteNumber("budget", f.Budget);
                if (f.HoldsFor is { } holds) w.WriteString("holdsFor", holds); else w.WriteNull("holdsFor");
                if (f.FailsFor is { } fails) w.WriteString("failsFor", fails); else w.WriteNull("failsFor");
                if (f.Stop is { } stop) w.WriteString("stopped", stop); else w.WriteNull("stopped");
                w.WriteEndObject();
            }
            w.WriteEndArray();
            w.WriteEndObject();
        }
        output.WriteLine(System.Text.Encoding.UTF8.GetString(stream.ToArray()));
    }
}
