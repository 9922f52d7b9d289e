using System.Globalization;
using StandFit.Tests.Support;

namespace StandFit.Tests.EndToEnd;

/// <summary>
/// A recipe with a three-parameter expression model (the saturating sensor of
/// <see cref="ExpressionModelRunTests"/>, its sweeps generated the same way) and a resampling
/// section with a BCa guard, judged by `standfit run` as a separate process and read back from the
/// Parquet with DuckDB: every converged unit has its resampling columns filled from refits, limits
/// judge the refitted BCa intervals of a parameter and of an inverse prediction (the stimulus at
/// which each refitted curve gives 3 V), and two runs of the same files give the same rows, every
/// resampling number the same bit for bit, and so do runs limited to one processor and to two
/// (DOTNET_PROCESSOR_COUNT sets the batch runner's parallelism).
/// </summary>
public sealed class ExpressionResamplingRunTests
{
    private static readonly TimeSpan Timeout = TimeSpan.FromMinutes(3);

    private const string RecipeText = """
        recipe: SX-40 saturating sensor
        version: "2026.12-b"
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
          interval: bootstrap-bca
        sweep:
          min_points: 41
        derived:
          slope_0: { sensitivity_at: 0 }
          mid: { band_at: 50 }
          at_3V: { inverse_at: 3.0 }
        limits:
          span: { min: 3.9, max: 4.1 }
          tau: { min: 27, max: 33 }
          at_3V: { min: 27, max: 33 }
        resampling:
          seed: 20261205
          bootstrap: pairs
          resamples: 1000
          jackknife: delete-leg
          max_failed_percent: 5
        """;

    /// <summary>The units: file, true y0, span and tau (tau 0: a straight line, whose search does not converge).</summary>
    private static readonly (string File, double Y0, double Span, double Tau)[] Units =
    [
        ("SX40-0001.csv", 0.50, 4.00, 30.0),
        ("SX40-0002.csv", 0.48, 3.98, 29.0),
        ("SX40-0003.csv", 0.52, 4.03, 31.5),
        ("SX40-0004.csv", 0.50, 4.40, 30.0),
        ("SX40-0005.csv", 0.50, 4.00, 33.0),
        ("SX40-0006.csv", 0.50, 0.00, 0.0),
    ];

    [Fact]
    public async Task Runs_of_the_same_files_fill_the_resampling_columns_and_give_identical_figures_with_one_and_two_threads()
    {
        var first = await RunAsync(null);
        var again = await RunAsync(null);
        var one = await RunAsync("1");
        var two = await RunAsync("2");

        // Every converged unit: a stream, 1000 resamples of which none failed, the six figures by
        // jackknife (delete-leg, 2 deletions), percentile, basic and BCa; the rejected unit none.
        var rows = first.Rows;
        Assert.Equal(Units.Length, rows.Count);
        foreach (var row in rows.Where(r => (string)r["source_file"]! != "SX40-0006.csv"))
        {
            var file = (string)row["source_file"]!;
            Assert.Matches("^[0-9a-f]{16}$", (string)row["resampling_stream"]!);
            Assert.Equal("pairs", row["resampling_scheme"]);
            Assert.Equal(1000, Convert.ToInt32(row["resampling_resamples"], CultureInfo.InvariantCulture));
            Assert.Equal(0, Convert.ToInt32(row["resampling_failed"], CultureInfo.InvariantCulture));
            Assert.Equal(6 * 4, Convert.ToInt32(row["n_resampling"], CultureInfo.InvariantCulture));
            Assert.True((string)row["span_interval"]! == "bootstrap-bca", file);

            // The inverse prediction's limit judged its resampled BCa interval, which the row carries.
            Assert.True((string)row["at_3V_interval"]! == "bootstrap-bca", file);
            Assert.Equal(4, Convert.ToInt32(row["n_at_3V"], CultureInfo.InvariantCulture));
            Assert.True((double)row["at_3V_bca_low"]! < (double)row["at_3V_estimate"]! && (double)row["at_3V_estimate"]! < (double)row["at_3V_bca_high"]!, file);
        }

        var rejected = Assert.Single(rows, r => (string)r["source_file"]! == "SX40-0006.csv");
        Assert.Equal("rejected", rejected["ruling"]);
        Assert.Null(rejected["resampling_stream"]);
        Assert.Equal(0, Convert.ToInt32(rejected["n_resampling"], CultureInfo.InvariantCulture));

        // A unit well inside its limits passes on the refitted BCa intervals; span 4.40 fails it (and
        // reaches 3 V at x = -30 ln(1 - 2.5/4.4) = 25.2 %, below the at_3V limit too).
        Assert.Equal("pass", Assert.Single(rows, r => (string)r["source_file"]! == "SX40-0001.csv")["ruling"]);
        Assert.Equal("below", Assert.Single(rows, r => (string)r["source_file"]! == "SX40-0004.csv")["at_3V_zone"]);
        // y0 + span (1 - exp(-x/tau)) = 3 V at x = -tau ln(1 - (3 - y0)/span) = 29.42 % for SX40-0001 (closed form).
        Assert.Equal(-30.0 * Math.Log(1 - (2.5 / 4.0)), (double)Assert.Single(rows, r => (string)r["source_file"]! == "SX40-0001.csv")["at_3V_estimate"]!, 0.3);
        Assert.Equal("fail", Assert.Single(rows, r => (string)r["source_file"]! == "SX40-0004.csv")["ruling"]);

        Assert.NotEmpty(first.Numbers);
        Assert.Equal(first.Text, again.Text);
        Assert.Equal(first.Numbers, again.Numbers);
        Assert.Equal(first.Text, one.Text);
        Assert.Equal(first.Numbers, one.Numbers);
        Assert.Equal(first.Text, two.Text);
        Assert.Equal(first.Numbers, two.Numbers);
    }

