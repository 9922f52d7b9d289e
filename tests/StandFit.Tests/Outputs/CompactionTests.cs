using Microsoft.Extensions.Logging.Abstractions;
using StandFit.Edges.Configuration;
using StandFit.Edges.Folders;
using StandFit.Edges.Outputs;
using StandFit.Edges.Processing;
using StandFit.Edges.Reporting;
using StandFit.Tests.Support;

namespace StandFit.Tests.Outputs;

/// <summary>
/// standfit compact: a partition's small files merged into one with the same rows (DuckDB compares
/// them, and still prunes partitions), a kill at each step laid out one state at a time (readers see
/// each unit once; the next compaction resolves it), a worker publishing into the same partition
/// meanwhile, and running runs left alone.
/// </summary>
public sealed class CompactionTests
{
    private static readonly TimeSpan Timeout = TimeSpan.FromMinutes(2);

    /// <summary>The demo judged in batches of 5: many small files in each table and partition.</summary>
    private static async Task<StandFitOptions> DemoOutputAsync(TempFolder root)
    {
        var options = ConfigLoader.Load(WorkerConfig.Write(root, flushUnits: 5)).Value;
        Assert.Empty(ConfigLoader.PrepareFolders(options, needInbox: false));
        using var pipeline = Pipeline.Build(options, NullLoggerFactory.Instance, DispositionMode.Copy, TimeProvider.System);
        Assert.Equal(DemoSet.Expected.Count, (await pipeline.Runner.ProcessAsync(DropFolder.ListReady(DemoSet.Folder), CancellationToken.None)).Processed);
        using var runs = pipeline.NewRunRecorder("run");
        await runs.WriteAsync(pipeline.Runner.Published(), DateTime.UtcNow, RunStates.Finished);
        return options;
    }

    private static void CopyFolder(string from, string to)
    {
        foreach (var file in Directory.EnumerateFiles(from, "*", SearchOption.AllDirectories))
        {
            var target = Path.Combine(to, Path.GetRelativePath(from, file));
            Directory.CreateDirectory(Path.GetDirectoryName(target)!);
            File.Copy(file, target);
        }
    }

    private static string Glob(string output, string table) => Duck.Literal(Path.Combine(output, table, "**", "*.parquet"));

    private static long Scalar(string sql) => Convert.ToInt64(Duck.Query(sql)[0]["n"], System.Globalization.CultureInfo.InvariantCulture);

    private static async Task CompactAllAsync(string output, Action<string>? afterStep = null, string? only = null)
    {
        var compactor = new PartitionCompactor(output, TimeProvider.System) { MinimumAge = TimeSpan.Zero, AfterStep = afterStep };
        var ids = new Dictionary<string, string>(StringComparer.Ordinal);
        foreach (var table in new[] { CompactTable.Summaries, CompactTable.Points })
        {
            using var held = compactor.Lock(table);
            foreach (var folder in compactor.Folders(table, null, null).Where(f => only is null || f.EndsWith(only, StringComparison.Ordinal)))
            {
                var key = Path.GetFileName(folder);
                if (!ids.TryGetValue(key, out var id))
                {
                    ids[key] = id = compactor.NewId();
                }

                await compactor.CompactAsync(table, folder, id);
            }
        }
    }

