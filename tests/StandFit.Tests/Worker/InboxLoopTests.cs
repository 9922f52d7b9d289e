using Microsoft.Extensions.Logging.Abstractions;
using StandFit.Edges.Configuration;
using StandFit.Edges.Folders;
using StandFit.Edges.Processing;
using StandFit.Edges.Worker;
using StandFit.Tests.Support;

namespace StandFit.Tests.Worker;

/// <summary>The watch loop as a plain class, with no host: files dropped while it runs are judged and archived.</summary>
public sealed class InboxLoopTests
{
    private static readonly TimeSpan Timeout = TimeSpan.FromMinutes(2);

    [Fact]
    public async Task Files_dropped_into_a_running_inbox_are_judged_and_leave_the_inbox()
    {
        using var root = new TempFolder();
        var options = ConfigLoader.Load(DemoSet.WriteConfig(root)).Value;
        Assert.Empty(ConfigLoader.PrepareFolders(options, needInbox: true));
        using var pipeline = Pipeline.Build(options, NullLoggerFactory.Instance, DispositionMode.Move, TimeProvider.System);
        var loop = new InboxLoop(options.Inbox, pipeline.Runner, pipeline.Recipes, new LoopSettings { Poll = TimeSpan.FromMilliseconds(200), Stable = TimeSpan.Zero }, TimeProvider.System, NullLogger.Instance);
        var allJudged = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        var firstPass = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        loop.PassCompleted += _ =>
        {
            firstPass.TrySetResult();
            if (loop.Totals.Processed >= DemoSet.Expected.Count)
            {
                allJudged.TrySetResult();
            }
        };

        using var stop = new CancellationTokenSource();
        var running = loop.RunAsync(stop.Token);
        await firstPass.Task.WaitAsync(Timeout);

        // Producers write under a temporary name and rename: the .tmp copies must be left alone.
        foreach (var file in Directory.EnumerateFiles(DemoSet.Folder))
        {
            var temporary = Path.Combine(options.Inbox, Path.GetFileName(file) + ".tmp");
            File.Copy(file, temporary);
            File.Move(temporary, Path.Combine(options.Inbox, Path.GetFileName(file)));
        }

        await allJudged.Task.WaitAsync(Timeout);
        await stop.CancelAsync();
        await running.WaitAsync(Timeout);

        Assert.Equal(DemoSet.Expected.Count, loop.Totals.Processed);
        Assert.Equal(DemoSet.Expected.Count(e => e.Ruling == "pass"), loop.Totals.Passed);
        Assert.Equal(DemoSet.Expected.Count(e => e.Ruling == "rejected"), loop.Totals.Rejected);
        Assert.Empty(Directory.EnumerateFiles(options.Inbox));
    }

    [Fact]
    public void Temporary_and_hidden_names_are_not_ready()
    {
        Assert.False(DropFolder.IsReady("/in/unit.csv.tmp"));
        Assert.False(DropFolder.IsReady("/in/unit.csv.part"));
        Assert.False(DropFolder.IsReady("/in/.unit.csv"));
        Assert.False(DropFolder.IsReady("/in/~unit.csv"));
        Assert.True(DropFolder.IsReady("/in/unit.csv"));
    }
}
