using System.Globalization;
using Microsoft.Extensions.Logging.Abstractions;
using StandFit.Edges.Configuration;
using StandFit.Edges.Folders;
using StandFit.Edges.Processing;
using StandFit.Edges.Worker;
using StandFit.Tests.Support;

namespace StandFit.Tests.Worker;

/// <summary>
/// The flush policy on count and age (output.flush_units, output.flush_seconds): many units per
/// Parquet file, a quiet inbox still published within the age limit (on a hand-moved clock, no
/// sleeps), waiting units published at a clean stop, and judged again after a crash.
/// </summary>
public sealed class FlushPolicyTests
{
    private const int Seed = 808;
    private static readonly TimeSpan Timeout = TimeSpan.FromMinutes(2);
    private static readonly DateTimeOffset Start = new(2026, 12, 2, 6, 0, 0, TimeSpan.Zero);

    private static StandFitOptions Options(TempFolder root, int flushUnits, double flushSeconds)
    {
        var options = ConfigLoader.Load(WorkerConfig.Write(root, flushUnits: flushUnits, flushSeconds: flushSeconds)).Value;
        Assert.Empty(ConfigLoader.PrepareFolders(options, needInbox: true));
        return options;
    }

    private static void Drop(StandFitOptions options, int from, int count)
    {
        for (var i = from; i < from + count; i++)
        {
            SweepFiles.Drop(options.Inbox, string.Create(CultureInfo.InvariantCulture, $"unit-{i:D3}.csv"), SweepFiles.Text(i, Seed));
        }
    }

    private static List<string> SummaryFiles(StandFitOptions options) =>
        Directory.Exists(Path.Combine(options.Output, "summaries"))
            ? [.. Directory.EnumerateFiles(Path.Combine(options.Output, "summaries"), "*.parquet", SearchOption.AllDirectories).Order(StringComparer.Ordinal)]
            : [];

    private static long Rows(string glob) => (long)Duck.Query($"SELECT count(*) AS n FROM read_parquet({Duck.Literal(glob)})")[0]["n"]!;

    private static async Task WaitForAsync(Func<bool> condition)
    {
        // Waits for the loop under test to reach a state (its delay timer created); the test's clock does not move meanwhile.
        var deadline = DateTime.UtcNow + Timeout;
        while (!condition())
        {
            Assert.True(DateTime.UtcNow < deadline, "timed out waiting for the loop");
            await Task.Delay(5);
        }
    }

