using StandFit.Edges.Processing;
using StandFit.Tests.Support;

namespace StandFit.Tests.Worker;

/// <summary>
/// The progress of a one-shot run: count, rate and time left, read on a clock moved by hand
/// (the arithmetic is common practice: rate = units done / time since the start; time left =
/// units not yet done / rate), and the progress lines `run` writes to the operations log.
/// </summary>
public sealed class ProgressTests
{
    private static readonly DateTimeOffset Start = new(2026, 12, 2, 8, 0, 0, TimeSpan.Zero);

    [Fact]
    public void Before_any_time_passes_there_is_no_rate_and_no_time_left()
    {
        var clock = new ManualClock(Start);
        var meter = new ProgressMeter(1000, clock);
        var reading = meter.Read();
        Assert.Equal(0, reading.Done);
        Assert.Null(reading.Rate);
        Assert.Null(reading.Remaining);
        Assert.Equal("0 of 1,000 units (0.0 %), - units/s, time left unknown", reading.ToString());
    }

    [Fact]
    public void Two_hundred_and_fifty_units_in_ten_seconds_of_a_thousand_is_25_per_second_and_30_seconds_left()
    {
        var clock = new ManualClock(Start);
        var meter = new ProgressMeter(1000, clock);
        for (var i = 0; i < 250; i++)
        {
            meter.Add();
        }

        clock.Advance(TimeSpan.FromSeconds(10));
        var reading = meter.Read();
        Assert.Equal(250, reading.Done);
        Assert.Equal(25.0, reading.Rate);
        Assert.Equal(TimeSpan.FromSeconds(30), reading.Remaining);
        Assert.Equal(25.0, reading.Percent);
        Assert.Equal("250 of 1,000 units (25.0 %), 25 units/s, 30 s left", reading.ToString());
    }

    [Fact]
    public void A_wall_clock_jump_changes_neither_the_rate_nor_the_time_left()
    {
        var clock = new ManualClock(Start);
        var meter = new ProgressMeter(100, clock);
        clock.Advance(TimeSpan.FromSeconds(4));
        for (var i = 0; i < 40; i++)
        {
            meter.Add();
        }

        clock.SetWallClock(Start.AddHours(-3));
        var reading = meter.Read();
        Assert.Equal(10.0, reading.Rate);
        Assert.Equal(TimeSpan.FromSeconds(6), reading.Remaining);
    }

    [Fact]
    public void Units_counted_from_many_threads_at_once_are_all_counted()
    {
        var clock = new ManualClock(Start);
        var meter = new ProgressMeter(100_000, clock);
        Parallel.For(0, 100_000, _ => meter.Add());
        clock.Advance(TimeSpan.FromSeconds(2));
        var reading = meter.Read();
        Assert.Equal(100_000, reading.Done);
        Assert.Equal(TimeSpan.Zero, reading.Remaining);
        Assert.Equal("100,000 of 100,000 units (100.0 %), 50,000 units/s, 0 s left", reading.ToString());
    }

    [Theory]
    [InlineData(0.0, "0 s")]
    [InlineData(41.2, "42 s")]
    [InlineData(185.0, "3 min 05 s")]
    [InlineData(7620.0, "2 h 07 min")]
    public void Time_left_is_shown_in_seconds_minutes_or_hours_rounded_up(double seconds, string shown)
    {
        Assert.Equal(shown, ProgressReading.Clock(TimeSpan.FromSeconds(seconds)));
    }

    [Fact]
    public async Task The_progress_loop_logs_event_2010_with_consistent_figures_and_leaves_the_terminal_line_cleared()
    {
        var logger = new CapturingLogger();
        var terminal = new StringWriter();
        var meter = new ProgressMeter(1_000_000, TimeProvider.System);
        using var stop = new CancellationTokenSource();
        var loop = StandFit.Cli.Commands.ProgressLoop.RunAsync(meter, logger, terminal, TimeSpan.FromMilliseconds(10), 3, stop.Token);
        var deadline = DateTime.UtcNow.AddSeconds(30);
        while (logger.Count(2010) < 3 && DateTime.UtcNow < deadline)
        {
            for (var i = 0; i < 100; i++)
            {
                meter.Add();
            }

            await Task.Delay(5);
        }

        await stop.CancelAsync();
        await loop;

        var events = logger.Events.Where(e => e.Id == 2010).ToList();
        Assert.True(events.Count >= 3);
        Assert.All(events, e => Assert.Equal(Microsoft.Extensions.Logging.LogLevel.Information, e.Level));
        Assert.All(events, e => Assert.Matches(@"^Run progress: [0-9]+ of 1000000 units \([0-9.]+ %\), [0-9]+ units/s, [0-9]+ s left$", e.Message));

        // The terminal got lines each starting with a carriage return, and the last write blanks the line.
        var text = terminal.ToString();
        Assert.StartsWith("\r", text, StringComparison.Ordinal);
        Assert.Contains("of 1,000,000 units", text, StringComparison.Ordinal);
        var last = text[(text.LastIndexOf('\r', text.Length - 2) + 1)..];
        Assert.Matches(@"^ +\r$", last);
    }

    [Fact]
    public async Task Without_a_terminal_the_progress_loop_writes_only_log_lines()
    {
        var logger = new CapturingLogger();
        var meter = new ProgressMeter(10, TimeProvider.System);
        using var stop = new CancellationTokenSource();
        var loop = StandFit.Cli.Commands.ProgressLoop.RunAsync(meter, logger, null, TimeSpan.FromMilliseconds(10), 1, stop.Token);
        var deadline = DateTime.UtcNow.AddSeconds(30);
        while (logger.Count(2010) < 1 && DateTime.UtcNow < deadline)
        {
            await Task.Delay(10);
        }

        await stop.CancelAsync();
        await loop;
        Assert.True(logger.Count(2010) >= 1);
        Assert.Contains("Run progress: 0 of 10 units (0.0 %), 0 units/s", logger.Events.First(e => e.Id == 2010).Message, StringComparison.Ordinal);
    }
}
