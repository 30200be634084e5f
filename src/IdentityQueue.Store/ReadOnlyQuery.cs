using System.Data.Common;
using Microsoft.Data.Sqlite;
using Npgsql;

namespace IdentityQueue.Store;

/// <summary>A query's columns and rows, values as the database returned them (null for SQL NULL). Immutable.</summary>
public sealed record QueryResult(IReadOnlyList<string> Columns, IReadOnlyList<object?[]> Rows);

/// <summary>
/// Runs user SQL against a store on a read-only connection, so that no statement can change it: a SQLite file opened
/// read-only, or a PostgreSQL transaction begun READ ONLY (PostgreSQL refuses any write in it). Stateless.
/// </summary>
public static class ReadOnlyQuery
{
    public static QueryResult Run(string path, string sql, int maxRows = 1_000_000) => Run(StoreLocation.Sqlite(path), sql, maxRows);

    public static QueryResult Run(StoreLocation location, string sql, int maxRows = 1_000_000)
    {
        if (location.IsPostgreSql)
        {
            using var store = StoreConnection.OpenPostgreSql(location.Target);
            using var transaction = (NpgsqlTransaction)store.Connection.BeginTransaction();
            using (var readOnly = store.Connection.CreateCommand())
            {
                readOnly.Transaction = transaction;
                readOnly.CommandText = "SET TRANSACTION READ ONLY";
                readOnly.ExecuteNonQuery();
            }
            var result = Read(store.Connection, transaction, sql, maxRows);
            transaction.Rollback();
            return result;
        }
        var path = location.Target;
        if (!File.Exists(path)) throw new StoreUnavailableException($"there is no store at '{path}': run 'idq init --db {path}' first");
        var builder = new SqliteConnectionStringBuilder { DataSource = path, Mode = SqliteOpenMode.ReadOnly, Pooling = false };
        using var connection = new SqliteConnection(builder.ToString());
        connection.Open();
        return Read(connection, null, sql, maxRows);
    }

    /// <summary>
    /// Whether a database error is the store refusing a write on the read-only connection: SQLite's SQLITE_READONLY (8)
    /// or PostgreSQL's read_only_sql_transaction (25006).
    /// </summary>
    public static bool IsReadOnlyRefusal(DbException e) => e is SqliteException { SqliteErrorCode: 8 } || e.SqlState == "25006";

    private static QueryResult Read(DbConnection connection, DbTransaction? transaction, string sql, int maxRows)
    {
        using var command = connection.CreateCommand();
        command.Transaction = transaction;
        command.CommandText = sql;
        using var reader = command.ExecuteReader();
        var columns = Enumerable.Range(0, reader.FieldCount).Select(reader.GetName).ToList();
        var rows = new List<object?[]>();
        while (reader.Read() && rows.Count < maxRows)
        {
            var row = new object?[reader.FieldCount];
            for (var i = 0; i < row.Length; i++) row[i] = reader.IsDBNull(i) ? null : Normalize(reader.GetValue(i));
            rows.Add(row);
        }
        return new QueryResult(columns, rows);
    }

    /// <summary>
    /// Values as SQLite gives them, whichever store answered, so that a query prints the same on both: integers as long
    /// (PostgreSQL's integer, smallint, and integral numeric such as SUM(bigint)), booleans as 1/0, timestamps as UTC text
    /// 'YYYY-MM-DD HH:MM:SS' (SQLite's CURRENT_TIMESTAMP format).
    /// </summary>
    internal static object Normalize(object value) => value switch
    {
        int i => (long)i,
        short h => (long)h,
        bool b => b ? 1L : 0L,
        decimal m when m == decimal.Truncate(m) && m >= long.MinValue && m <= long.MaxValue => (long)m,
        decimal m => (double)m,
        float f => (double)f,
        DateTime t => (t.Kind == DateTimeKind.Local ? t.ToUniversalTime() : t).ToString("yyyy-MM-dd HH:mm:ss", System.Globalization.CultureInfo.InvariantCulture),
        DateTimeOffset o => o.UtcDateTime.ToString("yyyy-MM-dd HH:mm:ss", System.Globalization.CultureInfo.InvariantCulture),
        _ => value,
    };
}
