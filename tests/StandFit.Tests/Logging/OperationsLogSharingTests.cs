using System.Text.Json;
using Serilog.Events;
using StandFit.Edges.Logging;

namespace StandFit.Tests.Logging;

/// <summary>
/// Several workers (each its own process, here each its own logger) may be configured with the same
/// logs folder. Every event of every one of them must reach the day's file as one whole line.
/// </summary>
public sealed class OperationsLogSharingTests : IDisposable
{
    private readonly string _folder = Path.Combine(Path.GetTempPath(), "standfit-oplog-" + Guid.NewGuid().ToString("N"));

    public void Dispose()
    {
        if (Directory.Exists(_folder))
        {
            Directory.Delete(_folder, recursive: true);
        }
    }

    [Fact]
    public async Task Four_loggers_on_one_logs_folder_keep_every_event_as_a_whole_json_line()
    {
        const int Writers = 4;
        const int EventsEach = 1500;
        var start = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        var writers = Enumerable.Range(0, Writers).Select(w => Task.Factory.StartNew(
            () =>
            {
                using var log = OperationsLog.Create(_folder, LogEventLevel.Fatal);
                start.Task.Wait();
                for (var i = 0; i < EventsEach; i++)
                {
                    log.Information("writer {Writer} event {Index}", w, i);
                }
            },
            CancellationToken.None,
            TaskCreationOptions.LongRunning,
            TaskScheduler.Default)).ToArray();
        start.SetResult();
        await Task.WhenAll(writers);

        var lines = Directory.GetFiles(_folder, "standfit-*.clef").SelectMany(File.ReadAllLines).ToArray();
        var seen = new HashSet<(int, int)>();
        foreach (var line in lines)
        {
            using var json = JsonDocument.Parse(line);
            var root = json.RootElement;
            Assert.True(seen.Add((root.GetProperty("Writer").GetInt32(), root.GetProperty("Index").GetInt32())));
        }

        Assert.Equal(Writers * EventsEach, seen.Count);
        Assert.Equal(Writers * EventsEach, lines.Length);
    }
}
