using System.Collections.Immutable;
using System.Globalization;
using System.Runtime.InteropServices;
using StandFit.Core.Problems;

namespace StandFit.Core.Ingest;

/// <summary>
/// Turns a <see cref="SweepTable"/> into a <see cref="Sweep"/> with the recipe's column map:
/// numbers in invariant culture (the format's decimal separator, a point unless the recipe declares
/// a comma; optional exponent; no thousands separator),
/// legs 'up'/'down', points put in acquisition order.
/// </summary>
public static class SweepAssembler
{
    /// <summary>The longest serial accepted.</summary>
    public const int MaxSerialLength = 64;

    private const NumberStyles NumberStyle = NumberStyles.Float;

    /// <summary>ISO 8601 date and time with a zone designator (Z or an offset); a space may stand for the 'T'.</summary>
    private static readonly string[] TestStartFormats =
    [
        "yyyy-MM-dd'T'HH:mm:ssK", "yyyy-MM-dd'T'HH:mm:ss.FFFFFFFK", "yyyy-MM-dd'T'HH:mmK",
        "yyyy-MM-dd HH:mm:ssK", "yyyy-MM-dd HH:mm:ss.FFFFFFFK", "yyyy-MM-dd HH:mmK",
    ];

    public static Result<Sweep> Assemble(SweepTable table, ColumnMap columns, SweepFormat? format = null)
    {
        format ??= SweepFormat.Standard;
        var identity = ReadIdentity(table);
        if (!identity.IsSuccess)
        {
            return Result<Sweep>.Failure(identity.Problems);
        }

        var inputIndex = new int[columns.Inputs.Length];
        for (var k = 0; k < inputIndex.Length; k++)
        {
            inputIndex[k] = Find(table, columns.Inputs[k]);
            if (inputIndex[k] < 0)
            {
                return Missing(table, "stimulus", columns.Inputs[k]);
            }
        }

        var outputIndex = Find(table, columns.Output);
        var legIndex = columns.Leg is null ? -1 : Find(table, columns.Leg);
        var orderIndex = columns.Order is null ? -1 : Find(table, columns.Order);
        var uncertaintyIndex = columns.Uncertainty is null ? -1 : Find(table, columns.Uncertainty);
        if (outputIndex < 0)
        {
            return Missing(table, "output", columns.Output);
        }

        if (columns.Leg is not null && legIndex < 0)
        {
            return Missing(table, "leg", columns.Leg);
        }

        if (columns.Order is not null && orderIndex < 0)
        {
            return Missing(table, "order", columns.Order);
        }

        if (columns.Uncertainty is not null && uncertaintyIndex < 0)
        {
            return Missing(table, "uncertainty", columns.Uncertainty);
        }

        var n = table.Rows.Length;
        var inputs = inputIndex.Select(_ => new double[n]).ToArray();
        var output = new double[n];
        var uncertainties = uncertaintyIndex >= 0 ? new double[n] : null;
        var legs = new Leg[n];
        var lines = new int[n];
        var order = orderIndex >= 0 ? new double[n] : null;
        for (var i = 0; i < n; i++)
        {
            var row = table.Rows[i];
            lines[i] = row.Line;
            for (var k = 0; k < inputIndex.Length; k++)
            {
                if (Number(table, row, inputIndex[k], format, out inputs[k][i]) is { } p1)
                {
                    return p1;
                }
            }

            if (Number(table, row, outputIndex, format, out output[i]) is { } p2)
            {
                return p2;
            }

            if (order is not null && Number(table, row, orderIndex, format, out order[i]) is { } p3)
            {
                return p3;
            }

            if (uncertainties is not null)
            {
                if (Number(table, row, uncertaintyIndex, format, out uncertainties[i]) is { } p4)
                {
                    return p4;
                }

                if (!(uncertainties[i] > 0))
                {
                    return Cell(table, row, uncertaintyIndex, ReasonCodes.InputBadUncertainty, Messages.BadUncertainty(uncertainties[i]));
                }
            }

            if (legIndex >= 0)
            {
                var cell = row.Cells[legIndex];
                if (cell.Equals("up", StringComparison.OrdinalIgnoreCase))
                {
                    legs[i] = Leg.Up;
                }
                else if (cell.Equals("down", StringComparison.OrdinalIgnoreCase))
                {
                    legs[i] = Leg.Down;
                }
                else
                {
                    return Cell(table, row, legIndex, ReasonCodes.InputBadLeg, Messages.BadLeg(table.Header[legIndex], Shown(cell)));
                }
            }
        }

        if (order is not null)
        {
            var permutation = Enumerable.Range(0, n).ToArray();
            Array.Sort(permutation, (a, b) => order[a] != order[b] ? order[a].CompareTo(order[b]) : a.CompareTo(b));
            inputs = [.. inputs.Select(column => permutation.Select(k => column[k]).ToArray())];
            output = [.. permutation.Select(k => output[k])];
            legs = [.. permutation.Select(k => legs[k])];
            lines = [.. permutation.Select(k => lines[k])];
            if (uncertainties is not null)
            {
                uncertainties = [.. permutation.Select(k => uncertainties[k])];
            }
        }

        return new Sweep(
            identity.Value,
            [.. inputs.Select(ImmutableCollectionsMarshal.AsImmutableArray)],
            ImmutableCollectionsMarshal.AsImmutableArray(output),
            ImmutableCollectionsMarshal.AsImmutableArray(legs),
            ImmutableCollectionsMarshal.AsImmutableArray(lines),
            table.Metadata,
            uncertainties is null ? default : ImmutableCollectionsMarshal.AsImmutableArray(uncertainties));
    }

