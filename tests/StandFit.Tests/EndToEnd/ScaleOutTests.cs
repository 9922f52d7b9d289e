using System.Globalization;
using Microsoft.Extensions.Logging.Abstractions;
using StandFit.Edges.Configuration;
using StandFit.Edges.Folders;
using StandFit.Edges.Processing;
using StandFit.Tests.Support;

namespace StandFit.Tests.EndToEnd;

/// <summary>
/// Issue #9's acceptance: one job spread over several processes. Four `run --shard I/4` processes
/// at once over one archive give exactly the rows of one run; three workers on one drop folder
/// publish every input exactly once.
/// </summary>
public sealed class ScaleOutTests
{
    private static readonly TimeSpan Timeout = TimeSpan.FromMinutes(4);

    [Fact]
    public async Task Four_shard_processes_at_once_over_one_archive_give_exactly_the_rows_and_points_of_one_run()
    {
        using var root = new TempFolder();
        var archive = root.Sub("archive-to-rejudge");
        DemoSet.CopyInto(archive);
        SweepFiles.Write(archive, 150, seed: 9);
        var inputs = Directory.GetFiles(archive).Length;

        using var single = new TempFolder();
        var one = await StandFitProcess.RunAsync(single.Path, Timeout, "run", "--config", DemoSet.WriteConfig(single, flushUnits: 16), "--from", archive, "--quiet");
        Assert.True(one.ExitCode == 0, one.Error);

        // The four shards start together and write into one output folder, as four pods of an Indexed Job would.
        using var sharded = new TempFolder();
        var config = DemoSet.WriteConfig(sharded, flushUnits: 16);
        var shards = await Task.WhenAll(Enumerable.Range(0, 4).Select(i =>
            StandFitProcess.RunAsync(sharded.Path, Timeout, "run", "--config", config, "--from", archive, "--shard", string.Create(CultureInfo.InvariantCulture, $"{i}/4"), "--quiet")));
        Assert.All(shards, s => Assert.True(s.ExitCode == 0, s.Error));

        string Glob(TempFolder f, string table) => Duck.Literal(Path.Combine(f.Path, "output", table, "**", "*.parquet"));
        long Scalar(string sql) => Convert.ToInt64(Duck.Query(sql)[0]["n"], CultureInfo.InvariantCulture);

        // Every input in exactly one shard: as many rows as inputs, no unit key twice, and every shard had work.
        Assert.Equal(inputs, Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(single, "summaries")})"));
        Assert.Equal(inputs, Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(sharded, "summaries")})"));
        Assert.Equal(inputs, Scalar($"SELECT count(DISTINCT unit_key) AS n FROM read_parquet({Glob(sharded, "summaries")})"));
        var perShard = Duck.Query($"SELECT regexp_extract(filename, 'shard-(\\d+)-of-4', 1) AS shard, count(*) AS n FROM read_parquet({Glob(sharded, "summaries")}, filename = true) GROUP BY shard");
        Assert.Equal(4, perShard.Count);

        // The union equals the single run, row for row and column for column (all but the processing time).
        var summaryDifference = $"""
            SELECT count(*) AS n FROM (
              (SELECT * EXCLUDE (processed_at) FROM read_parquet({Glob(single, "summaries")})
               EXCEPT ALL SELECT * EXCLUDE (processed_at) FROM read_parquet({Glob(sharded, "summaries")}))
              UNION ALL
              (SELECT * EXCLUDE (processed_at) FROM read_parquet({Glob(sharded, "summaries")})
               EXCEPT ALL SELECT * EXCLUDE (processed_at) FROM read_parquet({Glob(single, "summaries")})))
            """;
        Assert.Equal(0L, Scalar(summaryDifference));
        var pointDifference = $"""
            SELECT count(*) AS n FROM (
              (SELECT * FROM read_parquet({Glob(single, "points")}) EXCEPT ALL SELECT * FROM read_parquet({Glob(sharded, "points")}))
              UNION ALL
              (SELECT * FROM read_parquet({Glob(sharded, "points")}) EXCEPT ALL SELECT * FROM read_parquet({Glob(single, "points")})))
            """;
        Assert.Equal(0L, Scalar(pointDifference));
        Assert.True(Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(single, "points")})") > 20L * inputs / 2);

        // Each shard copied only its own inputs: the archive copies are the inputs, once each.
        Assert.Equal(
            Directory.GetFiles(archive).Select(Path.GetFileName).Order(StringComparer.Ordinal),
            Directory.EnumerateFiles(Path.Combine(sharded.Path, "archive"), "*", SearchOption.AllDirectories)
                .Concat(Directory.EnumerateFiles(Path.Combine(sharded.Path, "rejected"), "*", SearchOption.AllDirectories).Where(f => !f.EndsWith(".rejected.txt", StringComparison.Ordinal)))
                .Select(Path.GetFileName).Order(StringComparer.Ordinal));

        // The four processes share one logs folder: each batch event (2001) of each shard is a whole
        // line of the day's file, and their counts add up to the inputs (none overwritten by another process).
        var published = 0;
        foreach (var line in Directory.GetFiles(Path.Combine(sharded.Path, "logs"), "*.clef").SelectMany(File.ReadAllLines))
        {
            using var json = System.Text.Json.JsonDocument.Parse(line);
            if (json.RootElement.TryGetProperty("EventId", out var id) && id.GetProperty("Id").GetInt32() == 2001)
            {
                published += json.RootElement.GetProperty("Count").GetInt32();
            }
        }

        Assert.Equal(inputs, published);
    }

    [Fact]
    public async Task Three_workers_on_one_drop_folder_publish_every_input_exactly_once()
    {
        const int Count = 240;
        using var root = new TempFolder();
        var first = ConfigLoader.Load(WorkerConfig.Write(root, flushUnits: 8, workerId: "line-pc-a")).Value;
        var options = new[] { first, first with { WorkerId = "line-pc-b" }, first with { WorkerId = "line-pc-c" } };
        Directory.CreateDirectory(first.Archive);
        Directory.CreateDirectory(first.Rejected);
        SweepFiles.Write(first.Inbox, Count, seed: 33);
        var ready = DropFolder.ListReady(first.Inbox);
        var names = ready.Select(Path.GetFileName).Order(StringComparer.Ordinal).ToList();

        // Three workers, each with its own identity (claims, journal, files), start together; each
        // sees every file and takes them in its own order, so they race for the same files.
        var pipelines = options.Select(o => Pipeline.Build(o, NullLoggerFactory.Instance, DispositionMode.Move, TimeProvider.System)).ToList();
        try
        {
            var go = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
            var orders = new[] { ready.ToList(), ready.Reverse().ToList(), ready.Skip(Count / 2).Concat(ready.Take(Count / 2)).ToList() };
            var runs = pipelines.Select((p, i) => Task.Run(async () =>
            {
                await go.Task;
                return await p.Runner.ProcessAsync(orders[i], CancellationToken.None);
            })).ToList();
            go.SetResult();
            var counts = await Task.WhenAll(runs).WaitAsync(Timeout);

            Assert.Equal(Count, counts.Sum(c => c.Processed));
            Assert.Equal(0, counts.Sum(c => c.Duplicates));
            Assert.True(counts.Count(c => c.Processed > 0) > 1, "more than one worker should have taken files");
        }
        finally
        {
            pipelines.ForEach(p => p.Dispose());
        }

        // Every input in exactly one summary row, one pass/fail line and one archived file; nothing left claimed.
        var glob = Duck.Literal(Path.Combine(first.Output, "summaries", "**", "*.parquet"));
        var rows = Duck.Query($"SELECT source_file, unit_key, ruling FROM read_parquet({glob})");
        Assert.Equal(Count, rows.Count);
        Assert.Equal(names, rows.Select(r => (string)r["source_file"]!).Order(StringComparer.Ordinal));
        Assert.Equal(Count, rows.Select(r => (string)r["unit_key"]!).Distinct().Count());
        var lines = PassFailLines(first.Output);
        Assert.Equal(Count, lines.Count);
        Assert.DoesNotContain(lines, l => l.Contains("duplicate", StringComparison.Ordinal));
        Assert.Equal(names, Directory.EnumerateFiles(first.Archive, "*.csv", SearchOption.AllDirectories).Select(Path.GetFileName).Order(StringComparer.Ordinal));
        Assert.Empty(Directory.EnumerateFiles(first.Inbox));
        Assert.Empty(Directory.EnumerateFiles(Path.Combine(first.Inbox, ".claimed"), "*~*", SearchOption.AllDirectories));
    }

    private static List<string> PassFailLines(string output)
    {
        var folder = Path.Combine(output, "passfail");
        return Directory.Exists(folder) ? [.. Directory.EnumerateFiles(folder).SelectMany(File.ReadAllLines).Where(l => l.Length > 0)] : [];
    }
}
