using System.Globalization;
using DuckDB.NET.Data;
using Microsoft.Extensions.Logging.Abstractions;
using StandFit.Edges.Configuration;
using StandFit.Edges.Folders;
using StandFit.Edges.Outputs;
using StandFit.Edges.Processing;
using StandFit.Edges.Reporting;
using StandFit.Tests.Support;
using Xunit.Abstractions;

namespace StandFit.Tests.Outputs;

/// <summary>
/// standfit compact: a partition's small files merged into one with the same rows (DuckDB compares
/// them, and still prunes partitions); the folder swap (Linux) and the file protocol (Windows) each
/// killed after every step, laid out one state at a time (readers see each unit once; the next
/// compaction resolves it); a plain DuckDB glob queried in a loop while folders are swapped; workers
/// publishing into the same partition meanwhile (a file published while the merged file is written,
/// a crashed worker's temporary file, a worker holding its lock); running runs left alone.
/// </summary>
public sealed class CompactionTests(ITestOutputHelper log)
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

    /// <summary>
    /// Small files in many partitions: <paramref name="days"/> dates, <paramref name="files"/> files a
    /// date of <paramref name="unitsPerFile"/> units, two points a unit, written through the real writer.
    /// </summary>
    private static async Task<int> ManyPartitionsAsync(string output, int days, int files, int unitsPerFile, string prefix)
    {
        Directory.CreateDirectory(output);
        var writer = new ParquetSummaryWriter(output, prefix, "gen");
        var first = new DateTime(2026, 11, 1, 6, 0, 0, DateTimeKind.Utc);
        var units = 0;
        for (var f = 0; f < files; f++)
        {
            var records = new List<SummaryRecord>();
            var points = new List<PointRecord>();
            for (var d = 0; d < days; d++)
            {
                for (var u = 0; u < unitsPerFile; u++)
                {
                    var serial = string.Create(CultureInfo.InvariantCulture, $"{prefix}-{d:D2}-{f:D2}-{u:D2}");
                    var sha = Convert.ToHexStringLower(System.Security.Cryptography.SHA256.HashData(System.Text.Encoding.UTF8.GetBytes(serial)));
                    var key = sha + ":none";
                    records.Add(new SummaryRecord
                    {
                        UnitKey = key,
                        Serial = serial,
                        TestStart = first.AddDays(d).AddMinutes(f),
                        SourceFile = serial + ".csv",
                        SourceSha256 = sha,
                        Ruling = "pass",
                        ProcessedAt = first.AddDays(d).AddMinutes(f + 1),
                        ToolVersion = "test",
                    });
                    points.Add(new PointRecord { UnitKey = key, Point = 1, SourceLine = 2 });
                    points.Add(new PointRecord { UnitKey = key, Point = 2, SourceLine = 3 });
                    units++;
                }
            }

            await writer.WriteAsync(records, points, CancellationToken.None);
        }

        return units;
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

    private static long Scalar(string sql) => Convert.ToInt64(Duck.Query(sql)[0]["n"], CultureInfo.InvariantCulture);

    private static PartitionCompactor Compactor(string output, bool swap = true, Action<string>? afterStep = null, TimeSpan? grace = null) =>
        new(output, TimeProvider.System) { MinimumAge = TimeSpan.Zero, AfterStep = afterStep, UseSwap = swap && OperatingSystem.IsLinux(), RetiredGrace = grace ?? TimeSpan.Zero };

    private static async Task<List<CompactionResult>> CompactAllAsync(PartitionCompactor compactor, string? only = null)
    {
        var results = new List<CompactionResult>();
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

                results.Add(await compactor.CompactAsync(table, folder, id));
            }

            compactor.SweepRetired(table);
        }

        return results;
    }

    private static Task<List<CompactionResult>> CompactAllAsync(string output, Action<string>? afterStep = null, bool swap = true) =>
        CompactAllAsync(Compactor(output, swap, afterStep));

    private static Action<string> KillAt(string step) => s =>
    {
        if (s == step)
        {
            throw new IOException("killed at " + s);
        }
    };

    private static async Task AssertResolvedAsync(string output, int units, IReadOnlyList<string> inputs, bool swap)
    {
        await CompactAllAsync(output, swap: swap);
        Assert.Equal(units, Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(output, "summaries")})"));
        Assert.Equal(units, Scalar($"SELECT count(DISTINCT unit_key) AS n FROM read_parquet({Glob(output, "summaries")})"));
        Assert.All(Directory.GetDirectories(Path.Combine(output, "summaries")), p => Assert.Single(Directory.GetFiles(p, "*.parquet")));
        Assert.Empty(Directory.EnumerateFiles(output, "*.tmp", SearchOption.AllDirectories));
        var staging = Path.Combine(output, PartitionCompactor.StagingFolderName);
        Assert.True(!Directory.Exists(staging) || Directory.GetFileSystemEntries(staging).Length == 0, "staged or retired folders left");

        // A worker's recovery that finds a committed file compacted away takes it as published.
        var writer = new ParquetSummaryWriter(output, "x");
        Assert.All(inputs, i => Assert.True(writer.RollForward(i), i));
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

        var results = await CompactAllAsync(new PartitionCompactor(options.Output, TimeProvider.System) { MinimumAge = TimeSpan.Zero });
        var expected = OperatingSystem.IsLinux() ? CompactProtocol.Swap : CompactProtocol.Files;
        Assert.All(results.Where(r => r.Merged is not null), r => Assert.Equal(expected, r.Protocol));

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
        var window = Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(before, "summaries")}, hive_partitioning = true) {Where}");
        Assert.True(window > 0);
        Assert.Equal(window, Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(options.Output, "summaries")}, hive_partitioning = true) {Where}"));

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

    [LinuxTheory]
    [InlineData("written")]
    [InlineData("linked")]
    [InlineData("swapped")]
    [InlineData("retired")]
    public async Task A_swap_killed_at_any_step_shows_every_reader_and_a_plain_glob_each_unit_exactly_once_and_the_next_compaction_resolves_it(string step)
    {
        using var root = new TempFolder();
        var options = await DemoOutputAsync(root);
        var units = DemoSet.Expected.Count;
        var writer = new ParquetSummaryWriter(options.Output, "x");
        var inputs = Directory.EnumerateFiles(Path.Combine(options.Output, "summaries"), "*.parquet", SearchOption.AllDirectories).Select(writer.Relative).ToList();

        await Assert.ThrowsAnyAsync<IOException>(() => CompactAllAsync(options.Output, KillAt(step)));

        // StandFit's reader, and a plain glob (with and without Hive partitioning): every unit exactly once.
        var read = await ReportReader.ReadAsync(options.Output, null, null, DateTime.UtcNow, "test");
        Assert.Equal(units, read.Rows.Length);
        Assert.Equal(units, read.Rows.Select(r => r.UnitKey).Distinct(StringComparer.Ordinal).Count());
        Assert.Empty(read.Unreadable);
        Assert.Equal(units, Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(options.Output, "summaries")})"));
        Assert.Equal(units, Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(options.Output, "summaries")}, hive_partitioning = true)"));
        Assert.Equal(units, Scalar($"SELECT count(DISTINCT unit_key) AS n FROM read_parquet({Glob(options.Output, "summaries")})"));

        await AssertResolvedAsync(options.Output, units, inputs, swap: true);
    }

    [Theory]
    [InlineData("written")]
    [InlineData("committed")]
    [InlineData("renamed")]
    [InlineData("deleted-one")]
    public async Task A_file_protocol_compaction_killed_at_any_step_shows_readers_following_the_rule_each_unit_once_and_the_next_compaction_resolves_it(string step)
    {
        using var root = new TempFolder();
        var options = await DemoOutputAsync(root);
        var units = DemoSet.Expected.Count;
        var writer = new ParquetSummaryWriter(options.Output, "x");
        var inputs = Directory.EnumerateFiles(Path.Combine(options.Output, "summaries"), "*.parquet", SearchOption.AllDirectories).Select(writer.Relative).ToList();

        await Assert.ThrowsAnyAsync<IOException>(() => CompactAllAsync(options.Output, KillAt(step), swap: false));

        // The reader's rule: every unit exactly once, whatever state the kill left.
        var read = await ReportReader.ReadAsync(options.Output, null, null, DateTime.UtcNow, "test");
        Assert.Equal(units, read.Rows.Length);
        Assert.Equal(units, read.Rows.Select(r => r.UnitKey).Distinct(StringComparer.Ordinal).Count());

        // A plain glob never misses a unit (it may see one twice between the rename and the deletions).
        Assert.Equal(units, Scalar($"SELECT count(DISTINCT unit_key) AS n FROM read_parquet({Glob(options.Output, "summaries")})"));

        await AssertResolvedAsync(options.Output, units, inputs, swap: false);
    }

    /// <summary>What a reader thread saw: queries run, queries that failed and were run again, and every wrong answer.</summary>
    private sealed class ReaderLog
    {
        public int Queries;
        public int Overlapped;
        public int Retried;
        public readonly List<string> Wrong = [];
        public readonly List<string> Failures = [];

        /// <summary>Waits until the reader has finished <paramref name="more"/> more queries (so, with two, one that started after now).</summary>
        public void WaitForMore(int more)
        {
            lock (this)
            {
                var target = Queries + more;
                while (Queries < target)
                {
                    if (!Monitor.Wait(this, Timeout))
                    {
                        throw new TimeoutException("the reader thread stopped answering");
                    }
                }
            }
        }
    }

    /// <summary>
    /// A plain DuckDB reader in its own thread: the same query, again and again, until stopped; a query
    /// that fails is run again (up to five times) and the failure kept. <paramref name="check"/> says
    /// what is wrong with an answer (null: right).
    /// </summary>
    private static Thread StartReader(string sql, Func<long, long, string?> check, ReaderLog seen, Func<bool> compacting, TaskCompletionSource firstDone, CancellationToken stop)
    {
        DuckDBConnection? connection = null;
        return StartLoop(
            () =>
            {
                if (connection is null)
                {
                    connection = new DuckDBConnection("DataSource=:memory:");
                    connection.Open();
                }

                using var command = connection.CreateCommand();
                command.CommandText = sql;
                using var reader = command.ExecuteReader();
                _ = reader.Read();
                return check(Convert.ToInt64(reader.GetValue(0), CultureInfo.InvariantCulture), Convert.ToInt64(reader.GetValue(1), CultureInfo.InvariantCulture));
            },
            e => e is DuckDBException,
            () => connection?.Dispose(),
            seen,
            compacting,
            firstDone,
            stop);
    }

    /// <summary>Runs <paramref name="once"/> in a loop in its own thread until stopped, keeping wrong answers, and failures that <paramref name="retry"/> allows (run again, up to five times).</summary>
    private static Thread StartLoop(Func<string?> once, Func<Exception, bool> retry, Action done, ReaderLog seen, Func<bool> compacting, TaskCompletionSource firstDone, CancellationToken stop)
    {
        var thread = new Thread(() =>
        {
            try
            {
                Loop();
            }
            catch (Exception e)
            {
                lock (seen)
                {
                    seen.Wrong.Add("the reader stopped: " + e.Message);
                }

                firstDone.TrySetResult();
            }
            finally
            {
                done();
            }
        })
        { IsBackground = true };
        thread.Start();
        return thread;

        void Loop()
        {
            while (!stop.IsCancellationRequested)
            {
                var during = compacting();
                for (var attempt = 1; ; attempt++)
                {
                    try
                    {
                        if (once() is { } wrong)
                        {
                            lock (seen)
                            {
                                seen.Wrong.Add(wrong);
                            }
                        }

                        break;
                    }
                    catch (Exception e) when (retry(e) && attempt < 5)
                    {
                        lock (seen)
                        {
                            seen.Retried++;
                            seen.Failures.Add(e.Message);
                        }
                    }
                }

                lock (seen)
                {
                    seen.Queries++;
                    seen.Overlapped += during && compacting() ? 1 : 0;
                    Monitor.PulseAll(seen);
                }

                firstDone.TrySetResult();
            }
        }
    }

    /// <summary>A failure DuckDB reports when a file it listed is gone when it opens it (the only kind allowed, and only with a clean retry).</summary>
    private static bool Vanished(string message) =>
        message.Contains("No such file or directory", StringComparison.Ordinal) || message.Contains("No files found", StringComparison.Ordinal);

    /// <summary>
    /// Rounds of compactions, one partition after another, of fresh outputs of many small files,
    /// while three readers query in a loop: a plain DuckDB glob of the summaries (Hive partitioning)
    /// and of the points, and StandFit's own reader. The first <paramref name="stepwiseRounds"/>
    /// rounds hold each compaction after every step until every reader has run a whole query in that
    /// state; later rounds run free, so that queries straddle the steps.
    /// </summary>
    private async Task<(ReaderLog Summaries, ReaderLog Points, ReaderLog Report)> QueriedWhileCompactingAsync(TempFolder root, bool swap, int rounds, int stepwiseRounds)
    {
        var (summaries, points, report) = (new ReaderLog(), new ReaderLog(), new ReaderLog());
        var swaps = 0;
        for (var round = 0; round < 12 && (round < rounds || (swap && (summaries.Overlapped < 40 || points.Overlapped < 40))); round++)
        {
            // A stepwise round holds each compaction after every step until every reader has run a whole query in that
            // state (the states between the steps are each queried); the others run free (queries straddle steps).
            var stepwise = round < stepwiseRounds;
            var output = Path.Combine(root.Path, "out" + round.ToString(CultureInfo.InvariantCulture));
            var units = await ManyPartitionsAsync(output, days: stepwise ? 4 : 16, files: 5, unitsPerFile: 4, "r" + round.ToString(CultureInfo.InvariantCulture));
            var compacting = 0;
            using var stop = new CancellationTokenSource();
            var started = Enumerable.Range(0, 3).Select(_ => new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously)).ToList();
            var threads = new[]
            {
                StartReader(
                    $"SELECT count(*), count(DISTINCT unit_key) FROM read_parquet({Glob(output, "summaries")}, hive_partitioning = true)",
                    (n, d) => n == units && d == units ? null : $"summaries: {n} rows, {d} units, {units} expected",
                    summaries, () => Volatile.Read(ref compacting) == 1, started[0], stop.Token),
                StartReader(
                    $"SELECT count(*), count(DISTINCT (unit_key, point)) FROM read_parquet({Glob(output, "points")})",
                    (n, d) => n == 2 * units && d == 2 * units ? null : $"points: {n} rows, {d} distinct, {2 * units} expected",
                    points, () => Volatile.Read(ref compacting) == 1, started[1], stop.Token),

                // StandFit's own reader (it lists a folder again when a file it listed is gone, so it never fails).
                StartLoop(
                    () =>
                    {
                        var read = ReportReader.ReadAsync(output, null, null, DateTime.UtcNow, "test").GetAwaiter().GetResult();
                        var keys = read.Rows.Select(r => r.UnitKey).Distinct(StringComparer.Ordinal).Count();
                        return read.Unreadable.Length > 0 ? "report: " + read.Unreadable[0]
                            : read.Rows.Length == units && keys == units ? null
                            : $"report: {read.Rows.Length} rows, {keys} units, {units} expected";
                    },
                    _ => false,
                    () => { },
                    report,
                    () => Volatile.Read(ref compacting) == 1,
                    started[2],
                    stop.Token),
            };
            await Task.WhenAll(started.Select(s => s.Task)).WaitAsync(Timeout);

            var compactor = Compactor(output, swap, grace: TimeSpan.FromHours(1), afterStep: stepwise ? _ =>
            {
                summaries.WaitForMore(2);
                points.WaitForMore(2);
                report.WaitForMore(2);
            }
            : null);
            Volatile.Write(ref compacting, 1);
            foreach (var day in compactor.Folders(CompactTable.Summaries, null, null).Select(Path.GetFileName))
            {
                var results = await CompactAllAsync(compactor, only: day);
                Assert.All(results, r => Assert.Equal(swap ? CompactProtocol.Swap : CompactProtocol.Files, r.Protocol));
                swaps += results.Count;
            }

            Volatile.Write(ref compacting, 0);
            await stop.CancelAsync();
            foreach (var thread in threads)
            {
                Assert.True(thread.Join(Timeout));
            }

            Assert.All(Directory.GetDirectories(Path.Combine(output, "summaries")), p => Assert.Single(Directory.GetFiles(p, "*.parquet")));
        }

        log.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{swaps} compactions ({(swap ? "swap" : "file protocol")}); summaries: {summaries.Queries} queries ({summaries.Overlapped} during compactions), {summaries.Retried} retried; points: {points.Queries} ({points.Overlapped}), {points.Retried} retried; StandFit's reader: {report.Queries} reads ({report.Overlapped})"));
        foreach (var failure in summaries.Failures.Concat(points.Failures).Distinct(StringComparer.Ordinal).Take(3))
        {
            log.WriteLine("retried after: " + failure);
        }

        return (summaries, points, report);
    }

    [LinuxFact]
    public async Task A_plain_DuckDB_glob_queried_in_a_loop_while_folders_are_swapped_never_sees_a_unit_twice_or_missing()
    {
        using var root = new TempFolder();
        var (summaries, points, report) = await QueriedWhileCompactingAsync(root, swap: true, rounds: 4, stepwiseRounds: 2);

        // Every answer right; a query fails only when a file it listed was swapped out before it opened it, and its retry
        // (a new listing) answers right.
        Assert.Empty(summaries.Wrong);
        Assert.Empty(points.Wrong);
        Assert.Empty(report.Wrong);
        Assert.All(summaries.Failures.Concat(points.Failures), f => Assert.True(Vanished(f), f));
        Assert.True(summaries.Overlapped >= 40 && points.Overlapped >= 40, $"too few queries ran during the swaps: {summaries.Overlapped}, {points.Overlapped}");
    }

    [LinuxFact]
    public async Task With_the_file_protocol_StandFit_readers_see_each_unit_once_while_a_plain_glob_sees_merged_rows_twice_between_rename_and_deletions()
    {
        using var root = new TempFolder();
        var (summaries, points, report) = await QueriedWhileCompactingAsync(root, swap: false, rounds: 1, stepwiseRounds: 1);

        // The Windows protocol: the reader rule keeps StandFit's reader exact, a plain glob is not (the documented limit).
        Assert.Empty(report.Wrong);
        Assert.Contains(summaries.Wrong, w => w.Contains("rows", StringComparison.Ordinal));
        Assert.Contains(points.Wrong, w => w.Contains("rows", StringComparison.Ordinal));
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

        // A plain glob beside the worker (one row published first: a glob that matches no file is an error) and the compactions (the swap on Linux): never a unit twice, never one it saw
        // before missing (rows only ever arrive, so the count never goes down).
        var seen = new ReaderLog();
        long last = 0;
        var glob = $"SELECT count(*), count(DISTINCT unit_key) FROM read_parquet({Glob(options.Output, "summaries")})";
        using var stop = new CancellationTokenSource();
        var started = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        await new ParquetSummaryWriter(options.Output, "seed").WriteAsync([new SummaryRecord { UnitKey = "seed", SourceFile = "seed.csv", Ruling = "rejected", ProcessedAt = new DateTime(2000, 1, 1, 0, 0, 0, DateTimeKind.Utc), TestStart = new DateTime(2000, 1, 1, 0, 0, 0, DateTimeKind.Utc) }], CancellationToken.None);
        var reader = OperatingSystem.IsLinux()
            ? StartReader(glob, (n, d) =>
            {
                var wrong = n != d ? $"{n} rows but {d} units" : d < last ? $"{d} units after {last}" : null;
                last = Math.Max(last, d);
                return wrong;
            }, seen, () => true, started, stop.Token)
            : null;
        if (reader is null)
        {
            started.SetResult();
        }

        await started.Task.WaitAsync(Timeout);
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
            await CompactAllAsync(options.Output);
            var read = await ReportReader.ReadAsync(options.Output, null, null, DateTime.UtcNow, "test");
            Assert.Equal(read.Rows.Length, read.Rows.Select(r => r.UnitKey).Distinct(StringComparer.Ordinal).Count());
            compactions++;
        }

        await worker.WaitAsync(Timeout);
        await CompactAllAsync(options.Output);
        await stop.CancelAsync();
        Assert.True(reader?.Join(Timeout) ?? true);
        log.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{compactions} compaction passes; glob: {seen.Queries} queries, {seen.Retried} retried"));
        Assert.Empty(seen.Wrong);
        Assert.All(seen.Failures, f => Assert.True(Vanished(f), f));
        Assert.Equal(Units + 1, Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(options.Output, "summaries")})"));
        Assert.Equal(Units + 1, Scalar($"SELECT count(DISTINCT unit_key) AS n FROM read_parquet({Glob(options.Output, "summaries")})"));
        Assert.Equal(Units * 21, Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(options.Output, "points")})"));
    }

    [LinuxFact]
    public async Task A_file_published_while_the_merged_file_is_written_is_carried_into_the_swapped_folder_and_no_writer_gets_in_while_the_swap_holds_the_lock()
    {
        using var root = new TempFolder();
        var options = await DemoOutputAsync(root);
        var units = DemoSet.Expected.Count;
        var partition = Directory.GetDirectories(Path.Combine(options.Output, "summaries")).Order(StringComparer.Ordinal).First();
        var day = DateTime.ParseExact(Path.GetFileName(partition)["date=".Length..], "yyyy-MM-dd", CultureInfo.InvariantCulture, DateTimeStyles.AdjustToUniversal | DateTimeStyles.AssumeUniversal);
        var late = new ParquetSummaryWriter(options.Output, "late", "late-worker");
        var lockBusy = false;
        var published = false;
        var compactor = Compactor(options.Output, afterStep: step =>
        {
            if (step == "written" && !published)
            {
                published = true;
                // The merged file is being written in the staged folder: a worker publishes into the live one meanwhile.
                late.WriteAsync([new SummaryRecord { UnitKey = "late-1", SourceFile = "late.csv", Ruling = "rejected", TestStart = day.AddHours(1), ProcessedAt = day.AddHours(1) }], [], CancellationToken.None).GetAwaiter().GetResult();
            }
            else if (step == "linked")
            {
                // The swap holds the lock: a writer cannot start a file now.
                try
                {
                    PublishLock.Shared(Path.Combine(options.Output, "summaries"), TimeSpan.Zero).Dispose();
                }
                catch (IOException)
                {
                    lockBusy = true;
                }
            }
        });

        var results = await CompactAllAsync(compactor, only: Path.GetFileName(partition));
        Assert.True(lockBusy);
        Assert.Equal(CompactProtocol.Swap, results[0].Protocol);
        Assert.True(File.Exists(Path.Combine(partition, "late-00001.parquet")));
        Assert.Equal(units + 1, Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(options.Output, "summaries")})"));
        Assert.Equal(1, Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(options.Output, "summaries")}) WHERE unit_key = 'late-1'"));
        Assert.Equal(2, Directory.GetFiles(partition, "*.parquet").Length);

        // The next compaction merges it too.
        await CompactAllAsync(Compactor(options.Output), only: Path.GetFileName(partition));
        Assert.Single(Directory.GetFiles(partition, "*.parquet"));
        Assert.Equal(units + 1, Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(options.Output, "summaries")})"));
    }

    [LinuxFact]
    public async Task A_crashed_workers_committed_temporary_file_survives_a_swap_and_its_recovery_publishes_it_once()
    {
        using var root = new TempFolder();
        var options = await DemoOutputAsync(root);
        var units = DemoSet.Expected.Count;
        var partition = Directory.GetDirectories(Path.Combine(options.Output, "summaries")).Order(StringComparer.Ordinal).First();

        // What a worker killed between its journal commit and its rename leaves: a flushed file under its temporary name.
        var scratch = Path.Combine(root.Path, "scratch");
        var day = DateTime.ParseExact(Path.GetFileName(partition)["date=".Length..], "yyyy-MM-dd", CultureInfo.InvariantCulture, DateTimeStyles.AdjustToUniversal | DateTimeStyles.AssumeUniversal);
        Directory.CreateDirectory(scratch);
        await new ParquetSummaryWriter(scratch, "crashed").WriteAsync([new SummaryRecord { UnitKey = "crashed-1", SourceFile = "c.csv", Ruling = "rejected", TestStart = day, ProcessedAt = day }], CancellationToken.None);
        var crashed = new ParquetSummaryWriter(options.Output, "crashed", "crashed-worker");
        var final = Path.Combine(partition, "crashed-00001.parquet");
        File.Copy(Directory.GetFiles(Path.Combine(scratch, "summaries", Path.GetFileName(partition)))[0], crashed.TemporaryOf(final));

        var results = await CompactAllAsync(Compactor(options.Output), only: Path.GetFileName(partition));
        Assert.Equal(CompactProtocol.Swap, results[0].Protocol);
        Assert.True(File.Exists(crashed.TemporaryOf(final)));
        Assert.Equal(units, Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(options.Output, "summaries")})"));

        // Its recovery (the journal names the final file) renames it in the swapped folder.
        Assert.True(crashed.RollForward(crashed.Relative(final)));
        Assert.Equal(units + 1, Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(options.Output, "summaries")})"));
        Assert.True(crashed.RollForward(crashed.Relative(final)));
        Assert.Equal(units + 1, Scalar($"SELECT count(DISTINCT unit_key) AS n FROM read_parquet({Glob(options.Output, "summaries")})"));
    }

    [LinuxFact]
    public async Task A_swap_that_writers_keep_waiting_leaves_the_folder_as_it_was_for_the_next_compact()
    {
        using var root = new TempFolder();
        var options = await DemoOutputAsync(root);
        var partition = Directory.GetDirectories(Path.Combine(options.Output, "summaries")).Order(StringComparer.Ordinal).First();
        var files = Directory.GetFiles(partition).Order(StringComparer.Ordinal).ToList();

        using (PublishLock.Shared(Path.Combine(options.Output, "summaries")))
        {
            var compactor = new PartitionCompactor(options.Output, TimeProvider.System) { MinimumAge = TimeSpan.Zero, SwapWait = TimeSpan.FromMilliseconds(200) };
            using var held = compactor.Lock(CompactTable.Summaries);
            var result = await compactor.CompactAsync(CompactTable.Summaries, partition, compactor.NewId());
            Assert.Null(result.Merged);
            Assert.Contains(result.Skipped, s => s.Contains("writers kept files in flight", StringComparison.Ordinal));
        }

        Assert.Equal(files, Directory.GetFiles(partition).Order(StringComparer.Ordinal).ToList());
        Assert.Empty(Directory.GetFileSystemEntries(Path.Combine(options.Output, PartitionCompactor.StagingFolderName)));
    }

    [LinuxFact]
    public async Task The_old_folder_of_a_swap_is_kept_whole_for_the_grace_and_deleted_by_a_compaction_after_it()
    {
        using var root = new TempFolder();
        var options = await DemoOutputAsync(root);
        var clock = new ManualClock(DateTimeOffset.UtcNow.AddMinutes(1));
        var compactor = new PartitionCompactor(options.Output, clock) { MinimumAge = TimeSpan.Zero };
        var partition = Directory.GetDirectories(Path.Combine(options.Output, "summaries")).Order(StringComparer.Ordinal).First();
        var before = Directory.GetFiles(partition, "*.parquet").Select(Path.GetFileName).Order(StringComparer.Ordinal).ToList();
        using (compactor.Lock(CompactTable.Summaries))
        {
            Assert.Equal(CompactProtocol.Swap, (await compactor.CompactAsync(CompactTable.Summaries, partition, compactor.NewId())).Protocol);

            // The old directory, retired: exactly the files the live folder held before (the inputs), unchanged.
            var retired = Assert.Single(Directory.GetDirectories(Path.Combine(options.Output, PartitionCompactor.StagingFolderName)));
            Assert.Contains(".retired~", retired, StringComparison.Ordinal);
            Assert.Equal(before, Directory.GetFiles(retired, "*.parquet").Select(Path.GetFileName).Order(StringComparer.Ordinal).ToList());

            clock.Advance(TimeSpan.FromMinutes(9));
            Assert.Equal(0, compactor.SweepRetired(CompactTable.Summaries));
            Assert.True(Directory.Exists(retired));
            clock.Advance(TimeSpan.FromMinutes(1));
            Assert.Equal(1, compactor.SweepRetired(CompactTable.Summaries));
            Assert.False(Directory.Exists(retired));
        }

        Assert.Equal(DemoSet.Expected.Count, Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(options.Output, "summaries")})"));
    }

    [LinuxFact]
    public async Task A_file_system_that_refuses_the_swap_gets_the_file_protocol_and_the_result_says_why()
    {
        using var root = new TempFolder();
        var options = await DemoOutputAsync(root);
        var units = DemoSet.Expected.Count;

        // The staging folder on another file system (a tmpfs): hard links across file systems fail with EXDEV.
        var elsewhere = Path.Combine("/dev/shm", "standfit-test-" + Guid.NewGuid().ToString("N")[..12]);
        Directory.CreateDirectory(elsewhere);
        try
        {
            Directory.CreateSymbolicLink(Path.Combine(options.Output, PartitionCompactor.StagingFolderName), elsewhere);
            var results = await CompactAllAsync(new PartitionCompactor(options.Output, TimeProvider.System) { MinimumAge = TimeSpan.Zero });
            Assert.All(results.Where(r => r.Merged is not null), r =>
            {
                Assert.Equal(CompactProtocol.Files, r.Protocol);
                Assert.Contains("errno 18", r.SwapRefused, StringComparison.Ordinal);
            });
            Assert.Equal(units, Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(options.Output, "summaries")})"));
            Assert.Empty(Directory.GetFileSystemEntries(elsewhere));
        }
        finally
        {
            Directory.Delete(elsewhere, recursive: true);
        }
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

        var compactor = Compactor(output);
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

        // The running watch goes on replacing its row in the swapped folder.
        using (var recorder = new RunRecorder(output, "run-2", "run", "w", at.AddHours(2), "test", "hash"))
        {
            await recorder.WriteAsync(new BatchCounts(), at.AddHours(3), RunStates.Finished);
        }

        Assert.Equal(0, Scalar($"SELECT count(*) AS n FROM read_parquet({Duck.Literal(Path.Combine(output, "runs", "*.parquet"))}) WHERE state = 'running'"));
        Assert.Equal(3, Scalar($"SELECT count(*) AS n FROM read_parquet({Duck.Literal(Path.Combine(output, "runs", "*.parquet"))})"));
    }

    [Fact]
    public async Task The_compact_command_dry_run_changes_nothing_and_a_held_lock_exits_with_three()
    {
        using var root = new TempFolder();
        var options = await DemoOutputAsync(root);
        List<string> Files() => [.. Directory.EnumerateFiles(options.Output, "*", SearchOption.AllDirectories).Where(f => !f.EndsWith(".lock", StringComparison.Ordinal)).Order(StringComparer.Ordinal)];
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
        Assert.Contains(OperatingSystem.IsLinux() ? "folder swapped in one step" : "readers must follow the reader rule", run.Output, StringComparison.Ordinal);
        Assert.Equal(DemoSet.Expected.Count, Scalar($"SELECT count(*) AS n FROM read_parquet({Glob(options.Output, "summaries")})"));
    }
}
