using System.Globalization;
using System.Text;

namespace StandFit.Tests.Support;

/// <summary>
/// Valid KP-250 sweep files made fast from a demo unit: each gets its own serial and test start, and
/// its outputs shifted by a seeded few microvolts, so every file has its own bytes.
/// </summary>
public static class SweepFiles
{
    private static readonly Lazy<string[]> Template = new(() => File.ReadAllLines(Path.Combine(DemoSet.Folder, "KP250-26110-0001.csv")));

    /// <summary>The text of unit <paramref name="index"/> of a set.</summary>
    public static string Text(int index, int seed, string serialPrefix = "KP250-SYN-")
    {
        var random = new Random(HashCode.Combine(seed, index));
        var text = new StringBuilder(1024);
        var start = new DateTime(2026, 11, 30, 22, 0, 0, DateTimeKind.Utc).AddSeconds(7.0 * index);
        foreach (var line in Template.Value)
        {
            if (line.StartsWith("# serial:", StringComparison.Ordinal))
            {
                text.Append(CultureInfo.InvariantCulture, $"# serial: {serialPrefix}{index:D6}\n");
            }
            else if (line.StartsWith("# test start:", StringComparison.Ordinal))
            {
                text.Append(CultureInfo.InvariantCulture, $"# test start: {start:yyyy-MM-dd'T'HH:mm:ss'Z'}\n");
            }
            else if (line.Length > 0 && char.IsAsciiDigit(line[0]))
            {
                var cells = line.Split(',');
                var output = double.Parse(cells[3], NumberStyles.Float, CultureInfo.InvariantCulture) + (random.Next(-5, 6) * 1e-5);
                cells[3] = output.ToString("F5", CultureInfo.InvariantCulture);
                text.Append(string.Join(',', cells)).Append('\n');
            }
            else
            {
                text.Append(line).Append('\n');
            }
        }

        return text.ToString();
    }

    /// <summary>Writes <c>unit-NNNNNN.csv</c> files <paramref name="first"/> to first+count-1 into a folder.</summary>
    public static IReadOnlyList<string> Write(string folder, int count, int seed, int first = 1)
    {
        Directory.CreateDirectory(folder);
        var paths = new List<string>(count);
        for (var i = first; i < first + count; i++)
        {
            var path = Path.Combine(folder, string.Create(CultureInfo.InvariantCulture, $"unit-{i:D6}.csv"));
            File.WriteAllText(path, Text(i, seed));
            paths.Add(path);
        }

        return paths;
    }

    /// <summary>Writes <paramref name="text"/> under a temporary name, then renames it into the folder, as a stand should.</summary>
    public static string Drop(string folder, string name, string text) => Drop(folder, name, Encoding.UTF8.GetBytes(text));

    public static string Drop(string folder, string name, byte[] bytes)
    {
        var temporary = Path.Combine(folder, name + ".tmp");
        var path = Path.Combine(folder, name);
        File.WriteAllBytes(temporary, bytes);
        File.Move(temporary, path);
        return path;
    }
}
