using System.Collections.Concurrent;
using System.Collections.Immutable;
using System.Globalization;
using System.Text.RegularExpressions;

namespace StandFit.Tests.Support;

/// <summary>
/// One parameter row of a StRD nonlinear file: name (b1, b2 ...), the two start values, the
/// certified estimate and its certified standard deviation.
/// </summary>
public sealed record StrdNonlinearParameter(string Name, double Start1, double Start2, double Estimate, double StandardDeviation)
{
    public double Start(int which) => which switch
    {
        1 => Start1,
        2 => Start2,
        _ => throw new ArgumentOutOfRangeException(nameof(which), which, "NIST gives Start 1 and Start 2."),
    };
}

/// <summary>
/// A NIST StRD nonlinear-regression file (the copies in <c>../shared/reference/nist-strd/nonlinear</c>),
/// parsed from the line ranges its header states: "Starting Values (lines X to Y)", "Certified
/// Values (lines X to Y)" and "Data (lines X to Y)". Parameter rows read
/// <c>b1 = start1 start2 estimate sd</c>; the certified block also gives the residual sum of
/// squares, the residual standard deviation, the degrees of freedom and the number of
/// observations. Data rows are y first, then the predictors. Files are parsed once and cached.
/// </summary>
public sealed partial class StrdNonlinearFile
{
    /// <summary>Significant digits NIST prints the nonlinear certified values to: the LRE cap.</summary>
    public const int CertifiedDigits = 11;

    private static readonly ConcurrentDictionary<string, Lazy<StrdNonlinearFile>> Cache = new(StringComparer.Ordinal);

    private StrdNonlinearFile(
        string fileName,
        ImmutableArray<StrdNonlinearParameter> parameters,
        double residualSumOfSquares,
        double residualSd,
        int statedDegreesOfFreedom,
        string difficulty,
        ImmutableArray<double> y,
        ImmutableArray<ImmutableArray<double>> predictors)
    {
        FileName = fileName;
        Difficulty = difficulty;
        Parameters = parameters;
        ResidualSumOfSquares = residualSumOfSquares;
        ResidualSd = residualSd;
        StatedDegreesOfFreedom = statedDegreesOfFreedom;
        Y = y;
        Predictors = predictors;
    }

    public string FileName { get; }

    /// <summary>NIST's rating of how hard the file is to converge on: lower, average or higher.</summary>
    public string Difficulty { get; }

    /// <summary>The certified parameters in file order (b1 first).</summary>
    public ImmutableArray<StrdNonlinearParameter> Parameters { get; }

    public double ResidualSumOfSquares { get; }

    public double ResidualSd { get; }

    /// <summary>The degrees of freedom the file states (Rat43 states 9 for 15 points and 4 parameters; see the README).</summary>
    public int StatedDegreesOfFreedom { get; }

    /// <summary>The response column.</summary>
    public ImmutableArray<double> Y { get; }

    /// <summary>The predictor columns (two for Nelson, one for the others).</summary>
    public ImmutableArray<ImmutableArray<double>> Predictors { get; }

    /// <summary>The start vector Start 1 or Start 2.</summary>
    public ImmutableArray<double> Start(int which) => [.. Parameters.Select(p => p.Start(which))];

    /// <summary>Loads (once) <paramref name="fileName"/> from the nonlinear folder, e.g. "Misra1a.dat".</summary>
    public static StrdNonlinearFile Load(string fileName) =>
        Cache.GetOrAdd(fileName, name => new Lazy<StrdNonlinearFile>(() => Parse(name, Path.Combine(RepoPaths.NistStrd, "nonlinear", name)))).Value;

    /// <summary>The file names in the nonlinear folder, in ordinal order.</summary>
    public static IReadOnlyList<string> AllFileNames() =>
        [.. Directory.EnumerateFiles(Path.Combine(RepoPaths.NistStrd, "nonlinear"), "*.dat").Select(f => Path.GetFileName(f)!).Order(StringComparer.Ordinal)];

