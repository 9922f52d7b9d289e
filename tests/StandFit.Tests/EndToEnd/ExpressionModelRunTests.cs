using System.Collections;
using System.Globalization;
using System.Text;
using StandFit.Tests.Support;

namespace StandFit.Tests.EndToEnd;

/// <summary>
/// A recipe with a three-parameter nonlinear model (a saturating sensor, output = y0 + span (1 -
/// exp(-x / tau))) over generated 41-point sweeps, judged by `standfit run` as a separate process
/// and read back from the Parquet with DuckDB: the rulings follow the units' own curves, the
/// inverse prediction is judged as a limit, and a unit whose output does not saturate (its search
/// runs away along tau and reaches the recipe's iteration limit) is rejected with fit.not_converged.
/// </summary>
public sealed class ExpressionModelRunTests : IClassFixture<ExpressionModelRunTests.Run>
{
    private static readonly TimeSpan Timeout = TimeSpan.FromMinutes(3);

    private const string RecipeText = """
        recipe: SX-40 saturating sensor
        version: "2026.12-a"
        parts: [SX-40]
        columns:
          stimulus: stimulus_pct
          output: output_V
          leg: leg
          order: step
        units:
          stimulus: "%"
          output: V
        model:
          type: expression
          expression: y0 + span*(1 - exp(-x/tau))
          parameters:
            y0: { start: 0, unit: V }
            span: { start: 3, unit: V }
            tau: { start: 20, min: 1, unit: "%" }
          max_iterations: 12
        confidence: 0.95
        decision:
          rule: guarded
        sweep:
          min_points: 41
        derived:
          at_3V: { inverse_at: 3.0 }
          mid: { band_at: 50 }
        limits:
          span: { min: 3.9, max: 4.1 }
          tau: { min: 27, max: 33 }
          at_3V: { min: 26, max: 33 }
          residual_sd: { max: 0.01, rule: simple }
        gates:
          runs_test:
            p_min: 0.01
        """;

    /// <summary>The generated units: the file, the curve's true y0, span and tau (tau 0: a straight line of slope 0.04 V/%), and the expected ruling and first reason.</summary>
    private static readonly (string File, double Y0, double Span, double Tau, string Ruling, string Reason)[] Units =
    [
        ("SX40-0001.csv", 0.50, 4.00, 30.0, "pass", "span.within_limits"),
        ("SX40-0002.csv", 0.48, 3.98, 29.0, "pass", "span.within_limits"),
        ("SX40-0003.csv", 0.52, 4.03, 31.5, "pass", "span.within_limits"),
        ("SX40-0004.csv", 0.50, 4.40, 30.0, "fail", "span.above_limit"),
        ("SX40-0005.csv", 0.50, 4.00, 33.0, "retest", "tau.straddles_limit"),
        ("SX40-0006.csv", 0.50, 0.00, 0.0, "rejected", "fit.not_converged"),
    ];

    private readonly Run _run;

    public ExpressionModelRunTests(Run run) => _run = run;

    [Fact]
    public void The_run_exits_with_zero_and_counts_the_rulings()
    {
        Assert.True(_run.Outcome.ExitCode == 0, _run.Outcome.Output + _run.Outcome.Error);
        Assert.Contains("6 units: 3 pass, 1 fail, 1 retest, 1 rejected", _run.Outcome.Output, StringComparison.Ordinal);
    }

    [Fact]
    public void Every_unit_has_its_expected_ruling_and_reason()
    {
        var rows = _run.Query("SELECT source_file, ruling, reason_codes FROM summary ORDER BY source_file");
        Assert.Equal(Units.Length, rows.Count);
        foreach (var (file, _, _, _, ruling, reason) in Units)
        {
            var row = Assert.Single(rows, r => (string)r["source_file"]! == file);
            var codes = ((IEnumerable)row["reason_codes"]!).Cast<string>().ToList();
            Assert.True(ruling == (string)row["ruling"]!, $"{file}: ruling {row["ruling"]} [{string.Join(", ", codes)}], expected {ruling}");
            Assert.Contains(reason, codes);
        }
    }

    [Fact]
    public void A_unit_whose_search_does_not_converge_is_rejected_with_its_status_iterations_and_stop_reason_and_no_numbers()
    {
        var row = Assert.Single(_run.Query("SELECT * FROM summary WHERE source_file = 'SX40-0006.csv'"));

        Assert.Equal("rejected", row["ruling"]);
        Assert.Equal(["fit.not_converged"], ((IEnumerable)row["reason_codes"]!).Cast<string>());
        var reason = ((IEnumerable)row["reasons"]!).Cast<string>().Single();
        Assert.Contains("max-iterations after 12 iterations", reason, StringComparison.Ordinal);
        Assert.Equal("max-iterations", row["fit_status"]);
        Assert.Equal(12, Convert.ToInt32(row["fit_iterations"], CultureInfo.InvariantCulture));
        Assert.StartsWith("did not converge", (string)row["fit_stop_reason"]!, StringComparison.Ordinal);
        Assert.Empty((IEnumerable)row["parameters"]!);
        Assert.Empty((IEnumerable)row["curve"]!);
        Assert.Null(row["residual_sd"]);
        Assert.Null(row["r_squared"]);
        Assert.Single(Directory.EnumerateFiles(_run.Rejected, "SX40-0006.csv.rejected.txt", SearchOption.AllDirectories));
    }

