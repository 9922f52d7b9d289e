using System.Collections.Immutable;

namespace StandFit.Core.Ingest;

/// <summary>One <c># key: value</c> line of a sweep file. Keys are normalised (see <see cref="MetadataKeys"/>).</summary>
public sealed record MetadataEntry(string Key, string Value, int Line);

/// <summary>One data row as text, with the 1-based line it came from.</summary>
public sealed record TableRow(int Line, ImmutableArray<string> Cells);

/// <summary>
/// A sweep file split into metadata, header and rows of text cells; nothing is interpreted yet.
/// Which cells are numbers is the recipe's business (<see cref="SweepAssembler"/>).
/// </summary>
public sealed class SweepTable
{
    public SweepTable(string sourceName, ImmutableArray<MetadataEntry> metadata, ImmutableArray<string> header, int headerLine, ImmutableArray<TableRow> rows)
    {
        SourceName = sourceName;
        Metadata = metadata;
        Header = header;
        HeaderLine = headerLine;
        Rows = rows;
    }

    /// <summary>The file name the table was read from (no folder), used in messages.</summary>
    public string SourceName { get; }

    public ImmutableArray<MetadataEntry> Metadata { get; }

    public ImmutableArray<string> Header { get; }

    public int HeaderLine { get; }

    public ImmutableArray<TableRow> Rows { get; }

    /// <summary>The value of a metadata key, or null.</summary>
    public string? Meta(string key)
    {
        foreach (var m in Metadata)
        {
            if (m.Key == key)
            {
                return m.Value;
            }
        }

        return null;
    }
}

/// <summary>The metadata keys the tool itself reads; any other key is kept and passed through.</summary>
public static class MetadataKeys
{
    public const string Serial = "serial";
    public const string Part = "part";
    public const string Station = "station";
    public const string TestStart = "test_start";

    /// <summary>Lower case; runs of spaces, hyphens and dots become one underscore: "Test Start" is "test_start".</summary>
    public static string Normalise(string key)
    {
        var trimmed = key.Trim();
        var chars = new System.Text.StringBuilder(trimmed.Length);
        var pendingSeparator = false;
        foreach (var c in trimmed)
        {
            if (c is ' ' or '\t' or '-' or '.' or '_')
            {
                pendingSeparator = chars.Length > 0;
                continue;
            }

            if (pendingSeparator)
            {
                chars.Append('_');
                pendingSeparator = false;
            }

            chars.Append(char.ToLowerInvariant(c));
        }

        return chars.ToString();
    }
}
