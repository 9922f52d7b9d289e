using Microsoft.Extensions.Logging.Abstractions;
using StandFit.Edges.Configuration;
using StandFit.Edges.Folders;
using StandFit.Edges.Processing;
using StandFit.Tests.Support;

namespace StandFit.Tests.Worker;

/// <summary>Duplicates, retests, restarts, several workers on one inbox, and a clock that jumps back.</summary>
public sealed class ExactlyOnceTests
{
    private const int Seed = 4242;

    private static StandFitOptions Options(TempFolder root, string workerId = "test-worker")
    {
        var options = ConfigLoader.Load(WorkerConfig.Write(root, flushUnits: 8, workerId: workerId)).Value;
        Assert.Empty(ConfigLoader.PrepareFolders(options, needInbox: true));
        return options;
    }

    private static async Task<BatchCounts> PassAsync(StandFitOptions options, TimeProvider? clock = null)
    {
        using var pipeline = Pipeline.Build(options, NullLoggerFactory.Instance, DispositionMode.Move, clock ?? TimeProvider.System);
        return await pipeline.Runner.ProcessAsync(DropFolder.ListReady(options.Inbox), CancellationToken.None);
    }

    private static List<Dictionary<string, object?>> Rows(StandFitOptions options) =>
        Duck.Query($"SELECT source_file, unit_key, retest_of, serial, ruling FROM read_parquet({Duck.Literal(Path.Combine(options.Output, "summaries", "**", "*.parquet"))}) ORDER BY processed_at, source_file");

    [Fact]
    public async Task The_same_bytes_dropped_again_are_a_duplicate_with_no_new_row_even_after_a_restart()
    {
        using var root = new TempFolder();
        var options = Options(root);
        var text = SweepFiles.Text(1, Seed);
        SweepFiles.Drop(options.Inbox, "unit-a.csv", text);
        Assert.Equal(1, (await PassAsync(options)).Processed);

        SweepFiles.Drop(options.Inbox, "unit-a-again.csv", text);
        var second = await PassAsync(options); // a new process: the journal is read at start
        Assert.Equal(0, second.Processed);
        Assert.Equal(1, second.Duplicates);

        var row = Assert.Single(Rows(options));
        Assert.Equal("unit-a.csv", row["source_file"]);
        var sidecar = File.ReadAllText(Assert.Single(Directory.EnumerateFiles(options.Rejected, "unit-a-again.csv.rejected.txt", SearchOption.AllDirectories)));
        Assert.Contains("code: input.duplicate\n", sidecar, StringComparison.Ordinal);
        Assert.Contains("ruled " + row["ruling"], sidecar, StringComparison.Ordinal);
        var lines = Directory.EnumerateFiles(Path.Combine(options.Output, "passfail")).SelectMany(File.ReadAllLines).ToList();
        Assert.Equal(2, lines.Count);
        var duplicateLine = Assert.Single(lines, l => l.Contains(" DUPLICATE ", StringComparison.Ordinal));
        Assert.EndsWith(" reasons=input.duplicate key=" + row["unit_key"], duplicateLine, StringComparison.Ordinal);
    }

    [Fact]
    public async Task Two_copies_in_one_batch_give_one_row_and_one_duplicate()
    {
        using var root = new TempFolder();
        var options = Options(root);
        var text = SweepFiles.Text(7, Seed);
        SweepFiles.Drop(options.Inbox, "x-1.csv", text);
        SweepFiles.Drop(options.Inbox, "x-2.csv", text);

        var counts = await PassAsync(options);

        Assert.Equal(1, counts.Processed);
        Assert.Equal(1, counts.Duplicates);
        Assert.Equal("x-1.csv", Assert.Single(Rows(options))["source_file"]);
        Assert.Single(Directory.EnumerateFiles(options.Rejected, "x-2.csv", SearchOption.AllDirectories));
    }

    [Fact]
    public async Task The_same_serial_with_new_content_is_a_retest_linked_to_the_earlier_result()
    {
        using var root = new TempFolder();
        var options = Options(root);
        var first = SweepFiles.Text(3, Seed);
        SweepFiles.Drop(options.Inbox, "first.csv", first);
        await PassAsync(options);
        var retest = SweepFiles.Text(3, Seed + 1); // same serial, other readings
        Assert.NotEqual(first, retest);
        SweepFiles.Drop(options.Inbox, "retest.csv", retest);
        await PassAsync(options);
        var third = SweepFiles.Text(3, Seed + 2);
        SweepFiles.Drop(options.Inbox, "third.csv", third);
        await PassAsync(options);

        var rows = Rows(options).ToDictionary(r => (string)r["source_file"]!, StringComparer.Ordinal);
        Assert.Null(rows["first.csv"]["retest_of"]);
        Assert.Equal(rows["first.csv"]["unit_key"], rows["retest.csv"]["retest_of"]);
        Assert.Equal(rows["retest.csv"]["unit_key"], rows["third.csv"]["retest_of"]);
        Assert.Equal(rows["first.csv"]["serial"], rows["third.csv"]["serial"]);
    }

