using System.Data.Common;
using System.Globalization;

namespace IdentityQueue.Store.Read;

/// <summary>
/// One row of a read model's query, read by column name, with the values as both stores give them made alike
/// (<see cref="ReadOnlyQuery.Normalize"/>): integers of any width as long, timestamps as 'YYYY-MM-DD HH:MM:SS' text.
/// Valid only while its reader is on the row.
/// </summary>
internal readonly struct ReadRow(DbDataReader reader)
{
    private object? Value(string column)
    {
        var i = reader.GetOrdinal(column);
        return reader.IsDBNull(i) ? null : ReadOnlyQuery.Normalize(reader.GetValue(i));
    }

    public string Text(string column) => Value(column) is { } v ? Convert.ToString(v, CultureInfo.InvariantCulture) ?? "" : "";

    public string? NullableText(string column) => Value(column) is { } v ? Convert.ToString(v, CultureInfo.InvariantCulture) : null;

    public long Long(string column) => Value(column) is { } v ? Convert.ToInt64(v, CultureInfo.InvariantCulture) : 0;

    public long? NullableLong(string column) => Value(column) is { } v ? Convert.ToInt64(v, CultureInfo.InvariantCulture) : null;

    public double? NullableDouble(string column) => Value(column) is { } v ? Convert.ToDouble(v, CultureInfo.InvariantCulture) : null;
}

/// <summary>Runs the read models' SQL: fixed text, every value a parameter. Stateless.</summary>
internal static class ReadSql
{
    /// <summary>The rows of <paramref name="sql"/> with <paramref name="parameters"/> bound, each mapped while its reader is on it.</summary>
    public static List<T> Rows<T>(StoreConnection store, string sql, IEnumerable<(string Name, object? Value)> parameters, Func<ReadRow, T> map)
    {
        using var command = store.Connection.Command(sql);
        foreach (var (name, value) in parameters) command.Parameter(name, value);
        using var reader = command.ExecuteReader();
        var rows = new List<T>();
        while (reader.Read()) rows.Add(map(new ReadRow(reader)));
        return rows;
    }

    public static List<T> Rows<T>(StoreConnection store, string sql, Func<ReadRow, T> map) => Rows(store, sql, [], map);

    /// <summary>
    /// <c>AND column IN (@prefix0, @prefix1, …)</c> and its parameters for a filter on some values, or nothing for none:
    /// the values never enter the SQL text.
    /// </summary>
    public static (string Condition, List<(string Name, object? Value)> Parameters) In(string column, string prefix, IReadOnlyList<string> values)
    {
        if (values.Count == 0) return ("", []);
        var parameters = values.Select((v, i) => ($"@{prefix}{i}", (object?)v)).ToList();
        return ($" AND {column} IN ({string.Join(", ", parameters.Select(p => p.Item1))})", parameters);
    }
}