    /// <summary>
    /// One run over the generated units (read in place): the rows; each unit's ruling, reasons,
    /// stream and resampling and limit columns as text; and every number of the resampling list
    /// as its 64 bits, in file, figure and method order.
    /// </summary>
    private static async Task<(List<Dictionary<string, object?>> Rows, List<string> Text, List<long> Numbers)> RunAsync(string? processors)
    {
        using var root = new TempFolder();
        File.WriteAllText(Path.Combine(root.Sub("recipes"), "sx-40.yaml"), RecipeText + "\n");
        var sweeps = root.Sub("sweeps");
        for (var i = 0; i < Units.Length; i++)
        {
            var (file, y0, span, tau) = Units[i];
            File.WriteAllText(Path.Combine(sweeps, file), ExpressionModelRunTests.SweepText(i + 1, y0, span, tau));
        }

        var config = root.File("standfit.yaml", """
            folders:
              inbox: inbox
              archive: archive
              rejected: rejected
              output: output
              recipes: recipes
              logs: logs
            """);
        var environment = processors is null ? null : new Dictionary<string, string> { ["DOTNET_PROCESSOR_COUNT"] = processors };
        var outcome = await StandFitProcess.RunAsync(root.Path, Timeout, environment, "run", "--config", config, "--from", sweeps, "--quiet");
        Assert.True(outcome.ExitCode == 0, outcome.Output + outcome.Error);
        var table = $"read_parquet({Duck.Literal(Path.Combine(root.Path, "output", "summaries", "**", "*.parquet"))})";
        var rows = Duck.Query($"""
            SELECT source_file, ruling, resampling_stream, resampling_scheme, resampling_resamples, resampling_failed,
                   len(resampling) AS n_resampling,
                   list_extract(list_filter(limit_results, l -> l.figure = 'span'), 1).interval AS span_interval,
                   list_extract(list_filter(limit_results, l -> l.figure = 'at_3V'), 1).interval AS at_3V_interval,
                   list_extract(list_filter(limit_results, l -> l.figure = 'at_3V'), 1).zone AS at_3V_zone,
                   len(list_filter(resampling, r -> r.figure = 'at_3V')) AS n_at_3V,
                   list_extract(list_filter(resampling, r -> r.figure = 'at_3V' AND r.method = 'bca'), 1).estimate AS at_3V_estimate,
                   list_extract(list_filter(resampling, r -> r.figure = 'at_3V' AND r.method = 'bca'), 1).ci_low AS at_3V_bca_low,
                   list_extract(list_filter(resampling, r -> r.figure = 'at_3V' AND r.method = 'bca'), 1).ci_high AS at_3V_bca_high
            FROM {table} ORDER BY source_file
            """);
        var text = Duck.Query($"""
            SELECT source_file || ' ' || ruling || ' ' || CAST(reason_codes AS VARCHAR) || ' ' || coalesce(resampling_stream, '-') || ' '
                   || coalesce(CAST(resampling_failed AS VARCHAR), '-') || ' ' || CAST(resampling AS VARCHAR) || ' ' || CAST(limit_results AS VARCHAR) AS line
            FROM {table} ORDER BY source_file
            """).Select(r => (string)r["line"]!).ToList();
        var numbers = new List<long>();
        foreach (var r in Duck.Query($"""
            SELECT source_file, u.estimate, u.bias_corrected, u.bias, u.se, u.ci_low, u.ci_high
            FROM (SELECT source_file, unnest(resampling) AS u FROM {table}) ORDER BY source_file, u.figure, u.method
            """))
        {
            foreach (var column in new[] { "estimate", "bias_corrected", "bias", "se", "ci_low", "ci_high" })
            {
                numbers.Add(r[column] is double value ? BitConverter.DoubleToInt64Bits(value) : long.MinValue);
            }
        }

        return (rows, text, numbers);
    }
}