    /// <summary>Serial (from metadata, else the file name without extension), part, station and test start.</summary>
    public static Result<UnitIdentity> ReadIdentity(SweepTable table) => ReadIdentity(table.SourceName, table.Metadata);

    /// <summary>Serial (from metadata, else the file name without extension), part, station and test start.</summary>
    public static Result<UnitIdentity> ReadIdentity(string sourceName, ImmutableArray<MetadataEntry> metadata)
    {
        var serialEntry = metadata.FirstOrDefault(m => m.Key == MetadataKeys.Serial);
        var serial = serialEntry?.Value ?? Path.GetFileNameWithoutExtension(sourceName);
        var serialLine = serialEntry?.Line ?? 0;
        if (serial.Length == 0)
        {
            return new Problem(ReasonCodes.InputBadSerial.Code, Messages.MissingSerial(), SourceLocation.At(sourceName, serialLine));
        }

        if (!IsSafeSerial(serial))
        {
            return new Problem(ReasonCodes.InputBadSerial.Code, Messages.BadSerial(Shown(serial)), SourceLocation.At(sourceName, serialLine));
        }

        DateTime? testStart = null;
        var startEntry = metadata.FirstOrDefault(m => m.Key == MetadataKeys.TestStart);
        if (startEntry is not null)
        {
            if (!HasZone(startEntry.Value) || !DateTimeOffset.TryParseExact(startEntry.Value, TestStartFormats, CultureInfo.InvariantCulture, DateTimeStyles.None, out var parsed))
            {
                return new Problem(ReasonCodes.InputBadMetadata.Code, Messages.BadTestStart(Shown(startEntry.Value)), SourceLocation.At(sourceName, startEntry.Line));
            }

            testStart = parsed.UtcDateTime;
        }

        return new UnitIdentity(serial, Meta(metadata, MetadataKeys.Part), Meta(metadata, MetadataKeys.Station), testStart);
    }

    /// <summary>True when an ISO 8601 text ends in a zone designator: Z, +hh:mm, -hh:mm, +hhmm or +hh.</summary>
    private static bool HasZone(string text)
    {
        var t = text.TrimEnd();
        if (t.EndsWith('Z') || t.EndsWith('z'))
        {
            return true;
        }

        var sign = Math.Max(t.LastIndexOf('+'), t.LastIndexOf('-'));
        var tPosition = Math.Max(t.IndexOf('T', StringComparison.Ordinal), t.IndexOf(' ', StringComparison.Ordinal));
        return sign > tPosition && tPosition > 0 && t[(sign + 1)..].Replace(":", "", StringComparison.Ordinal).All(char.IsAsciiDigit) && t.Length - sign - 1 >= 2;
    }

    /// <summary>A serial may be used in file names and log lines: no separators, no control characters.</summary>
    public static bool IsSafeSerial(string serial)
    {
        if (serial.Length is 0 or > MaxSerialLength || serial is "." or "..")
        {
            return false;
        }

        foreach (var c in serial)
        {
            if (char.IsControl(c) || c is '/' or '\\' or ':' or '*' or '?' or '"' or '<' or '>' or '|' || char.IsSurrogate(c))
            {
                return false;
            }
        }

        return true;
    }

    /// <summary>A user's text cut to a safe length with control characters made visible, for messages.</summary>
    public static string Shown(string text)
    {
        var cut = text.Length > 40 ? text[..40] + "..." : text;
        var builder = new System.Text.StringBuilder(cut.Length);
        foreach (var c in cut)
        {
            if (char.IsControl(c))
            {
                builder.Append(CultureInfo.InvariantCulture, $"\\u{(int)c:x4}");
            }
            else
            {
                builder.Append(c);
            }
        }

        return builder.ToString();
    }

    private static string? Meta(ImmutableArray<MetadataEntry> metadata, string key) => metadata.FirstOrDefault(m => m.Key == key)?.Value;

    private static int Find(SweepTable table, string name)
    {
        for (var i = 0; i < table.Header.Length; i++)
        {
            if (string.Equals(table.Header[i], name, StringComparison.OrdinalIgnoreCase))
            {
                return i;
            }
        }

        return -1;
    }

    private static Problem? Number(SweepTable table, TableRow row, int column, SweepFormat format, out double value)
    {
        var cell = row.Cells[column];
        if (!double.TryParse(cell, NumberStyle, format.Numbers, out value))
        {
            return Cell(table, row, column, ReasonCodes.InputBadNumber, Messages.BadNumber(table.Header[column], Shown(cell), format.DecimalSeparator));
        }

        if (!double.IsFinite(value))
        {
            return Cell(table, row, column, ReasonCodes.InputNonFinite, Messages.NonFinite(table.Header[column], Shown(cell)));
        }

        return null;
    }

    private static Problem Cell(SweepTable table, TableRow row, int column, ReasonCode code, string message) =>
        new(code.Code, message, SourceLocation.At(table.SourceName, row.Line, column + 1));

    private static Result<Sweep> Missing(SweepTable table, string role, string name) =>
        new Problem(ReasonCodes.InputMissingColumn.Code, Messages.MissingColumn(role, name, table.Header), SourceLocation.At(table.SourceName, table.HeaderLine));
}
