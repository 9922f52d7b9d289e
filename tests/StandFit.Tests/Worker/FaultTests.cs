using StandFit.Edges.Configuration;
using StandFit.Edges.Folders;
using StandFit.Edges.Processing;
using StandFit.Edges.Worker;
using StandFit.Tests.Support;
using Xunit.Abstractions;

namespace StandFit.Tests.Worker;

/// <summary>
/// Output faults while the worker loop runs: the output folder full, read-only, replaced by a file;
/// the archive folder removed. In each, the inputs stay in the inbox or claimed (none archived), the
/// fault is logged once (not once per attempt), and when it clears the worker resumes by itself and
/// every input ends up exactly once, with exactly one row.
/// </summary>
public sealed class FaultTests(ITestOutputHelper output)
{
    private const int Files = 24;
    private static readonly TimeSpan Timeout = TimeSpan.FromMinutes(2);

    [Theory]
    [InlineData("output full")]
    [InlineData("output read-only")]
    [InlineData("output replaced by a file")]
    [InlineData("archive removed")]
    public async Task An_output_fault_holds_the_inputs_logs_once_and_clears_by_itself(string fault)
    {
        if (!OperatingSystem.IsLinux())
        {
            return; // tmpfs and /dev/full are Linux; the other faults behave the same on Windows.
        }

        using var root = new TempFolder();
        var config = WorkerConfig.Write(root, flushUnits: 8);
        var outputFolder = root.Sub("output");
        using var disk = fault == "output full" ? SmallDisk.TryMount(outputFolder, 1024) : null;
        SmallDisk? readOnly = null;
        var options = ConfigLoader.Load(config).Value;
        Assert.Empty(ConfigLoader.PrepareFolders(options, needInbox: true));
        var log = new CapturingLogger();
        using var pipeline = Pipeline.Build(options, log, DispositionMode.Move, TimeProvider.System);
        var settings = new LoopSettings
        {
            Poll = TimeSpan.FromMilliseconds(50),
            Stable = TimeSpan.Zero,
            FirstBackoff = TimeSpan.FromMilliseconds(20),
            MaxBackoff = TimeSpan.FromMilliseconds(80),
            FaultLogInterval = TimeSpan.FromHours(1),
            StatusFile = options.StatusFile,
        };
        var loop = new InboxLoop(options.Inbox, pipeline.Runner, pipeline.Recipes, settings, TimeProvider.System, log);
        var firstPass = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        var threeFailures = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        var allDone = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        var failures = 0;
        loop.PassCompleted += _ =>
        {
            firstPass.TrySetResult();
            if (loop.Totals.Processed >= Files && pipeline.Runner.Held() == 0)
            {
                allDone.TrySetResult();
            }
        };
        loop.PassFailed += _ =>
        {
            if (Interlocked.Increment(ref failures) >= 3)
            {
                threeFailures.TrySetResult();
            }
        };
        using var stop = new CancellationTokenSource();
        var running = loop.RunAsync(stop.Token);
        await firstPass.Task.WaitAsync(Timeout);

        // Make the fault.
        Action clear;
        string mechanism;
        switch (fault)
        {
            case "output full" when disk is not null:
                var filler = disk.Fill();
                clear = () => File.Delete(filler);
                mechanism = "a 1 MiB tmpfs filled to the last block";
                break;
            case "output full":
                var journal = pipeline.Runner.Journal.OwnFile;
                File.Move(journal, journal + ".kept", overwrite: true);
                File.CreateSymbolicLink(journal, "/dev/full");
                clear = () =>
                {
                    File.Delete(journal);
                    File.Move(journal + ".kept", journal);
                };
                mechanism = "the journal made a link to /dev/full (ENOSPC), as mounting is not allowed here";
                break;
            case "output read-only" when (readOnly = SmallDisk.TryReadOnly(outputFolder)) is not null:
                clear = readOnly.Dispose;
                mechanism = "a read-only bind mount over the output folder (EROFS)";
                break;
            case "output read-only" or "output replaced by a file":
                Directory.Move(outputFolder, outputFolder + ".away");
                File.WriteAllText(outputFolder, "not a folder");
                clear = () =>
                {
                    File.Delete(outputFolder);
                    Directory.Move(outputFolder + ".away", outputFolder);
                };
                mechanism = fault == "output read-only" ? "mounting is not allowed here: the folder replaced by a file instead" : "the folder moved away and a file put in its place";
                break;
            default:
                Directory.Move(options.Archive, options.Archive + ".away");
                clear = () => Directory.Move(options.Archive + ".away", options.Archive);
                mechanism = "the archive folder moved away (an unmounted share)";
                break;
        }

        output.WriteLine($"{fault}: {mechanism}");
        SweepFiles.Write(Path.Combine(root.Path, "staging"), Files, seed: fault.Length);
        foreach (var file in Directory.EnumerateFiles(Path.Combine(root.Path, "staging")))
        {
            File.Move(file, Path.Combine(options.Inbox, Path.GetFileName(file)));
        }

        loop.Nudge();
        await threeFailures.Task.WaitAsync(Timeout);

        // While it lasts: nothing archived, every input still in the inbox or claimed, one log event.
        var archived = Directory.Exists(options.Archive) ? Directory.EnumerateFiles(options.Archive, "*.csv", SearchOption.AllDirectories).Count() : 0;
        Assert.Equal(0, archived);
        Assert.Equal(Files, Directory.EnumerateFiles(options.Inbox, "*.csv", SearchOption.AllDirectories).Count());
        Assert.Equal(1, log.Count(9003));
        Assert.True(failures >= 3);

        clear();
        readOnly?.Dispose();
        loop.Nudge();
        await allDone.Task.WaitAsync(Timeout);
        await stop.CancelAsync();
        await running.WaitAsync(Timeout);

        Assert.Equal(1, log.Count(9003));
        Assert.Equal(1, log.Count(9004));
        Assert.Empty(Directory.EnumerateFiles(options.Inbox, "*", SearchOption.AllDirectories));
        Assert.Equal(Files, Directory.EnumerateFiles(options.Archive, "*.csv", SearchOption.AllDirectories).Count());
        var rows = Duck.Query($"SELECT count(*) AS n, count(DISTINCT source_file) AS files FROM read_parquet({Duck.Literal(Path.Combine(options.Output, "summaries", "**", "*.parquet"))})")[0];
        Assert.Equal((long)Files, Convert.ToInt64(rows["n"], System.Globalization.CultureInfo.InvariantCulture));
        Assert.Equal((long)Files, Convert.ToInt64(rows["files"], System.Globalization.CultureInfo.InvariantCulture));
        var lines = Directory.EnumerateFiles(Path.Combine(options.Output, "passfail")).SelectMany(File.ReadAllLines).ToList();
        Assert.Equal(Files, lines.Distinct(StringComparer.Ordinal).Count());
        Assert.Equal(Files, lines.Count);
        if (fault == "archive removed")
        {
            Assert.True(log.Count(2005) >= 1, "the committed inputs should have been moved on from the journal");
        }

        var status = File.ReadAllText(options.StatusFile);
        Assert.Contains("\"held\": 0", status, StringComparison.Ordinal);
        Assert.Contains("\"last_error\": {", status, StringComparison.Ordinal);
    }
}
