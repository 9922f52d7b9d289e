using DuckDB.NET.Data;

namespace StandFit.Tests.Support;

/// <summary>Queries with embedded DuckDB, the kind of engine plant reporting reads our Parquet with.</summary>
public static class Duck
{
    public static List<Dictionary<string, object?>> Query(string sql)
    {
        using var connection = new DuckDBConnection("DataSource=:memory:");
        connection.Open();
        using var command = connection.CreateCommand();
        command.CommandText = sql;
        using var reader = command.ExecuteReader();
        var rows = new List<Dictionary<string, object?>>();
        while (reader.Read())
        {
            var row = new Dictionary<string, object?>(StringComparer.Ordinal);
            for (var i = 0; i < reader.FieldCount; i++)
            {
                row[reader.GetName(i)] = reader.IsDBNull(i) ? null : reader.GetValue(i);
            }

            rows.Add(row);
        }

        return rows;
    }

    /// <summary>A path as a DuckDB string literal (forward slashes, quotes doubled).</summary>
    public static string Literal(string path) => "'" + path.Replace("\\", "/", StringComparison.Ordinal).Replace("'", "''", StringComparison.Ordinal) + "'";
}
