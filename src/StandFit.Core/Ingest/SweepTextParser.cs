using System.Collections.Immutable;
using StandFit.Core.Problems;

namespace StandFit.Core.Ingest;

/// <summary>
/// Splits the text of a sweep file into a <see cref="SweepTable"/>: leading <c># key: value</c>
/// metadata lines (a <c>#</c> line without a colon is a comment), one header row of column names,
/// then rows of cells separated by the format's separator (',' unless the recipe declares a decimal
/// comma, then ';'). Accepts LF and CRLF, skips blank lines (trailing ones included). The last data
/// row must end with a line end (a file cut off while being written is refused, not half-read).
/// A byte-order mark must already be gone (the reader strips it).
/// </summary>
public static class SweepTextParser
{
    /// <summary>The longest line accepted, in characters.</summary>
    public const int MaxLineLength = 16 * 1024;

    public static Result<SweepTable> Parse(string sourceName, string text, SweepFormat? format = null)
    {
        format ??= SweepFormat.Standard;
        var metadata = ImmutableArray.CreateBuilder<MetadataEntry>();
        var rows = ImmutableArray.CreateBuilder<TableRow>();
        ImmutableArray<string> header = default;
        var headerLine = 0;
        var lineNumber = 0;
        var position = 0;
        var anyContent = false;
        var lastRowEnded = true;

        while (position < text.Length)
        {
            var end = text.IndexOf('\n', position);
            if (end < 0)
            {
                end = text.Length;
            }

            var line = text.AsSpan(position, end - position);
            var ended = end < text.Length;
            position = end + 1;
            lineNumber++;
            if (line.Length > 0 && line[^1] == '\r')
            {
                line = line[..^1];
            }

            if (line.Length > MaxLineLength)
            {
                return Fail(ReasonCodes.InputLineTooLong, Messages.LineTooLong(line.Length, MaxLineLength), sourceName, lineNumber);
            }

            if (line.IsWhiteSpace())
            {
                continue;
            }

            anyContent = true;
            if (header.IsDefault)
            {
                if (line[0] == '#')
                {
                    var problem = ReadMetadata(line[1..], sourceName, lineNumber, metadata);
                    if (problem is not null)
                    {
                        return problem;
                    }

                    continue;
                }

                var names = SplitCells(line, format.CellSeparator);
                if (names.Length == 1 && OtherSeparator(line, format.CellSeparator) is { } other)
                {
                    return Fail(ReasonCodes.InputWrongSeparator, Messages.WrongSeparator(format.CellSeparator, other), sourceName, lineNumber);
                }

                for (var i = 0; i < names.Length; i++)
                {
                    if (names[i].Length == 0)
                    {
                        return Fail(ReasonCodes.InputNoHeader, Messages.EmptyColumnName(i + 1), sourceName, lineNumber, i + 1);
                    }

                    for (var j = 0; j < i; j++)
                    {
                        if (string.Equals(names[i], names[j], StringComparison.OrdinalIgnoreCase))
                        {
                            return Fail(ReasonCodes.InputDuplicateColumn, Messages.DuplicateColumn(names[i], j + 1), sourceName, lineNumber, i + 1);
                        }
                    }
                }

                header = names;
                headerLine = lineNumber;
                continue;
            }

            var cells = SplitCells(line, format.CellSeparator);
            if (cells.Length != header.Length)
            {
                return Fail(ReasonCodes.InputWrongColumnCount, Messages.WrongColumnCount(cells.Length, header.Length), sourceName, lineNumber);
            }

            rows.Add(new TableRow(lineNumber, cells));
            lastRowEnded = ended;
        }

        if (!anyContent)
        {
            return Fail(ReasonCodes.InputEmpty, Messages.EmptyFile(), sourceName, 0);
        }

        if (header.IsDefault)
        {
            return Fail(ReasonCodes.InputNoHeader, Messages.NoHeader(), sourceName, lineNumber);
        }

        if (rows.Count == 0)
        {
            return Fail(ReasonCodes.InputNoRows, Messages.NoRows(), sourceName, headerLine);
        }

        if (!lastRowEnded)
        {
            // A cut in the middle of the last number would still read as a number: refuse a row without its line end.
            return Fail(ReasonCodes.InputTruncated, Messages.TruncatedLastRow(), sourceName, rows[^1].Line);
        }

        return new SweepTable(sourceName, metadata.ToImmutable(), header, headerLine, rows.ToImmutable());
    }

    /// <summary>
    /// The leading metadata lines of a text, read leniently (first value of a key wins, bad lines
    /// skipped): what is known of a unit whose file is rejected, so its row still names it.
    /// </summary>
    public static ImmutableArray<MetadataEntry> ScanMetadata(string text)
    {
        var entries = ImmutableArray.CreateBuilder<MetadataEntry>();
        var lineNumber = 0;
        foreach (var raw in text.AsSpan().EnumerateLines())
        {
            lineNumber++;
            var line = raw.Trim();
            if (line.IsEmpty)
            {
                continue;
            }

            if (line[0] != '#' || line.Length > MaxLineLength || lineNumber > 1000)
            {
                break;
            }

            var colon = line.IndexOf(':');
            if (colon < 1)
            {
                continue;
            }

            var key = MetadataKeys.Normalise(line[1..colon].ToString());
            if (key.Length > 0 && !entries.Any(e => e.Key == key))
            {
                entries.Add(new MetadataEntry(key, line[(colon + 1)..].Trim().ToString(), lineNumber));
            }
        }

        return entries.ToImmutable();
    }

    private static Problem? ReadMetadata(ReadOnlySpan<char> body, string sourceName, int lineNumber, ImmutableArray<MetadataEntry>.Builder metadata)
    {
        var colon = body.IndexOf(':');
        if (colon < 0)
        {
            return null; // a comment
        }

        var key = MetadataKeys.Normalise(body[..colon].ToString());
        if (key.Length == 0)
        {
            return Problem(ReasonCodes.InputBadMetadata, Messages.BadMetadataLine(), sourceName, lineNumber, 1);
        }

        var value = body[(colon + 1)..].Trim().ToString();
        foreach (var earlier in metadata)
        {
            if (earlier.Key == key)
            {
                return earlier.Value == value
                    ? null
                    : Problem(ReasonCodes.InputDuplicateMetadata, Messages.DuplicateMetadata(key, earlier.Line), sourceName, lineNumber, 1);
            }
        }

        metadata.Add(new MetadataEntry(key, value, lineNumber));
        return null;
    }

    /// <summary>A separator other than the expected one that a one-cell header holds: the file uses another export format.</summary>
    private static char? OtherSeparator(ReadOnlySpan<char> header, char expected)
    {
        foreach (var candidate in (ReadOnlySpan<char>)[',', ';', '\t'])
        {
            if (candidate != expected && header.Contains(candidate))
            {
                return candidate;
            }
        }

        return null;
    }

    private static ImmutableArray<string> SplitCells(ReadOnlySpan<char> line, char separator)
    {
        var count = line.Count(separator) + 1;
        var cells = ImmutableArray.CreateBuilder<string>(count);
        foreach (var range in line.Split(separator))
        {
            cells.Add(line[range].Trim().ToString());
        }

        return cells.MoveToImmutable();
    }

    private static Problem Problem(ReasonCode code, string message, string file, int line, int column = 0) =>
        new(code.Code, message, SourceLocation.At(file, line, column));

    private static Result<SweepTable> Fail(ReasonCode code, string message, string file, int line, int column = 0) =>
        Problem(code, message, file, line, column);
}
