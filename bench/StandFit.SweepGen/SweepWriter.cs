using System.Globalization;
using System.Text;

namespace StandFit.SweepGen;

/// <summary>
/// Builds one sweep file: "# key: value" metadata lines, a header row, then comma-separated rows.
/// Written as UTF-8 (BOM optional) with LF line endings unless asked otherwise.
/// </summary>
internal sealed class SweepWriter
{
    private readonly List<string> metadata = [];
    private readonly List<string> rows = [];
    private string header;

    public SweepWriter(string header)
    {
        this.header = header;
    }

    public static SweepWriter ForUnit(PartSpec part, string serial, string partLabel, DateTime start, string operatorName, IEnumerable<SweepPoint> points)
    {
        var writer = new SweepWriter(part.Header);
        writer.AddMetadata("serial", serial);
        writer.AddMetadata("part", partLabel);
        writer.AddMetadata("station", part.Station);
        writer.AddMetadata("test start", start.ToString("yyyy-MM-dd'T'HH:mm:ss'Z'", CultureInfo.InvariantCulture));
        writer.AddMetadata("operator", operatorName);
        foreach (SweepPoint p in points)
        {
            writer.AddRow(FormatRow(p, part));
        }

        return writer;
    }

    public static string FormatRow(SweepPoint p, PartSpec part) =>
        Cells(p, part) + "," + Fixed(p.Output, part.OutputDecimals);

    /// <summary>The step, leg and stimulus cells of a row, without the output cell.</summary>
    public static string Cells(SweepPoint p, PartSpec part) =>
        p.Step.ToString(CultureInfo.InvariantCulture) + "," + p.Leg + "," + Fixed(p.Stimulus, part.StimulusDecimals);

    /// <summary>Fixed-point text built from the scaled integer, so it is exact and culture-free.</summary>
    public static string Fixed(double value, int decimals)
    {
        long scale = 1;
        for (int i = 0; i < decimals; i++)
        {
            scale *= 10;
        }

        long units = (long)Math.Round(value * scale);
        long magnitude = Math.Abs(units);
        string whole = (magnitude / scale).ToString(CultureInfo.InvariantCulture);
        string fraction = (magnitude % scale).ToString(CultureInfo.InvariantCulture).PadLeft(decimals, '0');
        return (units < 0 ? "-" : string.Empty) + whole + (decimals > 0 ? "." + fraction : string.Empty);
    }

    public static void WriteEmpty(string path) => File.WriteAllBytes(path, []);

    public void AddMetadata(string key, string value) => metadata.Add("# " + key + ": " + value);

    public void AddRow(string row) => rows.Add(row);

    public void ReplaceRow(int step, string row) => rows[step - 1] = row;

    public void ReplaceHeader(string newHeader) => header = newHeader;

    public void ClearRows() => rows.Clear();

    public void Save(string path, string newline = "\n", bool byteOrderMark = false, int trailingBlankLines = 0)
    {
        var text = new StringBuilder();
        foreach (string line in metadata.Append(header).Concat(rows))
        {
            text.Append(line).Append(newline);
        }

        for (int i = 0; i < trailingBlankLines; i++)
        {
            text.Append(newline);
        }

        var encoding = new UTF8Encoding(encoderShouldEmitUTF8Identifier: false);
        byte[] body = encoding.GetBytes(text.ToString());
        byte[] bytes = byteOrderMark ? [0xEF, 0xBB, 0xBF, .. body] : body;
        File.WriteAllBytes(path, bytes);
    }
}
