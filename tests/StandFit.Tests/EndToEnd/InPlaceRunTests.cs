using System.Security.Cryptography;
using StandFit.Tests.Support;

namespace StandFit.Tests.EndToEnd;

/// <summary>`standfit run --from DIR` reads a folder in place (the demo, an archive being re-judged).</summary>
public sealed class InPlaceRunTests
{
    private static readonly TimeSpan Timeout = TimeSpan.FromMinutes(3);

    [Fact]
    public async Task Running_in_place_twice_leaves_the_inputs_untouched_and_gives_the_same_figures()
    {
        using var root = new TempFolder();
        var source = root.Sub("source");
        DemoSet.CopyInto(source);
        var before = Fingerprint(source);

        using var first = new TempFolder();
        using var second = new TempFolder();
        var a = await StandFitProcess.RunAsync(first.Path, Timeout, "run", "--config", DemoSet.WriteConfig(first), "--from", source, "--quiet");
        var b = await StandFitProcess.RunAsync(second.Path, Timeout, "run", "--config", DemoSet.WriteConfig(second), "--from", source, "--quiet");
        Assert.Equal(0, a.ExitCode);
        Assert.Equal(0, b.ExitCode);
        Assert.Equal(before, Fingerprint(source));

        // Every figure but the processing time is the same, bit for bit.
        const string Columns = "unit_key, serial, ruling, reason_codes, reasons, parameters, residual_sd, r_squared, runs_z, runs_p, condition_number";
        string Glob(TempFolder f) => Duck.Literal(Path.Combine(f.Path, "output", "summaries", "**", "*.parquet"));
        var difference = Duck.Query($"SELECT count(*) AS n FROM ((SELECT {Columns} FROM read_parquet({Glob(first)}) EXCEPT SELECT {Columns} FROM read_parquet({Glob(second)})) UNION ALL (SELECT {Columns} FROM read_parquet({Glob(second)}) EXCEPT SELECT {Columns} FROM read_parquet({Glob(first)})))");
        Assert.Equal(0L, Convert.ToInt64(difference[0]["n"], System.Globalization.CultureInfo.InvariantCulture));
        var count = Duck.Query($"SELECT count(*) AS n FROM read_parquet({Glob(first)})");
        Assert.Equal((long)DemoSet.Expected.Count, Convert.ToInt64(count[0]["n"], System.Globalization.CultureInfo.InvariantCulture));
    }

    [Fact]
    public async Task Three_shards_into_one_output_folder_judge_every_demo_unit_exactly_once_as_one_run_would()
    {
        using var root = new TempFolder();
        var config = DemoSet.WriteConfig(root);
        var printed = new List<string>();
        for (var i = 0; i < 3; i++)
        {
            var outcome = await StandFitProcess.RunAsync(root.Path, Timeout, "run", "--config", config, "--from", DemoSet.Folder, "--shard", $"{i}/3");
            Assert.True(outcome.ExitCode == 0, outcome.Error);
            printed.Add(outcome.Output);
        }

        var glob = Duck.Literal(Path.Combine(root.Path, "output", "summaries", "**", "*.parquet"));
        var rows = Duck.Query($"SELECT source_file, ruling FROM read_parquet({glob})");
        Assert.Equal(DemoSet.Expected.Count, rows.Count);
        Assert.Equal(
            DemoSet.Expected.Select(e => (e.File, e.Ruling)).Order(),
            rows.Select(r => ((string)r["source_file"]!, (string)r["ruling"]!)).Order());

        // Every shard had work: the demo's 50 names do not all hash into one or two shards.
        Assert.All(printed, o => Assert.Contains(".csv", o, StringComparison.Ordinal));
    }

    [Fact]
    public async Task A_shard_that_is_not_index_slash_count_is_a_usage_error()
    {
        using var root = new TempFolder();
        var outcome = await StandFitProcess.RunAsync(root.Path, Timeout, "run", "--config", DemoSet.WriteConfig(root), "--from", DemoSet.Folder, "--shard", "3/3");
        Assert.Equal(2, outcome.ExitCode);
        Assert.Contains("--shard '3/3' is not a shard", outcome.Error, StringComparison.Ordinal);
    }

    private static string Fingerprint(string folder) =>
        string.Join('\n', Directory.EnumerateFiles(folder).Order(StringComparer.Ordinal).Select(f => Path.GetFileName(f) + " " + Convert.ToHexString(SHA256.HashData(File.ReadAllBytes(f)))));
}
