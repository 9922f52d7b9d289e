using StandFit.Tests.Support;

namespace StandFit.Tests.Worker;

/// <summary>
/// `standfit watch` as a separate process: it judges what lands and stops cleanly on SIGTERM. The
/// demo's unit of a part without a recipe is held in the claim folder, not rejected (issue #4 item 7).
/// </summary>
public sealed partial class WatchProcessTests
{
    private static readonly TimeSpan Timeout = TimeSpan.FromMinutes(2);

    [Fact]
    public async Task The_worker_judges_dropped_files_and_stops_cleanly_on_sigterm()
    {
        if (!OperatingSystem.IsLinux())
        {
            return; // SIGTERM delivery below is POSIX; Windows services are stopped by the service manager.
        }

        using var root = new TempFolder();
        var config = DemoSet.WriteConfig(root);
        var published = 0;
        var allPublished = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        var started = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        var stderr = new System.Text.StringBuilder();
        using var process = StandFitProcess.Start(root.Path, "watch", "--config", config);
        process.ErrorDataReceived += (_, e) =>
        {
            if (e.Data is null)
            {
                return;
            }

            lock (stderr)
            {
                stderr.AppendLine(e.Data);
            }

            if (e.Data.Contains("Worker watching", StringComparison.Ordinal))
            {
                started.TrySetResult();
            }

            var match = BatchLine().Match(e.Data);
            if (match.Success && Interlocked.Add(ref published, int.Parse(match.Groups[1].Value, System.Globalization.CultureInfo.InvariantCulture)) >= DemoSet.PublishedByWatch)
            {
                allPublished.TrySetResult();
            }
        };
        process.BeginErrorReadLine();
        process.BeginOutputReadLine();
        try
        {
            await started.Task.WaitAsync(Timeout);
            DemoSet.CopyInto(Path.Combine(root.Path, "inbox"));
            await allPublished.Task.WaitAsync(Timeout);
            using (var kill = System.Diagnostics.Process.Start("kill", ["-TERM", process.Id.ToString(System.Globalization.CultureInfo.InvariantCulture)]))
            {
                await kill.WaitForExitAsync();
                Assert.Equal(0, kill.ExitCode);
            }

            using var exit = new CancellationTokenSource(Timeout);
            await process.WaitForExitAsync(exit.Token);
        }
        finally
        {
            if (!process.HasExited)
            {
                process.Kill(entireProcessTree: true);
            }
        }

        Assert.Equal(0, process.ExitCode);
        Assert.Contains("Worker stopping", stderr.ToString(), StringComparison.Ordinal);
        Assert.Empty(Directory.EnumerateFiles(Path.Combine(root.Path, "inbox")));
        var lines = Directory.EnumerateFiles(Path.Combine(root.Path, "output", "passfail")).SelectMany(File.ReadAllLines).ToList();
        Assert.Equal(DemoSet.PublishedByWatch, lines.Count);
        var held = Assert.Single(DemoSet.HeldByWatch);
        Assert.DoesNotContain(lines, l => l.Contains(held.File, StringComparison.Ordinal));
        Assert.Single(Directory.EnumerateFiles(Path.Combine(root.Path, "inbox", ".claimed"), "*~" + held.File, SearchOption.AllDirectories));
        Assert.Single(stderr.ToString().Split('\n'), l => l.Contains(held.File + " names part", StringComparison.Ordinal));
        Assert.False(Directory.Exists(Path.Combine(root.Path, "rejected")) && Directory.EnumerateFiles(Path.Combine(root.Path, "rejected"), held.File, SearchOption.AllDirectories).Any());
    }

    [System.Text.RegularExpressions.GeneratedRegex(@"Batch of (\d+) units published")]
    private static partial System.Text.RegularExpressions.Regex BatchLine();

