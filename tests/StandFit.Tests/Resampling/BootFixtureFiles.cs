using System.Globalization;
using StandFit.Tests.Support;

namespace StandFit.Tests.Resampling;

/// <summary>
/// The files under <c>Resampling/Fixtures</c> that the R reference tests read: the index files the
/// fixture writer made (comma-separated resample indices) and R's <c>name,value</c> tables.
/// </summary>
internal static class BootFixtureFiles
{
    public static string Path(string file) => RepoPaths.InRepo("tests", "StandFit.Tests", "Resampling", "Fixtures", file);

    /// <summary>A <c>name,value</c> table; lines starting '#' (the R and package versions) and the header skipped.</summary>
    public static Dictionary<string, double> NamedValues(string file) =>
        File.ReadAllLines(Path(file))
            .Where(l => !l.StartsWith('#') && !l.StartsWith("name,", StringComparison.Ordinal))
            .Select(l => l.Split(','))
            .ToDictionary(p => p[0], p => Number(p[1]));

    /// <summary>Every index of an index file, row after row.</summary>
    public static int[] Indices(string file) =>
        [.. File.ReadAllLines(Path(file)).SelectMany(l => l.Split(',')).Select(v => int.Parse(v, CultureInfo.InvariantCulture))];

    public static double Number(string text) => double.Parse(text, NumberStyles.Float, CultureInfo.InvariantCulture);
}
