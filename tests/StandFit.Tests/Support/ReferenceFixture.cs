using System.Collections.Immutable;
using System.Globalization;

namespace StandFit.Tests.Support;

/// <summary>
/// A fixture of reference values computed by an outside tool, committed with the script that made
/// it: lines <c>case,quantity,index,value</c> after <c>#</c> header lines (the first names the
/// script and the tool's version). Values are read in invariant culture.
/// </summary>
public sealed class ReferenceFixture
{
    private readonly Dictionary<(string Case, string Quantity), List<double>> _values = [];

    private ReferenceFixture(string header) => Header = header;

    /// <summary>The first header line, without its '#'.</summary>
    public string Header { get; }

    public static ReferenceFixture Load(params string[] pathInRepo)
    {
        var lines = File.ReadAllLines(RepoPaths.InRepo(pathInRepo));
        var fixture = new ReferenceFixture(lines[0].TrimStart('#', ' '));
        foreach (var line in lines.Where(l => l.Length > 0 && l[0] != '#'))
        {
            var cells = line.Split(',');
            var key = (cells[0], cells[1]);
            if (!fixture._values.TryGetValue(key, out var list))
            {
                fixture._values[key] = list = [];
            }

            if (int.Parse(cells[2], NumberStyles.None, CultureInfo.InvariantCulture) != list.Count)
            {
                throw new InvalidDataException($"{string.Join('/', pathInRepo)}: {cells[0]},{cells[1]} index {cells[2]} is out of order.");
            }

            list.Add(double.Parse(cells[3], NumberStyles.Float, CultureInfo.InvariantCulture));
        }

        return fixture;
    }

    public IReadOnlyList<double> Values(string @case, string quantity) =>
        _values.TryGetValue((@case, quantity), out var list) ? list : throw new KeyNotFoundException($"The fixture has no {@case},{quantity}.");

    public double Value(string @case, string quantity) => Values(@case, quantity).Single();

    /// <summary>The numeric columns of a comma-separated file with one header row, by column name.</summary>
    public static Dictionary<string, ImmutableArray<double>> Table(params string[] pathInRepo)
    {
        var lines = File.ReadAllLines(RepoPaths.InRepo(pathInRepo)).Where(l => l.Length > 0).ToArray();
        var names = lines[0].Split(',');
        var rows = lines[1..].Select(l => l.Split(',').Select(c => double.Parse(c, NumberStyles.Float, CultureInfo.InvariantCulture)).ToArray()).ToArray();
        return names.Select((name, k) => (name, column: rows.Select(r => r[k]).ToImmutableArray())).ToDictionary(x => x.name, x => x.column, StringComparer.Ordinal);
    }
}