    [Fact]
    public async Task A_damaged_journal_is_a_fatal_error_and_the_process_exits_with_5()
    {
        using var root = new TempFolder();
        var config = WorkerConfig.Write(root);
        var journal = root.File(Path.Combine("output", "journal", "test-worker.jsonl"), "{\"batch\":\"x\",\"units\":[]}\nthis line is not JSON\n{\"logged\":\"x\"}\n");

        var outcome = await StandFitProcess.RunAsync(root.Path, Timeout, "watch", "--config", config);

        Assert.Equal(5, outcome.ExitCode);
        Assert.Contains("Fatal error; the worker stops", outcome.Error, StringComparison.Ordinal);
        Assert.Contains("Line 2 of the journal", outcome.Error, StringComparison.Ordinal);
        Assert.True(File.Exists(journal));
    }

    [Fact]
    public async Task A_second_worker_with_the_same_id_refuses_to_start_with_exit_code_3()
    {
        using var root = new TempFolder();
        var config = WorkerConfig.Write(root);
        var started = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        using var first = StandFitProcess.Start(root.Path, "watch", "--config", config);
        first.ErrorDataReceived += (_, e) =>
        {
            if (e.Data?.Contains("Worker watching", StringComparison.Ordinal) == true)
            {
                started.TrySetResult();
            }
        };
        first.BeginErrorReadLine();
        first.BeginOutputReadLine();
        try
        {
            await started.Task.WaitAsync(Timeout);
            var second = await StandFitProcess.RunAsync(root.Path, Timeout, "watch", "--config", config);
            Assert.Equal(3, second.ExitCode);
            Assert.Contains("Another process works as worker 'test-worker'", second.Error, StringComparison.Ordinal);
        }
        finally
        {
            first.Kill();
        }
    }

    [Fact]
    public async Task The_worker_writes_its_status_file_with_counters_while_it_runs()
    {
        if (!OperatingSystem.IsLinux())
        {
            return; // SIGTERM delivery below is POSIX.
        }

        using var root = new TempFolder();
        var config = WorkerConfig.Write(root);
        var status = Path.Combine(root.Path, "output", "status-test-worker.json");
        DemoSet.CopyInto(Path.Combine(root.Path, "inbox"));
        var counted = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        Directory.CreateDirectory(Path.Combine(root.Path, "output"));
        using var watcher = new FileSystemWatcher(Path.Combine(root.Path, "output"), "status-test-worker.json");
        watcher.Renamed += (_, _) =>
        {
            try
            {
                if (File.ReadAllText(status).Contains(string.Create(System.Globalization.CultureInfo.InvariantCulture, $"\"processed\": {DemoSet.PublishedByWatch},"), StringComparison.Ordinal))
                {
                    counted.TrySetResult();
                }
            }
            catch (IOException)
            {
                // Replaced again while read: the next rename tells.
            }
        };
        watcher.EnableRaisingEvents = true;
        using var process = StandFitProcess.Start(root.Path, "watch", "--config", config);
        process.BeginErrorReadLine();
        process.BeginOutputReadLine();
        try
        {
            await counted.Task.WaitAsync(Timeout);
            using (var kill = System.Diagnostics.Process.Start("kill", ["-TERM", process.Id.ToString(System.Globalization.CultureInfo.InvariantCulture)]))
            {
                await kill.WaitForExitAsync();
            }

            await process.WaitForExitAsync().WaitAsync(Timeout);
        }
        finally
        {
            if (!process.HasExited)
            {
                process.Kill();
            }
        }

        Assert.Equal(0, process.ExitCode);
        var text = File.ReadAllText(status);
        Assert.Contains("\"state\": \"stopped\"", text, StringComparison.Ordinal);
        Assert.Contains(string.Create(System.Globalization.CultureInfo.InvariantCulture, $"\"passed\": {DemoSet.Expected.Count(e => e.Ruling == "pass")},"), text, StringComparison.Ordinal);
        Assert.Contains("\"worker_id\": \"test-worker\"", text, StringComparison.Ordinal);
        Assert.Contains(string.Create(System.Globalization.CultureInfo.InvariantCulture, $"\"held\": {DemoSet.HeldByWatch.Count},"), text, StringComparison.Ordinal);
        Assert.Contains(string.Create(System.Globalization.CultureInfo.InvariantCulture, $"\"awaiting_recipe\": {DemoSet.HeldByWatch.Count}"), text, StringComparison.Ordinal);
    }
}
