namespace StandFit.Tests.Support;

/// <summary>The shipped demo: sample-runs/line-3 and its documented expectations (sample-runs/expected.csv).</summary>
public static class DemoSet
{
    public sealed record Expectation(string File, string Ruling, IReadOnlyList<string> Reasons);

    public static string Folder => RepoPaths.InRepo("sample-runs", "line-3");

    public static string Recipes => RepoPaths.InRepo("config", "recipes");

    public static IReadOnlyList<Expectation> Expected { get; } = Load();

    /// <summary>
    /// The demo files that name a part no recipe lists: <c>run</c> rejects them (input.no_recipe),
    /// <c>watch</c> holds them until a recipe lists the part.
    /// </summary>
    public static IReadOnlyList<Expectation> HeldByWatch { get; } =
        [.. Expected.Where(e => e.Reasons.Contains("input.no_recipe") && File.ReadLines(Path.Combine(Folder, e.File)).Any(l => l.StartsWith("# part:", StringComparison.Ordinal)))];

    /// <summary>How many demo units <c>watch</c> publishes (all but the held ones).</summary>
    public static int PublishedByWatch => Expected.Count - HeldByWatch.Count;

    /// <summary>A configuration file for a test: all folders under <paramref name="root"/>, the demo's recipes.</summary>
    public static string WriteConfig(TempFolder root, int flushUnits = 5000, double flushSeconds = 0)
    {
        var recipes = Recipes.Replace("\\", "/", StringComparison.Ordinal);
        var seconds = flushSeconds.ToString(System.Globalization.CultureInfo.InvariantCulture);
        return root.File("standfit.yaml", $"""
            folders:
              inbox: inbox
              archive: archive
              rejected: rejected
              output: output
              recipes: "{recipes}"
              logs: logs
            watch:
              poll_seconds: 0.2
            output:
              flush_units: {flushUnits}
              flush_seconds: {seconds}
            """);
    }

    public static void CopyInto(string inbox)
    {
        Directory.CreateDirectory(inbox);
        foreach (var file in Directory.EnumerateFiles(Folder))
        {
            File.Copy(file, Path.Combine(inbox, Path.GetFileName(file)));
        }
    }

    private static List<Expectation> Load()
    {
        var rows = new List<Expectation>();
        foreach (var line in File.ReadAllLines(RepoPaths.InRepo("sample-runs", "expected.csv")).Skip(1))
        {
            if (line.Length == 0)
            {
                continue;
            }

            var cells = line.Split(',');
            rows.Add(new Expectation(cells[0], cells[1].ToLowerInvariant(), cells[2].Length == 0 ? [] : cells[2].Split(';')));
        }

        return rows;
    }
}