    [Fact]
    public async Task Compacting_leaves_one_file_per_partition_with_the_same_rows_and_DuckDB_still_prunes_by_date()
    {
        using var root = new TempFolder();
        var options = await DemoOutputAsync(root);
        var before = Path.Combine(root.Path, "before");
        CopyFolder(options.Output, before);
        var partitions = Directory.GetDirectories(Path.Combine(options.Output, "summaries"));
        Assert.True(partitions.Length >= 2);
        Assert.Contains(partitions, p => Directory.GetFiles(p, "*.parquet").Length >= 5);

        await CompactAllAsync(options.Output);

        foreach (var table in new[] { "summaries", "points" })
        {
            Assert.All(Directory.GetDirectories(Path.Combine(options.Output, table)), p => Assert.Single(Directory.GetFiles(p, "*.parquet")));
            var (a, b) = ($"read_parquet({Glob(before, table)}, hive_partitioning = true)", $"read_parquet({Glob(options.Output, table)}, hive_partitioning = true)");
            Assert.Equal(Scalar($"SELECT count(*) AS n FROM {a}"), Scalar($"SELECT count(*) AS n FROM {b}"));
            Assert.Equal(0, Scalar($"SELECT count(*) AS n FROM (SELECT * FROM {a} EXCEPT ALL SELECT * FROM {b})"));
            Assert.Equal(0, Scalar($"SELECT count(*) AS n FROM (SELECT * FROM {b} EXCEPT ALL SELECT * FROM {a})"));
        }

        // The merged summary and points files of a date share their name, as a batch's do.
        foreach (var partition in Directory.GetDirectories(Path.Combine(options.Output, "points")))
        {
            var name = Path.GetFileName(Directory.GetFiles(partition, "*.parquet")[0]);
            if (name.StartsWith("compact-", StringComparison.Ordinal))
            {
                Assert.True(File.Exists(Path.Combine(options.Output, "summaries", Path.GetFileName(partition), name)));
            }
        }

        // A date filter and a timestamp filter give the rows they gave before compaction.
        const string Where = "WHERE \"date\" = DATE '2026-12-01' AND test_start >= TIMESTAMPTZ '2026-12-01 00:00:00+00' AND test_start < TIMESTAMPTZ '2026-12-01 03:00:00+00'";
        var expected = Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(before, "summaries")}, hive_partitioning = true) {Where}");
        Assert.True(expected > 0);
        Assert.Equal(expected, Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(options.Output, "summaries")}, hive_partitioning = true) {Where}"));

        // Pruning: with every later partition's file damaged, a query on the first date still runs, so DuckDB never
        // opened them (it reads the first file of the glob to bind the schema, so that one stays whole).
        const string First = "WHERE \"date\" = DATE '2026-11-30'";
        var first = Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(before, "summaries")}, hive_partitioning = true) {First}");
        Assert.True(first > 0);
        foreach (var partition in Directory.GetDirectories(Path.Combine(options.Output, "summaries")).Where(p => !p.EndsWith("date=2026-11-30", StringComparison.Ordinal)))
        {
            File.WriteAllText(Directory.GetFiles(partition, "*.parquet")[0], "not parquet");
        }

        Assert.Equal(first, Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(options.Output, "summaries")}, hive_partitioning = true) {First}"));
        Assert.ThrowsAny<Exception>(() => Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(options.Output, "summaries")}, hive_partitioning = true)"));
    }

    [Theory]
    [InlineData("written")]
    [InlineData("committed")]
    [InlineData("renamed")]
    [InlineData("deleted-one")]
    public async Task A_compaction_killed_at_any_step_shows_readers_each_unit_once_and_the_next_compaction_resolves_it(string step)
    {
        using var root = new TempFolder();
        var options = await DemoOutputAsync(root);
        var units = DemoSet.Expected.Count;
        var writer = new ParquetSummaryWriter(options.Output, "x");
        var inputs = Directory.EnumerateFiles(Path.Combine(options.Output, "summaries"), "*.parquet", SearchOption.AllDirectories).Select(writer.Relative).ToList();

        await Assert.ThrowsAsync<IOException>(() => CompactAllAsync(options.Output, s =>
        {
            if (s == step)
            {
                throw new IOException("killed at " + s);
            }
        }));

        // The reader's rule: every unit exactly once, whatever state the kill left.
        var read = await ReportReader.ReadAsync(options.Output, null, null, DateTime.UtcNow, "test");
        Assert.Equal(units, read.Rows.Length);
        Assert.Equal(units, read.Rows.Select(r => r.UnitKey).Distinct(StringComparer.Ordinal).Count());

        // A plain glob never misses a unit (it may see one twice between the rename and the deletions).
        Assert.Equal(units, Scalar($"SELECT count(DISTINCT unit_key) AS n FROM read_parquet({Glob(options.Output, "summaries")})"));

        await CompactAllAsync(options.Output);
        Assert.Equal(units, Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(options.Output, "summaries")})"));
        Assert.Equal(units, Scalar($"SELECT count(DISTINCT unit_key) AS n FROM read_parquet({Glob(options.Output, "summaries")})"));
        Assert.All(Directory.GetDirectories(Path.Combine(options.Output, "summaries")), p => Assert.Single(Directory.GetFiles(p, "*.parquet")));
        Assert.Empty(Directory.EnumerateFiles(options.Output, "*.tmp", SearchOption.AllDirectories));

        // A worker's recovery that finds a committed file compacted away takes it as published.
        Assert.All(inputs, i => Assert.True(writer.RollForward(i), i));
    }

    [Fact]
    public async Task A_worker_publishing_into_the_partition_while_it_is_compacted_loses_and_repeats_no_unit()
    {
        using var root = new TempFolder();
        var options = ConfigLoader.Load(WorkerConfig.Write(root, flushUnits: 3)).Value;
        Assert.Empty(ConfigLoader.PrepareFolders(options, needInbox: true));
        const int Units = 36;
        for (var i = 0; i < Units; i++)
        {
            SweepFiles.Drop(options.Inbox, $"unit-{i:D3}.csv", SweepFiles.Text(i, 4242));
        }

        using var pipeline = Pipeline.Build(options, NullLoggerFactory.Instance, DispositionMode.Move, TimeProvider.System);
        var ready = DropFolder.ListReady(options.Inbox);
        var worker = Task.Run(async () =>
        {
            for (var i = 0; i < ready.Count; i += 3)
            {
                await pipeline.Runner.ProcessAsync([.. ready.Skip(i).Take(3)], CancellationToken.None);
            }
        });
        var compactions = 0;
        while (!worker.IsCompleted || compactions < 3)
        {
            if (Directory.Exists(Path.Combine(options.Output, "summaries")))
            {
                await CompactAllAsync(options.Output);
                var read = await ReportReader.ReadAsync(options.Output, null, null, DateTime.UtcNow, "test");
                Assert.Equal(read.Rows.Length, read.Rows.Select(r => r.UnitKey).Distinct(StringComparer.Ordinal).Count());
                compactions++;
            }
        }

        await worker.WaitAsync(Timeout);
        await CompactAllAsync(options.Output);
        Assert.Equal(Units, Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(options.Output, "summaries")})"));
        Assert.Equal(Units, Scalar($"SELECT count(DISTINCT unit_key) AS n FROM read_parquet({Glob(options.Output, "summaries")})"));
        Assert.Equal(Units * 21, Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(options.Output, "points")})"));
    }

    [Fact]
    public async Task Runs_that_have_ended_are_merged_and_a_running_one_is_left_alone()
    {
        using var root = new TempFolder();
        var output = Directory.CreateDirectory(Path.Combine(root.Path, "output")).FullName;
        var at = new DateTime(2026, 12, 1, 6, 0, 0, DateTimeKind.Utc);
        for (var i = 0; i < 3; i++)
        {
            using var recorder = new RunRecorder(output, $"run-{i}", "run", "w", at.AddHours(i), "test", "hash");
            await recorder.WriteAsync(new BatchCounts(), at.AddHours(i).AddMinutes(5), i == 2 ? RunStates.Running : RunStates.Finished);
        }

        var compactor = new PartitionCompactor(output, TimeProvider.System) { MinimumAge = TimeSpan.Zero };
        using (compactor.Lock(CompactTable.Runs))
        {
            var result = await compactor.CompactAsync(CompactTable.Runs, compactor.Folders(CompactTable.Runs, null, null)[0], compactor.NewId());
            Assert.Equal(["run-0.parquet", "run-1.parquet"], result.Inputs);
            Assert.Equal(2, result.Rows);
        }

        var names = Directory.GetFiles(Path.Combine(output, "runs"), "*.parquet").Select(Path.GetFileName).Order(StringComparer.Ordinal).ToList();
        Assert.Equal(2, names.Count);
        Assert.Contains("run-2.parquet", names);
        Assert.Equal(3, Scalar($"SELECT count(*) AS n FROM read_parquet({Duck.Literal(Path.Combine(output, "runs", "*.parquet"))})"));
    }

    [Fact]
    public async Task The_compact_command_dry_run_changes_nothing_and_a_held_lock_exits_with_three()
    {
        using var root = new TempFolder();
        var options = await DemoOutputAsync(root);
        List<string> Files() => [.. Directory.EnumerateFiles(options.Output, "*", SearchOption.AllDirectories).Where(f => !f.EndsWith(".compact.lock", StringComparison.Ordinal)).Order(StringComparer.Ordinal)];
        var files = Files();

        var dry = await StandFitProcess.RunAsync(root.Path, Timeout, "compact", "--output", options.Output, "--min-age", "0", "--dry-run");
        Assert.Equal(0, dry.ExitCode);
        Assert.Contains("would merge", dry.Output, StringComparison.Ordinal);
        Assert.Equal(files, Files());

        Assert.Equal(2, (await StandFitProcess.RunAsync(root.Path, Timeout, "compact", "--output", options.Output, "--table", "sumaries")).ExitCode);
        Assert.Equal(1, (await StandFitProcess.RunAsync(root.Path, Timeout, "compact", "--output", Path.Combine(root.Path, "none"))).ExitCode);
        using (new PartitionCompactor(options.Output, TimeProvider.System).Lock(CompactTable.Points))
        {
            Assert.Equal(3, (await StandFitProcess.RunAsync(root.Path, Timeout, "compact", "--output", options.Output, "--min-age", "0")).ExitCode);
        }

        var run = await StandFitProcess.RunAsync(root.Path, Timeout, "compact", "--output", options.Output, "--min-age", "0");
        Assert.Equal(0, run.ExitCode);
        Assert.Contains("merged", run.Output, StringComparison.Ordinal);
        Assert.Equal(DemoSet.Expected.Count, Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(options.Output, "summaries")})"));
    }
}
