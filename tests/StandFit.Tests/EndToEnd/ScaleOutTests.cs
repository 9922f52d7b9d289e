using System.Globalization;
using StandFit.Tests.Support;

namespace StandFit.Tests.EndToEnd;

/// <summary>
/// Issue #9's acceptance: one job spread over several processes. Four `run --shard I/4` processes
/// at once over one archive give exactly the rows of one run; three `watch` workers on one drop
/// folder publish every input exactly once.
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
    }

    [Fact]
    public async Task Three_watch_workers_on_one_drop_folder_publish_every_input_exactly_once()
    {
        if (!OperatingSystem.IsLinux())
        {
            return; // SIGTERM delivery below is POSIX.
        }

        const int Count = 240;
        using var root = new TempFolder();
        var common = File.ReadAllText(WorkerConfig.Write(root, flushUnits: 8, workerId: "worker-x"));
        var workers = new[] { "line-pc-a", "line-pc-b", "line-pc-c" };
        var processes = new List<System.Diagnostics.Process>();
        var stderr = new System.Text.StringBuilder();
        try
        {
            var started = new List<Task>();
            foreach (var worker in workers)
            {
                var config = root.File($"standfit-{worker}.yaml", common.Replace("worker_id: worker-x", "worker_id: " + worker, StringComparison.Ordinal));
                var watching = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
                var process = StandFitProcess.Start(root.Path, "watch", "--config", config);
                process.ErrorDataReceived += (_, e) =>
                {
                    if (e.Data is null)
                    {
                        return;
                    }

                    lock (stderr)
                    {
                        stderr.AppendLine(worker + ": " + e.Data);
                    }

                    if (e.Data.Contains("Worker watching", StringComparison.Ordinal))
                    {
                        watching.TrySetResult();
                    }
                };
                process.BeginErrorReadLine();
                process.BeginOutputReadLine();
                processes.Add(process);
                started.Add(watching.Task);
            }

            await Task.WhenAll(started).WaitAsync(Timeout);

            // A producer drops the files in waves while the workers run, each written under a temporary name and renamed.
            var inbox = Path.Combine(root.Path, "inbox");
            var staging = root.Sub("staging");
            SweepFiles.Write(staging, Count, seed: 33);
            var names = Directory.GetFiles(staging).Select(Path.GetFileName).Order(StringComparer.Ordinal).ToList();
            for (var wave = 0; wave < 4; wave++)
            {
                foreach (var name in names.Skip(wave * Count / 4).Take(Count / 4))
                {
                    File.Copy(Path.Combine(staging, name!), Path.Combine(inbox, name + ".part"));
                    File.Move(Path.Combine(inbox, name + ".part"), Path.Combine(inbox, name!));
                }

                await Task.Delay(300);
            }

            var archive = Path.Combine(root.Path, "archive");
            using (var wait = new CancellationTokenSource(Timeout))
            {
                while (PassFailLines(root).Count < Count || Directory.EnumerateFiles(inbox).Any())
                {
                    await Task.Delay(200, wait.Token);
                }
            }

            foreach (var process in processes)
            {
                using var kill = System.Diagnostics.Process.Start("kill", ["-TERM", process.Id.ToString(CultureInfo.InvariantCulture)]);
                await kill.WaitForExitAsync();
            }

            using var exit = new CancellationTokenSource(Timeout);
            foreach (var process in processes)
            {
                await process.WaitForExitAsync(exit.Token);
                Assert.True(process.ExitCode == 0, stderr.ToString());
            }

            // Every input in exactly one summary row, one pass/fail line and one archived file; nothing left claimed.
            var glob = Duck.Literal(Path.Combine(root.Path, "output", "summaries", "**", "*.parquet"));
            var rows = Duck.Query($"SELECT source_file, unit_key, ruling, regexp_extract(filename, '(line-pc-[abc])', 1) AS worker FROM read_parquet({glob}, filename = true)");
            Assert.Equal(Count, rows.Count);
            Assert.Equal(names, rows.Select(r => (string)r["source_file"]!).Order(StringComparer.Ordinal));
            Assert.Equal(Count, rows.Select(r => (string)r["unit_key"]!).Distinct().Count());
            Assert.All(rows, r => Assert.Equal("pass", r["ruling"]));
            Assert.True(rows.Select(r => (string)r["worker"]!).Distinct().Count() > 1, "more than one worker should have taken files");

            var lines = PassFailLines(root);
            Assert.Equal(Count, lines.Count);
            Assert.DoesNotContain(lines, l => l.Contains("duplicate", StringComparison.Ordinal));
            Assert.Equal(names, Directory.EnumerateFiles(archive, "*.csv", SearchOption.AllDirectories).Select(Path.GetFileName).Order(StringComparer.Ordinal));
            Assert.False(Directory.Exists(Path.Combine(root.Path, "rejected")) && Directory.EnumerateFiles(Path.Combine(root.Path, "rejected"), "*", SearchOption.AllDirectories).Any());
            Assert.Empty(Directory.EnumerateFiles(Path.Combine(inbox, ".claimed"), "*~*", SearchOption.AllDirectories));
        }
        finally
        {
            foreach (var process in processes)
            {
                if (!process.HasExited)
                {
                    process.Kill(entireProcessTree: true);
                }

                process.Dispose();
            }
        }
    }

    private static List<string> PassFailLines(TempFolder root)
    {
        var folder = Path.Combine(root.Path, "output", "passfail");
        return Directory.Exists(folder) ? [.. Directory.EnumerateFiles(folder).SelectMany(File.ReadAllLines).Where(l => l.Length > 0)] : [];
    }
}
