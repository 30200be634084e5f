using System.Data.Common;
using System.Text;
using IdentityQueue.Store.Import;

namespace IdentityQueue.Store.Tests;

/// <summary>A real SQLite store file in a fresh temporary folder, migrated, and removed again when the test ends.</summary>
internal sealed class TempStore : IDisposable
{
    private TempStore(string folder, bool migrate)
    {
        Folder = folder;
        DbPath = Path.Combine(folder, "store.db");
        Connection = StoreConnection.OpenSqlite(DbPath, create: true);
        if (migrate) Connection.Migrate();
    }

    public string Folder { get; }
    public string DbPath { get; }
    public StoreConnection Connection { get; }

    public static TempStore Create(bool migrate = true)
    {
        var folder = Path.Combine(Path.GetTempPath(), "idq-store-tests", Guid.NewGuid().ToString("N"));
        Directory.CreateDirectory(folder);
        return new TempStore(folder, migrate);
    }

    public string File(string name, string text) => File(name, Encoding.UTF8.GetBytes(text));

    public string File(string name, byte[] bytes)
    {
        var path = Path.Combine(Folder, name);
        System.IO.File.WriteAllBytes(path, bytes);
        return path;
    }

    /// <summary>Imports a file and fails the test if the import was refused.</summary>
    public ImportSummary Import(string path, ImportOptions? options = null)
    {
        var result = new CatalogueImporter(Connection).Import(path, options);
        Assert.True(result.Success, result.Error?.Message);
        return result.Value!;
    }

    public int Execute(string sql)
    {
        using var command = Connection.Connection.CreateCommand();
        command.CommandText = sql;
        return command.ExecuteNonQuery();
    }

    public object? Scalar(string sql)
    {
        using var command = Connection.Connection.CreateCommand();
        command.CommandText = sql;
        var value = command.ExecuteScalar();
        return value is DBNull ? null : value;
    }

    public long Count(string sql) => Convert.ToInt64(Scalar(sql));

    public List<object?[]> Rows(string sql)
    {
        using var command = Connection.Connection.CreateCommand();
        command.CommandText = sql;
        using DbDataReader reader = command.ExecuteReader();
        var rows = new List<object?[]>();
        while (reader.Read())
        {
            var row = new object?[reader.FieldCount];
            for (var i = 0; i < row.Length; i++) row[i] = reader.IsDBNull(i) ? null : reader.GetValue(i);
            rows.Add(row);
        }
        return rows;
    }

    /// <summary>The column names of a table or view, from SQLite's <c>pragma table_info</c>.</summary>
    public List<string> Columns(string table) => Rows($"pragma table_info({table})").Select(r => (string)r[1]!).ToList();

    public void Dispose()
    {
        Connection.Dispose();
        try
        {
            Directory.Delete(Folder, recursive: true);
        }
        catch (IOException)
        {
            // A file still held open by a failing test; the folder is under the temporary directory and harmless.
        }
    }
}