    [Fact]
    public async Task A_quiet_inbox_gets_its_units_published_once_the_oldest_has_waited_flush_seconds()
    {
        using var root = new TempFolder();
        var options = Options(root, flushUnits: 16, flushSeconds: 30);
        var clock = new ManualClock(Start);
        using var pipeline = Pipeline.Build(options, NullLoggerFactory.Instance, DispositionMode.Move, clock, flushAge: TimeSpan.FromSeconds(options.FlushSeconds));
        var loop = new InboxLoop(options.Inbox, pipeline.Runner, pipeline.Recipes, new LoopSettings { Poll = TimeSpan.FromHours(1), Stable = TimeSpan.Zero }, clock, NullLogger.Instance);
        var firstPass = new TaskCompletionSource<int>(TaskCreationOptions.RunContinuationsAsynchronously);
        var published = new TaskCompletionSource<int>(TaskCreationOptions.RunContinuationsAsynchronously);
        loop.PassCompleted += counts =>
        {
            firstPass.TrySetResult(counts.Processed);
            if (counts.Processed > 0)
            {
                published.TrySetResult(counts.Processed);
            }
        };

        Drop(options, 0, 3);
        using var stop = new CancellationTokenSource();
        var running = loop.RunAsync(stop.Token);
        Assert.Equal(0, await firstPass.Task.WaitAsync(Timeout));

        // Taken and judged, but waiting: claimed out of the inbox, nothing written yet.
        Assert.Equal(3, pipeline.Runner.Pending);
        Assert.Empty(DropFolder.ListReady(options.Inbox));
        Assert.Empty(SummaryFiles(options));
        Assert.False(Directory.Exists(Path.Combine(options.Output, "passfail")) && Directory.EnumerateFiles(Path.Combine(options.Output, "passfail")).Any());

        // The loop sleeps until the units are due (30 s), not until its next rescan (an hour).
        await WaitForAsync(() => clock.WaitingTimers > 0);
        Assert.Equal(TimeSpan.FromSeconds(30), pipeline.Runner.UntilFlush());
        clock.Advance(TimeSpan.FromSeconds(29));
        Assert.Equal(3, pipeline.Runner.Pending);
        Assert.False(published.Task.IsCompleted);
        clock.Advance(TimeSpan.FromSeconds(1));
        Assert.Equal(3, await published.Task.WaitAsync(Timeout));

        // One batch: one summary file holding the three rows, three pass/fail lines, inputs archived.
        var files = SummaryFiles(options);
        Assert.Single(files);
        Assert.Equal(3, Rows(files[0]));
        Assert.Equal(0, pipeline.Runner.Pending);
        Assert.Equal(3, Directory.EnumerateFiles(Path.Combine(options.Output, "passfail")).SelectMany(File.ReadAllLines).Count());
        Assert.Equal(3, Directory.EnumerateFiles(options.Archive, "*.csv", SearchOption.AllDirectories).Count());
        Assert.Empty(Directory.EnumerateFiles(pipeline.Claims!.Folder));

        await stop.CancelAsync();
        await running.WaitAsync(Timeout);
    }

    [Fact]
    public async Task A_batch_is_published_as_soon_as_flush_units_units_wait_and_the_rest_waits_for_its_age()
    {
        using var root = new TempFolder();
        var options = Options(root, flushUnits: 4, flushSeconds: 600);
        var clock = new ManualClock(Start);
        using var pipeline = Pipeline.Build(options, NullLoggerFactory.Instance, DispositionMode.Move, clock, flushAge: TimeSpan.FromSeconds(options.FlushSeconds));
        Drop(options, 0, 10);

        var first = await pipeline.Runner.ProcessAsync(DropFolder.ListReady(options.Inbox), CancellationToken.None);
        Assert.Equal(8, first.Processed);
        Assert.Equal(2, pipeline.Runner.Pending);
        var files = SummaryFiles(options);
        Assert.Equal(2, files.Count);
        Assert.All(files, f => Assert.Equal(4, Rows(f)));

        // Nine minutes later a pass with nothing new publishes nothing; at ten the two waiting units go.
        clock.Advance(TimeSpan.FromMinutes(9));
        Assert.Equal(0, (await pipeline.Runner.ProcessAsync([], CancellationToken.None)).Processed);
        clock.Advance(TimeSpan.FromMinutes(1));
        Assert.Equal(2, (await pipeline.Runner.ProcessAsync([], CancellationToken.None)).Processed);
        Assert.Equal(3, SummaryFiles(options).Count);
        Assert.Equal(10, Rows(Path.Combine(options.Output, "summaries", "**", "*.parquet")));
    }

    [Fact]
    public async Task A_clean_stop_publishes_the_units_that_wait()
    {
        using var root = new TempFolder();
        var options = Options(root, flushUnits: 16, flushSeconds: 3600);
        var clock = new ManualClock(Start);
        using var pipeline = Pipeline.Build(options, NullLoggerFactory.Instance, DispositionMode.Move, clock, flushAge: TimeSpan.FromSeconds(options.FlushSeconds));
        var loop = new InboxLoop(options.Inbox, pipeline.Runner, pipeline.Recipes, new LoopSettings { Poll = TimeSpan.FromHours(1), Stable = TimeSpan.Zero }, clock, NullLogger.Instance);
        var firstPass = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        loop.PassCompleted += _ => firstPass.TrySetResult();
        Drop(options, 0, 5);
        using var stop = new CancellationTokenSource();
        var running = loop.RunAsync(stop.Token);
        await firstPass.Task.WaitAsync(Timeout);
        Assert.Equal(5, pipeline.Runner.Pending);

        await stop.CancelAsync();
        await running.WaitAsync(Timeout);
        Assert.Equal(5, loop.Totals.Processed);
        Assert.Equal(0, pipeline.Runner.Pending);
        Assert.Equal(5, Rows(Path.Combine(options.Output, "summaries", "**", "*.parquet")));
        Assert.Empty(Directory.EnumerateFiles(pipeline.Claims!.Folder));
    }