    [Fact]
    public async Task Several_workers_on_one_inbox_never_process_the_same_file()
    {
        using var root = new TempFolder();
        var a = Options(root, "worker-a");
        var b = a with { WorkerId = "worker-b" };
        SweepFiles.Write(a.Inbox, 300, Seed);
        var ready = DropFolder.ListReady(a.Inbox);

        using var pa = Pipeline.Build(a, NullLoggerFactory.Instance, DispositionMode.Move, TimeProvider.System);
        using var pb = Pipeline.Build(b, NullLoggerFactory.Instance, DispositionMode.Move, TimeProvider.System);
        var start = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        var runA = Task.Run(async () => { await start.Task; return await pa.Runner.ProcessAsync(ready, CancellationToken.None); });
        var runB = Task.Run(async () => { await start.Task; return await pb.Runner.ProcessAsync(ready.Reverse().ToList(), CancellationToken.None); });
        start.SetResult();
        var counts = await Task.WhenAll(runA, runB).WaitAsync(TimeSpan.FromMinutes(2));

        Assert.Equal(300, counts[0].Processed + counts[1].Processed);
        Assert.True(counts[0].Processed > 0 && counts[1].Processed > 0, "both workers should have taken files");
        Assert.Equal(0, counts[0].Duplicates + counts[1].Duplicates);
        var rows = Rows(a);
        Assert.Equal(300, rows.Count);
        Assert.Equal(300, rows.Select(r => r["source_file"]).Distinct().Count());
        Assert.Equal(300, Directory.EnumerateFiles(a.Archive, "*.csv", SearchOption.AllDirectories).Count());
        Assert.Empty(Directory.EnumerateFiles(a.Inbox, "*", SearchOption.AllDirectories));
    }

    [Fact]
    public void A_second_process_with_the_same_worker_id_is_refused()
    {
        using var root = new TempFolder();
        var options = Options(root);
        using var first = Pipeline.Build(options, NullLoggerFactory.Instance, DispositionMode.Move, TimeProvider.System);

        Assert.Throws<WorkerBusyException>(() => Pipeline.Build(options, NullLoggerFactory.Instance, DispositionMode.Move, TimeProvider.System));
    }

    [Fact]
    public async Task A_clock_that_jumps_back_changes_only_the_archive_date_never_the_partitions()
    {
        using var root = new TempFolder();
        var options = Options(root);
        var clock = new ManualClock(new DateTimeOffset(2026, 12, 5, 12, 0, 0, TimeSpan.Zero));
        SweepFiles.Drop(options.Inbox, "before.csv", SweepFiles.Text(10, Seed));
        await PassAsync(options, clock);
        clock.SetWallClock(new DateTimeOffset(2026, 1, 1, 0, 0, 0, TimeSpan.Zero)); // the PC's clock jumps back eleven months
        SweepFiles.Drop(options.Inbox, "after.csv", SweepFiles.Text(11, Seed));
        SweepFiles.Drop(options.Inbox, "after-retest.csv", SweepFiles.Text(10, Seed + 5));
        await PassAsync(options, clock);

        var partitions = Directory.EnumerateDirectories(Path.Combine(options.Output, "summaries")).Select(Path.GetFileName).ToList();
        Assert.Equal(["date=2026-11-30"], partitions); // the test starts (SweepFiles: 2026-11-30T22:00Z onwards)
        Assert.Single(Directory.EnumerateFiles(Path.Combine(options.Archive, "2026-12-05"), "before.csv"));
        Assert.Single(Directory.EnumerateFiles(Path.Combine(options.Archive, "2026-01-01"), "after.csv"));
        var rows = Rows(options).ToDictionary(r => (string)r["source_file"]!, StringComparer.Ordinal);
        Assert.Equal(rows["before.csv"]["unit_key"], rows["after-retest.csv"]["retest_of"]);
        Assert.Equal(3, rows.Count);
        Assert.Equal(2, Directory.EnumerateFiles(Path.Combine(options.Output, "passfail")).Count());
    }
}
