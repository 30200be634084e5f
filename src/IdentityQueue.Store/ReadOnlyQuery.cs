using Microsoft.Data.Sqlite;

namespace IdentityQueue.Store;

/// <summary>A query's columns and rows, values as the database returned them (null for SQL NULL). Immutable.</summary>
public sealed record QueryResult(IReadOnlyList<string> Columns, IReadOnlyList<object?[]> Rows);

/// <summary>
/// Runs user SQL against a store on a read-only connection (the file is opened read-only, so no statement can change it).
/// Stateless.
/// </summary>
public static class ReadOnlyQuery
{
    public static QueryResult Run(string path, string sql, int maxRows = 1_000_000)
    {
        if (!File.Exists(path)) throw new StoreUnavailableException($"there is no store at '{path}': run 'idq init --db {path}' first");
        var builder = new SqliteConnectionStringBuilder { DataSource = path, Mode = SqliteOpenMode.ReadOnly, Pooling = false };
        using var connection = new SqliteConnection(builder.ToString());
        connection.Open();
        using var command = connection.CreateCommand();
        command.CommandText = sql;
        using var reader = command.ExecuteReader();
        var columns = Enumerable.Range(0, reader.FieldCount).Select(reader.GetName).ToList();
        var rows = new List<object?[]>();
        while (reader.Read() && rows.Count < maxRows)
        {
            var row = new object?[reader.FieldCount];
            for (var i = 0; i < row.Length; i++) row[i] = reader.IsDBNull(i) ? null : reader.GetValue(i);
            rows.Add(row);
        }
        return new QueryResult(columns, rows);
    }
}
