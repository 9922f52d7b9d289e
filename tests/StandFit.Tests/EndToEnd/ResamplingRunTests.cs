using StandFit.Tests.Support;

namespace StandFit.Tests.EndToEnd;

/// <summary>
/// The demo units judged by `standfit run` (a separate process) under the demo recipes with a
/// resampling section and a BCa guard (KP-250 also with an inverse prediction, the pressure at
/// half scale, whose limit judges its resampled BCa interval): two runs give the same resampling
/// figures, to the last digit, and so do runs limited to one processor and to two
/// (DOTNET_PROCESSOR_COUNT sets the batch runner's parallelism).
/// </summary>
public sealed class ResamplingRunTests
{
    private static readonly TimeSpan Timeout = TimeSpan.FromMinutes(3);

    private const string Resampling = """

        resampling:
          seed: 12345
          bootstrap: pairs
          resamples: 1000
          max_failed_percent: 5
        """;

    [Fact]
    public async Task Runs_of_the_same_files_with_one_and_two_threads_give_identical_resampling_figures()
    {
        var first = await RunAsync(null);
        var again = await RunAsync(null);
        var one = await RunAsync("1");
        var two = await RunAsync("2");
        Assert.NotEmpty(first);
        Assert.Contains(first, row => row.Contains("bca", StringComparison.Ordinal));
        // A KP-250 row names half_scale five times: by jackknife, percentile, basic and BCa, and in its limit's result.
        Assert.Contains(first, row => row.Split("half_scale").Length - 1 == 5 && row.Contains("bootstrap-bca", StringComparison.Ordinal));
        Assert.Equal(first, again);
        Assert.Equal(first, one);
        Assert.Equal(first, two);
    }

    /// <summary>One run over the demo folder (read in place); each unit's resampling columns, rulings and limit results as text, in file order.</summary>
    private static async Task<List<string>> RunAsync(string? processors)
    {
        using var root = new TempFolder();
        var recipes = root.Sub("recipes");
        foreach (var file in Directory.EnumerateFiles(RepoPaths.InRepo("config", "recipes"), "*.yaml"))
        {
            var text = File.ReadAllText(file).Replace("  rule: guarded", "  rule: guarded\n  interval: bootstrap-bca", StringComparison.Ordinal);
            if (Path.GetFileName(file) == "kp-250.yaml")
            {
                // 25 mV of 0..50 mV: (25 - offset) / gain = 125 kPa for a nominal unit.
                text = text.Replace("\nlimits:\n", "\nderived:\n  half_scale: { inverse_at: 25.0 }\nlimits:\n  half_scale: { min: 124, max: 126 }\n", StringComparison.Ordinal);
            }

            File.WriteAllText(Path.Combine(recipes, Path.GetFileName(file)), text + Resampling);
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
        var outcome = await StandFitProcess.RunAsync(root.Path, Timeout, environment, "run", "--config", config, "--from", DemoSet.Folder, "--quiet");
        Assert.True(outcome.ExitCode == 0, outcome.Output + outcome.Error);
        var glob = Path.Combine(root.Path, "output", "summaries", "**", "*.parquet");
        return [.. Duck.Query($"""
            SELECT source_file || ' ' || ruling || ' ' || coalesce(resampling_stream, '-') || ' ' || coalesce(CAST(resampling_failed AS VARCHAR), '-') || ' '
                   || CAST(resampling AS VARCHAR) || ' ' || CAST(limit_results AS VARCHAR) AS line
            FROM read_parquet({Duck.Literal(glob)})
            ORDER BY source_file
            """).Select(r => (string)r["line"]!)];
    }
}
