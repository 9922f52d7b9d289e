using System.Globalization;
using Microsoft.Extensions.Logging.Abstractions;
using StandFit.Edges.Configuration;
using StandFit.Edges.Folders;
using StandFit.Edges.Outputs;
using StandFit.Edges.Processing;
using StandFit.Edges.Worker;
using StandFit.Tests.Support;

namespace StandFit.Tests.Worker;

/// <summary>The runs table: a row for each run and each life of a worker, rewritten while watch works and at its shutdown.</summary>
public sealed class RunsTableTests
{
    private static readonly TimeSpan Timeout = TimeSpan.FromMinutes(2);

    private static List<Dictionary<string, object?>> Runs(string output) =>
        Duck.Query($"SELECT * FROM read_parquet({Duck.Literal(Path.Combine(output, "runs", "*.parquet"))}) ORDER BY started_at, run_id");

    private static long Long(object? value) => Convert.ToInt64(value, CultureInfo.InvariantCulture);

    [Fact]
    public async Task A_second_run_over_the_same_inputs_gets_its_own_row_counting_only_duplicates()
    {
        using var root = new TempFolder();
        var config = DemoSet.WriteConfig(root);
        var first = await StandFitProcess.RunAsync(root.Path, Timeout, "run", "--config", config, "--from", DemoSet.Folder, "--quiet");
        var second = await StandFitProcess.RunAsync(root.Path, Timeout, "run", "--config", config, "--from", DemoSet.Folder, "--quiet");
        Assert.Equal(0, first.ExitCode);
        Assert.Equal(0, second.ExitCode);

        var runs = Runs(Path.Combine(root.Path, "output"));

        Assert.Equal(2, runs.Count);
        Assert.NotEqual(runs[0]["run_id"], runs[1]["run_id"]);
        Assert.Equal(50L, Long(runs[0]["processed"]));
        Assert.Equal(0L, Long(runs[0]["duplicate"]));
        Assert.Equal(0L, Long(runs[1]["processed"]));
        Assert.Equal(0L, Long(runs[1]["pass"]));
        Assert.Equal(50L, Long(runs[1]["duplicate"]));
        Assert.All(runs, r => Assert.Equal("finished", r["state"]));
    }

    [Fact]
    public async Task The_worker_rewrites_its_row_while_it_works_and_finishes_it_at_shutdown()
    {
        using var root = new TempFolder();
        var options = ConfigLoader.Load(WorkerConfig.Write(root)).Value;
        Assert.Empty(ConfigLoader.PrepareFolders(options, needInbox: true));
        using var pipeline = Pipeline.Build(options, NullLoggerFactory.Instance, DispositionMode.Move, TimeProvider.System);
        using var recorder = pipeline.NewRunRecorder("watch");
        var settings = new LoopSettings { Poll = TimeSpan.FromMilliseconds(100), Stable = TimeSpan.Zero, RunRecordInterval = TimeSpan.FromMilliseconds(100) };
        var loop = new InboxLoop(options.Inbox, pipeline.Runner, pipeline.Recipes, settings, TimeProvider.System, NullLogger.Instance, recorder);
        var allJudged = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        var snapshotAfterWork = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        var states = new List<string>();
        var expected = DemoSet.Expected.Count;
        loop.PassCompleted += _ =>
        {
            if (loop.Totals.Processed >= DemoSet.Expected.Count)
            {
                allJudged.TrySetResult();
            }
        };
        loop.RunRecorded += row =>
        {
            lock (states)
            {
                states.Add(row.State);
            }

            if (row.State == RunStates.Running && row.Processed == expected)
            {
                snapshotAfterWork.TrySetResult();
            }
        };

        DemoSet.CopyInto(options.Inbox);
        using var stop = new CancellationTokenSource();
        var running = loop.RunAsync(stop.Token);
        await allJudged.Task.WaitAsync(Timeout);
        await snapshotAfterWork.Task.WaitAsync(Timeout);

        // While it works: a row in state running with the counts so far.
        var during = Assert.Single(Runs(options.Output));
        Assert.Equal("running", during["state"]);
        Assert.Equal("watch", during["command"]);
        Assert.Equal(options.WorkerId, during["worker_id"]);
        Assert.Equal(50L, Long(during["processed"]));

        await stop.CancelAsync();
        await running.WaitAsync(Timeout);

        // At shutdown: the same row (the same file), finished, with the totals.
        var after = Assert.Single(Runs(options.Output));
        Assert.Equal(during["run_id"], after["run_id"]);
        Assert.Equal("finished", after["state"]);
        Assert.Equal(34L, Long(after["pass"]));
        Assert.Equal(8L, Long(after["rejected"]));
        Assert.True((DateTime)after["ended_at"]! >= (DateTime)during["ended_at"]!);
        Assert.Equal(RunStates.Finished, states[^1]);
        Assert.Empty(Directory.EnumerateFiles(Path.Combine(options.Output, "runs"), "*.tmp"));
    }

    [Fact]
    public async Task A_runs_row_that_cannot_be_written_is_reported_and_never_thrown()
    {
        using var root = new TempFolder();
        using var recorder = new RunRecorder(Path.Combine(root.Path, "missing"), "run-x", "run", "w", DateTime.UtcNow, "t", "h");
        var log = new CapturingLogger();

        Assert.Null(await recorder.TryWriteAsync(new BatchCounts(), DateTime.UtcNow, RunStates.Finished, log));
        Assert.Null(await recorder.TryWriteAsync(new BatchCounts(), DateTime.UtcNow, RunStates.Finished, log));

        Assert.Equal(1, log.Count(2009));
    }
}
