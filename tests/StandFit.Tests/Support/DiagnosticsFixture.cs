using System.Collections.Immutable;
using System.Globalization;
using StandFit.Core.Diagnostics;
using StandFit.Core.Fitting;
using StandFit.Core.Ingest;
using StandFit.Core.Merit;

namespace StandFit.Tests.Support;

/// <summary>
/// The R reference values of tests/StandFit.Tests/Fixtures/diagnostics (made once by
/// make-fixtures.R beside them; R and package versions in each file's first line): datasets.csv says
/// where each data set comes from and how it is fitted, diagnostics-fixture.csv holds the values
/// (dataset, quantity, index, value; index 0 for a single value, 1-based along a vector).
/// </summary>
public sealed class DiagnosticsFixture
{
    private static readonly Lazy<DiagnosticsFixture> Shared = new(Load);

    private readonly Dictionary<(string Dataset, string Quantity), SortedDictionary<int, double>> _values;

    private DiagnosticsFixture(ImmutableArray<DataSet> datasets, Dictionary<(string, string), SortedDictionary<int, double>> values, string header)
    {
        DataSets = datasets;
        _values = values;
        Header = header;
    }

    public static DiagnosticsFixture Instance => Shared.Value;

    public static string Folder => RepoPaths.InRepo("tests", "StandFit.Tests", "Fixtures", "diagnostics");

    public ImmutableArray<DataSet> DataSets { get; }

    /// <summary>The first line of the values file: the R and package versions.</summary>
    public string Header { get; }

    public DataSet this[string name] => DataSets.Single(d => d.Name == name);

    public bool Has(string dataset, string quantity) => _values.ContainsKey((dataset, quantity));

    public double Value(string dataset, string quantity) => _values[(dataset, quantity)][0];

    public double[] Vector(string dataset, string quantity) => [.. _values[(dataset, quantity)].Values];

    /// <summary>One data set: its points (in acquisition order, with legs), the model fitted and the options of the diagnostics.</summary>
    public sealed record DataSet(string Name, string Source, int Degree, bool Intercept, double Tolerance, NominalLine? Nominal)
    {
        private readonly Lazy<(FitResult Fit, ImmutableArray<Leg> Legs)> _fit = new(() => FitOf(Source, Degree, Intercept));

        public FitResult Fit => _fit.Value.Fit;

        public ImmutableArray<Leg> Legs => _fit.Value.Legs;

        public DiagnosticsOptions Options => new() { SetPointTolerance = Tolerance, Nominal = Nominal };

        public ResidualDiagnostics Diagnostics() => ResidualDiagnostics.Compute(Fit, Legs.AsSpan(), Options);

        public override string ToString() => Name;
    }

    private static (FitResult, ImmutableArray<Leg>) FitOf(string source, int degree, bool intercept)
    {
        ImmutableArray<double> x, y;
        ImmutableArray<Leg> legs;
        if (source.StartsWith("nist-strd/linear/", StringComparison.Ordinal))
        {
            var file = StrdFile.Linear(source["nist-strd/linear/".Length..]);
            (x, y) = (file.X, file.Y);
            legs = [.. Enumerable.Repeat(Leg.Unknown, x.Length)];
        }
        else if (source.StartsWith("sample-runs/", StringComparison.Ordinal))
        {
            var path = RepoPaths.InRepo([.. source.Split('/')]);
            var table = SweepTextParser.Parse(Path.GetFileName(path), File.ReadAllText(path)).Value;
            var kp = source.Contains("KP250", StringComparison.Ordinal);
            var columns = kp ? new ColumnMap("pressure_kPa", "output_mV", "leg", "step") : new ColumnMap("force_kN", "output_mVV", "leg", "step");
            var sweep = SweepAssembler.Assemble(table, columns).Value;
            (x, y, legs) = (sweep.Stimulus, sweep.Output, sweep.Legs);
        }
        else
        {
            var rows = File.ReadAllLines(Path.Combine(Folder, source)).Skip(1).Select(l => l.Split(',')).ToList();
            x = [.. rows.Select(r => Number(r[0]))];
            y = [.. rows.Select(r => Number(r[1]))];
            legs = [.. Enumerable.Repeat(Leg.Unknown, x.Length)];
        }

        var result = LeastSquaresFitter.Fit(Polynomial.OfDegree(degree, intercept), x, y, source);
        Assert.True(result.IsSuccess, source + " could not be fitted.");
        return (result.Value, legs);
    }

    private static DiagnosticsFixture Load()
    {
        var header = File.ReadLines(Path.Combine(Folder, "diagnostics-fixture.csv")).First();
        var datasets = Rows("datasets.csv")
            .Select(r => new DataSet(
                r["dataset"],
                r["source"],
                int.Parse(r["degree"], CultureInfo.InvariantCulture),
                r["intercept"] == "TRUE",
                Number(r["tolerance"]),
                r["nominal_gain"].Length == 0 ? null : new NominalLine(Number(r["nominal_offset"]), Number(r["nominal_gain"]))))
            .ToImmutableArray();
        var values = new Dictionary<(string, string), SortedDictionary<int, double>>();
        foreach (var r in Rows("diagnostics-fixture.csv"))
        {
            var key = (r["dataset"], r["quantity"]);
            if (!values.TryGetValue(key, out var entries))
            {
                values[key] = entries = [];
            }

            entries[int.Parse(r["index"], CultureInfo.InvariantCulture)] = Number(r["value"]);
        }

        return new DiagnosticsFixture(datasets, values, header);
    }

    private static IEnumerable<Dictionary<string, string>> Rows(string file)
    {
        var lines = File.ReadAllLines(Path.Combine(Folder, file)).Where(l => !l.StartsWith('#') && l.Length > 0).ToList();
        var names = lines[0].Split(',');
        foreach (var line in lines.Skip(1))
        {
            var cells = line.Split(',');
            yield return names.Select((n, i) => (n, cells[i])).ToDictionary(p => p.n, p => p.Item2, StringComparer.Ordinal);
        }
    }

    private static double Number(string text) => double.Parse(text, NumberStyles.Float, CultureInfo.InvariantCulture);
}