    private static StrdNonlinearFile Parse(string fileName, string path)
    {
        var lines = File.ReadAllLines(path);
        var header = string.Join('\n', lines.Take(10));
        var (startFirst, startLast) = LineRange(StartRange(), header, fileName);
        var (certifiedFirst, certifiedLast) = LineRange(CertifiedRange(), header, fileName);
        var (dataFirst, dataLast) = LineRange(DataRange(), header, fileName);

        var parameters = ImmutableArray.CreateBuilder<StrdNonlinearParameter>();
        for (var n = startFirst; n <= startLast; n++)
        {
            var m = ParameterRow().Match(lines[n - 1]);
            if (!m.Success)
            {
                throw new InvalidDataException(fileName + ": line " + n.ToString(CultureInfo.InvariantCulture) + " is not a parameter row.");
            }

            parameters.Add(new StrdNonlinearParameter(m.Groups[1].Value, Number(m.Groups[2].Value), Number(m.Groups[3].Value), Number(m.Groups[4].Value), Number(m.Groups[5].Value)));
        }

        double? rss = null, sd = null;
        int? df = null, observations = null;
        for (var n = certifiedFirst; n <= certifiedLast; n++)
        {
            var line = lines[n - 1];
            Match m;
            if ((m = RssRow().Match(line)).Success)
            {
                rss = Number(m.Groups[1].Value);
            }
            else if ((m = SdRow().Match(line)).Success)
            {
                sd = Number(m.Groups[1].Value);
            }
            else if ((m = DfRow().Match(line)).Success)
            {
                df = int.Parse(m.Groups[1].Value, NumberStyles.None, CultureInfo.InvariantCulture);
            }
            else if ((m = ObservationsRow().Match(line)).Success)
            {
                observations = int.Parse(m.Groups[1].Value, NumberStyles.None, CultureInfo.InvariantCulture);
            }
        }

        if (parameters.Count == 0 || rss is null || sd is null || df is null || observations is null)
        {
            throw new InvalidDataException(fileName + ": certified block incomplete.");
        }

        var rows = new List<double[]>();
        for (var n = dataFirst; n <= dataLast; n++)
        {
            rows.Add([.. lines[n - 1].Split((char[]?)null, StringSplitOptions.RemoveEmptyEntries).Select(Number)]);
        }

        var columns = rows[0].Length;
        if (columns < 2 || rows.Any(r => r.Length != columns) || rows.Count != observations)
        {
            throw new InvalidDataException(fileName + ": data rows are ragged, have no predictor, or do not match the stated number of observations.");
        }

        var difficulty = DifficultyLine().Match(string.Join('\n', lines.Take(certifiedFirst - 1)));
        if (!difficulty.Success)
        {
            throw new InvalidDataException(fileName + ": the header states no level of difficulty.");
        }

        ImmutableArray<double> Column(int c) => [.. rows.Select(r => r[c])];

        return new StrdNonlinearFile(
            fileName,
            parameters.ToImmutable(),
            rss.Value,
            sd.Value,
            df.Value,
            difficulty.Groups[1].Value.ToLowerInvariant(),
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

    [GeneratedRegex(@"Starting Values\s*\(lines\s+(\d+)\s+to\s+(\d+)\)")]
    private static partial Regex StartRange();

    [GeneratedRegex(@"Certified Values\s*\(lines\s+(\d+)\s+to\s+(\d+)\)")]
    private static partial Regex CertifiedRange();

    [GeneratedRegex(@"Data\s*\(lines\s+(\d+)\s+to\s+(\d+)\)")]
    private static partial Regex DataRange();

    [GeneratedRegex(@"^\s*(b\d+)\s*=\s*(\S+)\s+(\S+)\s+(\S+)\s+(\S+)\s*$")]
    private static partial Regex ParameterRow();

    [GeneratedRegex(@"^\s*Residual Sum of Squares:\s+(\S+)\s*$")]
    private static partial Regex RssRow();

    [GeneratedRegex(@"^\s*Residual Standard Deviation:\s+(\S+)\s*$")]
    private static partial Regex SdRow();

    [GeneratedRegex(@"^\s*Degrees of Freedom:\s+(\d+)\s*$")]
    private static partial Regex DfRow();

    [GeneratedRegex(@"(Lower|Average|Higher) Level of Difficulty")]
    private static partial Regex DifficultyLine();

    [GeneratedRegex(@"^\s*Number of Observations:\s+(\d+)\s*$")]
    private static partial Regex ObservationsRow();
}
