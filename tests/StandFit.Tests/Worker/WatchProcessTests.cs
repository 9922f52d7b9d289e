using StandFit.Tests.Support;

namespace StandFit.Tests.Worker;

/// <summary>`standfit watch` as a separate process: it judges what lands and stops cleanly on SIGTERM.</summary>
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
            if (match.Success && Interlocked.Add(ref published, int.Parse(match.Groups[1].Value, System.Globalization.CultureInfo.InvariantCulture)) >= DemoSet.Expected.Count)
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
        var lines = Directory.EnumerateFiles(Path.Combine(root.Path, "output", "passfail")).SelectMany(File.ReadAllLines).Count();
        Assert.Equal(DemoSet.Expected.Count, lines);
    }

    [System.Text.RegularExpressions.GeneratedRegex(@"Batch of (\d+) units published")]
    private static partial System.Text.RegularExpressions.Regex BatchLine();
}