    [Fact]
    public void A_converged_unit_has_its_estimates_covariance_curve_figures_and_search_in_its_row()
    {
        var row = Assert.Single(_run.Query("""
            SELECT model, df, fit_status, fit_iterations, len(covariance) AS ncov, correlation[5] AS corr_span,
                   list_extract(parameters, 3).name AS third, list_extract(parameters, 3).estimate AS tau,
                   list_extract(curve, 1).status AS inverse_status, list_extract(curve, 1).value AS x_at_3V,
                   list_extract(curve, 1).interval_low AS low, list_extract(curve, 1).interval_high AS high,
                   list_extract(curve, 2).prediction_high - list_extract(curve, 2).prediction_low AS band
            FROM summary WHERE source_file = 'SX40-0001.csv'
            """));

        Assert.Equal("expression(y0 + span*(1 - exp(-x/tau)))", row["model"]);
        Assert.Equal(38, Convert.ToInt32(row["df"], CultureInfo.InvariantCulture));
        Assert.StartsWith("converged-", (string)row["fit_status"]!, StringComparison.Ordinal);
        Assert.InRange(Convert.ToInt32(row["fit_iterations"], CultureInfo.InvariantCulture), 1, 12);
        Assert.Equal(9L, Convert.ToInt64(row["ncov"], CultureInfo.InvariantCulture));
        Assert.Equal(1.0, (double)row["corr_span"]!);
        Assert.Equal("tau", row["third"]);
        Assert.InRange((double)row["tau"]!, 29.5, 30.5);
        Assert.Equal("ok", row["inverse_status"]);

        // The unit's true curve reaches 3 V at x = 30 ln(4 / 1.5) = 29.4249 % (its generator, below).
        var x = (double)row["x_at_3V"]!;
        Assert.InRange(x, 29.3, 29.55);
        Assert.True((double)row["low"]! < x && x < (double)row["high"]!);
        Assert.InRange((double)row["band"]!, 0.005, 0.02);
    }

    /// <summary>The 41-point up-and-down sweep of one unit: the stimulus 0 to 100 % and back in 5 % steps, the output its curve plus seeded normal noise of SD 2 mV.</summary>
    internal static string SweepText(int index, double y0, double span, double tau)
    {
        var random = new SplitMix(20261204UL + (ulong)index);
        var text = new StringBuilder();
        text.Append(CultureInfo.InvariantCulture, $"# serial: SX40-{index:D4}\n# part: SX-40\n# station: EOL-9\n# test start: 2026-12-04T08:{index:D2}:00Z\nstep,leg,stimulus_pct,output_V\n");
        for (var step = 0; step < 41; step++)
        {
            var up = step <= 20;
            var x = 5.0 * (up ? step : 40 - step);
            var curve = tau > 0 ? y0 + (span * (1 - Math.Exp(-x / tau))) : y0 + (0.04 * x);
            var noise = 0.002 * Math.Sqrt(-2 * Math.Log(1 - random.NextDouble())) * Math.Cos(2 * Math.PI * random.NextDouble());
            text.Append(CultureInfo.InvariantCulture, $"{step + 1},{(up ? "up" : "down")},{x:F3},{curve + noise:F5}\n");
        }

        return text.ToString();
    }

    /// <summary>One run over the generated units (read in place), shared by the facts above.</summary>
    public sealed class Run : IAsyncLifetime, IDisposable
    {
        private readonly TempFolder _root = new();

        public StandFitProcess.Outcome Outcome { get; private set; } = new(-1, "", "");

        public string Rejected => Path.Combine(_root.Path, "rejected");

        private string SummaryGlob => Path.Combine(_root.Path, "output", "summaries", "**", "*.parquet");

        /// <summary>The query with <c>summary</c> standing for the run's summary rows.</summary>
        public List<Dictionary<string, object?>> Query(string sql) =>
            Duck.Query(sql.Replace("FROM summary", $"FROM read_parquet({Duck.Literal(SummaryGlob)}, hive_partitioning = true)", StringComparison.Ordinal));

        public async Task InitializeAsync()
        {
            var recipes = _root.Sub("recipes");
            File.WriteAllText(Path.Combine(recipes, "sx-40.yaml"), RecipeText + "\n");
            var sweeps = _root.Sub("sweeps");
            for (var i = 0; i < Units.Length; i++)
            {
                var (file, y0, span, tau, _, _) = Units[i];
                File.WriteAllText(Path.Combine(sweeps, file), SweepText(i + 1, y0, span, tau));
            }

            var config = _root.File("standfit.yaml", """
                folders:
                  inbox: inbox
                  archive: archive
                  rejected: rejected
                  output: output
                  recipes: recipes
                  logs: logs
                """);
            Outcome = await StandFitProcess.RunAsync(_root.Path, Timeout, "run", "--config", config, "--from", sweeps);
        }

        public Task DisposeAsync() => Task.CompletedTask;

        public void Dispose() => _root.Dispose();
    }
}
