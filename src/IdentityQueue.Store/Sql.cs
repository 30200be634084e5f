using System.Data.Common;

namespace IdentityQueue.Store;

/// <summary>Small helpers for the ADO.NET commands the store runs beside EF (bulk inserts, upserts). Stateless.</summary>
internal static class Sql
{
    public static DbCommand Command(this DbConnection connection, string text, DbTransaction? transaction = null)
    {
        var command = connection.CreateCommand();
        command.CommandText = text;
        command.Transaction = transaction;
        return command;
    }

    /// <summary>Adds a parameter (null becomes SQL NULL) and returns it, so a prepared command can set its value per row.</summary>
    public static DbParameter Parameter(this DbCommand command, string name, object? value = null)
    {
        var parameter = command.CreateParameter();
        parameter.ParameterName = name;
        parameter.Value = value ?? DBNull.Value;
        command.Parameters.Add(parameter);
        return parameter;
    }

    public static void Set(this DbParameter parameter, object? value) => parameter.Value = value ?? DBNull.Value;

    public static string? NullableString(this DbDataReader reader, int ordinal) => reader.IsDBNull(ordinal) ? null : reader.GetString(ordinal);

    public static double? NullableDouble(this DbDataReader reader, int ordinal) => reader.IsDBNull(ordinal) ? null : reader.GetDouble(ordinal);

    public static int? NullableInt(this DbDataReader reader, int ordinal) => reader.IsDBNull(ordinal) ? null : reader.GetInt32(ordinal);

    /// <summary>A double for a REAL column: NaN has no SQL value and is stored as NULL.</summary>
    public static object? Real(double? value) => value is { } v && !double.IsNaN(v) ? v : null;
}