    [Fact]
    public async Task Units_waiting_when_the_worker_dies_are_judged_again_at_the_next_start_exactly_once()
    {
        using var root = new TempFolder();
        var options = Options(root, flushUnits: 16, flushSeconds: 3600);
        var clock = new ManualClock(Start);
        Drop(options, 0, 6);
        var crashed = Pipeline.Build(options, NullLoggerFactory.Instance, DispositionMode.Move, clock, flushAge: TimeSpan.FromSeconds(options.FlushSeconds));
        Assert.Equal(0, (await crashed.Runner.ProcessAsync(DropFolder.ListReady(options.Inbox), CancellationToken.None)).Processed);
        Assert.Equal(6, crashed.Runner.Pending);
        var claimFolder = crashed.Claims!.Folder;
        Assert.Equal(6, Directory.EnumerateFiles(claimFolder).Count());

        // The process dies: its memory is gone, only what is on disk counts (the lock is released by the OS).
        crashed.Dispose();
        Assert.Empty(SummaryFiles(options));

        using var restarted = Pipeline.Build(options, NullLoggerFactory.Instance, DispositionMode.Move, clock);
        var counts = await restarted.Runner.ProcessAsync(DropFolder.ListReady(options.Inbox), CancellationToken.None);
        Assert.Equal(6, counts.Processed);
        Assert.Equal(0, counts.Duplicates);
        Assert.Equal(6, Rows(Path.Combine(options.Output, "summaries", "**", "*.parquet")));
        Assert.Equal(6, (long)Duck.Query($"SELECT count(DISTINCT unit_key) AS n FROM read_parquet({Duck.Literal(Path.Combine(options.Output, "summaries", "**", "*.parquet"))})")[0]["n"]!);
        Assert.Empty(Directory.EnumerateFiles(claimFolder));
        Assert.Equal(6, Directory.EnumerateFiles(options.Archive, "*.csv", SearchOption.AllDirectories).Count());
    }

    [Fact]
    public void Flush_settings_out_of_range_are_all_reported_at_once_with_their_places()
    {
        using var root = new TempFolder();
        var path = root.File("standfit.yaml", """
            folders:
              inbox: inbox
              archive: archive
              rejected: rejected
              output: output
              recipes: recipes
              logs: logs
            output:
              flush_units: 60000
              flush_seconds: -1
            """);
        var problems = ConfigLoader.Load(path).Problems.Select(p => p.ToString()).ToList();
        Assert.Equal(
            [
                "standfit.yaml:9:16: 'output.flush_units' is 60000; it must be at most 50000. [recipe.bad_value]",
                "standfit.yaml:10:18: 'output.flush_seconds' is -1; it must be from 0 to 3600. [recipe.bad_value]",
            ],
            problems);

        File.WriteAllText(path, File.ReadAllText(path).Replace("60000", "0", StringComparison.Ordinal).Replace("-1", "3600.5", StringComparison.Ordinal));
        Assert.Equal(
            [
                "standfit.yaml:9:16: 'output.flush_units' is 0; it must be above zero. [recipe.bad_value]",
                "standfit.yaml:10:18: 'output.flush_seconds' is 3600.5; it must be from 0 to 3600. [recipe.bad_value]",
            ],
            ConfigLoader.Load(path).Problems.Select(p => p.ToString()).ToList());
    }
}
