using System.Collections.Concurrent;
using System.Collections.Immutable;
using System.Globalization;
using System.Text.RegularExpressions;

namespace StandFit.Tests.Support;

/// <summary>One certified parameter row of a StRD linear file: name (B0, B1 ...), estimate, standard deviation.</summary>
public sealed record StrdParameter(string Name, int Power, double Estimate, double StandardDeviation);

/// <summary>
/// A NIST StRD linear-regression file (the copies in <c>../shared/reference/nist-strd/linear</c>), parsed from
/// the line ranges its header states: "Certified Values (lines X to Y)" and "Data (lines X to Y)".
/// Certified rows look like <c>B0  -0.262323073774029  0.232818234301152</c>; the block also holds
/// "Standard Deviation" (of the residuals), "R-Squared" and the ANOVA table's "Residual" row.
/// Data rows are y first, then the predictors. Files are parsed once and cached.
/// </summary>
public sealed partial class StrdFile
{
    /// <summary>Significant digits NIST prints the linear certified values to: the LRE cap.</summary>
    public const int CertifiedDigits = 15;

    private static readonly ConcurrentDictionary<string, Lazy<StrdFile>> Cache = new(StringComparer.Ordinal);

    private StrdFile(
        string fileName,
        ImmutableArray<StrdParameter> parameters,
        double residualSd,
        double rSquared,
        int residualDegreesOfFreedom,
        ImmutableArray<double> y,
        ImmutableArray<ImmutableArray<double>> predictors)
    {
        FileName = fileName;
        Parameters = parameters;
        ResidualSd = residualSd;
        RSquared = rSquared;
        ResidualDegreesOfFreedom = residualDegreesOfFreedom;
        Y = y;
        Predictors = predictors;
    }

    public string FileName { get; }

    /// <summary>The certified parameters in file order (B0 or B1 first).</summary>
    public ImmutableArray<StrdParameter> Parameters { get; }

    /// <summary>Certified residual standard deviation.</summary>
    public double ResidualSd { get; }

    /// <summary>Certified R-squared (uncentred for the no-intercept files NoInt1 and NoInt2).</summary>
    public double RSquared { get; }

    /// <summary>Residual degrees of freedom from the certified ANOVA table.</summary>
    public int ResidualDegreesOfFreedom { get; }

    /// <summary>The response column.</summary>
    public ImmutableArray<double> Y { get; }

    /// <summary>The predictor columns (one for all files but Longley).</summary>
    public ImmutableArray<ImmutableArray<double>> Predictors { get; }

    /// <summary>The single predictor; throws for a file with several.</summary>
    public ImmutableArray<double> X => Predictors.Length == 1
        ? Predictors[0]
        : throw new InvalidOperationException(FileName + " has " + Predictors.Length.ToString(CultureInfo.InvariantCulture) + " predictors, not one.");

    /// <summary>Loads (once) <paramref name="fileName"/> from the linear folder, e.g. "Norris.dat".</summary>
    public static StrdFile Linear(string fileName) =>
        Cache.GetOrAdd(fileName, name => new Lazy<StrdFile>(() => Parse(name, Path.Combine(RepoPaths.NistStrd, "linear", name)))).Value;

    private static StrdFile Parse(string fileName, string path)
    {
        var lines = File.ReadAllLines(path);
        var header = string.Join('\n', lines.Take(10));
        var (certifiedFirst, certifiedLast) = LineRange(CertifiedRange(), header, fileName);
        var (dataFirst, dataLast) = LineRange(DataRange(), header, fileName);

        var parameters = ImmutableArray.CreateBuilder<StrdParameter>();
        double? residualSd = null, rSquared = null;
        int? residualDf = null;
        for (var n = certifiedFirst; n <= certifiedLast; n++)
        {
            var line = lines[n - 1];
            Match m;
            if ((m = ParameterRow().Match(line)).Success)
            {
                parameters.Add(new StrdParameter(
                    m.Groups[1].Value,
                    int.Parse(m.Groups[2].Value, NumberStyles.None, CultureInfo.InvariantCulture),
                    Number(m.Groups[3].Value),
                    Number(m.Groups[4].Value)));
            }
            else if ((m = ResidualSdRow().Match(line)).Success)
            {
                residualSd = Number(m.Groups[1].Value);
            }
            else if ((m = RSquaredRow().Match(line)).Success)
            {
                rSquared = Number(m.Groups[1].Value);
            }
            else if ((m = AnovaResidualRow().Match(line)).Success)
            {
                residualDf = int.Parse(m.Groups[1].Value, NumberStyles.None, CultureInfo.InvariantCulture);
            }
        }

        if (parameters.Count == 0 || residualSd is null || rSquared is null || residualDf is null)
        {
            throw new InvalidDataException(fileName + ": certified block incomplete.");
        }

        var rows = new List<double[]>();
        for (var n = dataFirst; n <= dataLast; n++)
        {
            rows.Add([.. lines[n - 1].Split((char[]?)null, StringSplitOptions.RemoveEmptyEntries).Select(Number)]);
        }

        var columns = rows[0].Length;
        if (columns < 2 || rows.Any(r => r.Length != columns))
        {
            throw new InvalidDataException(fileName + ": data rows are ragged or have no predictor.");
        }

        var observations = ObservationCount().Match(string.Join('\n', lines.Take(certifiedFirst - 1)));
        if (!observations.Success || int.Parse(observations.Groups[1].Value, NumberStyles.None, CultureInfo.InvariantCulture) != rows.Count)
        {
            throw new InvalidDataException(fileName + ": the data rows do not match the stated number of observations.");
        }

        ImmutableArray<double> Column(int c) => [.. rows.Select(r => r[c])];

        return new StrdFile(
            fileName,
            parameters.ToImmutable(),
            residualSd.Value,
            rSquared.Value,
            residualDf.Value,
            Column(0),
            [.. Enumerable.Range(1, columns - 1).Select(Column)]);
    }

    private static (int First, int Last) LineRange(Regex pattern, string header, string fileName)
    {
        var m = pattern.Match(header);
        if (!m.Success)
        {
            throw new InvalidDataException(fileName + ": header has no line range for " + pattern + ".");
        }

        return (int.Parse(m.Groups[1].Value, NumberStyles.None, CultureInfo.InvariantCulture),
                int.Parse(m.Groups[2].Value, NumberStyles.None, CultureInfo.InvariantCulture));
    }

    private static double Number(string text) => double.Parse(text, NumberStyles.Float, CultureInfo.InvariantCulture);

    [GeneratedRegex(@"Certified Values\s*\(lines\s+(\d+)\s+to\s+(\d+)\)")]
    private static partial Regex CertifiedRange();

    [GeneratedRegex(@"Data\s*\(lines\s+(\d+)\s+to\s+(\d+)\)")]
    private static partial Regex DataRange();

    [GeneratedRegex(@"^\s*(B(\d+))\s+(\S+)\s+(\S+)\s*$")]
    private static partial Regex ParameterRow();

    [GeneratedRegex(@"^\s*Standard Deviation\s+(\S+)\s*$")]
    private static partial Regex ResidualSdRow();

    [GeneratedRegex(@"^\s*R-Squared\s+(\S+)\s*$")]
    private static partial Regex RSquaredRow();

    [GeneratedRegex(@"^Residual\s+(\d+)\s")]
    private static partial Regex AnovaResidualRow();

    [GeneratedRegex(@"(\d+)\s+Observations")]
    private static partial Regex ObservationCount();
}
