using System.Globalization;

namespace StandFit.Edges.Processing;

/// <summary>Where a one-shot run stands: units done of the total, the rate so far and the time left at that rate.</summary>
public readonly record struct ProgressReading(int Done, int Total, TimeSpan Elapsed)
{
    /// <summary>Units a second since the start; null before any time has passed or any unit is done.</summary>
    public double? Rate => Done > 0 && Elapsed > TimeSpan.Zero ? Done / Elapsed.TotalSeconds : null;

    /// <summary>The time the units not yet done take at <see cref="Rate"/>; zero when all are done, null without a rate.</summary>
    public TimeSpan? Remaining => Done >= Total ? TimeSpan.Zero : Rate is { } rate ? TimeSpan.FromSeconds((Total - Done) / rate) : null;

    /// <summary>Done as a percentage of the total (100 for an empty run).</summary>
    public double Percent => Total > 0 ? 100.0 * Math.Min(Done, Total) / Total : 100;

    /// <summary>One line, for example <c>1,234 of 10,000 units (12.3 %), 411 units/s, 21 s left</c>.</summary>
    public override string ToString()
    {
        var rate = Rate is { } r ? r.ToString("N0", CultureInfo.InvariantCulture) + " units/s" : "- units/s";
        var left = Remaining is { } t ? Clock(t) + " left" : "time left unknown";
        return string.Create(CultureInfo.InvariantCulture, $"{Done:N0} of {Total:N0} units ({Percent:F1} %), {rate}, {left}");
    }

    /// <summary>A duration as <c>42 s</c>, <c>3 min 05 s</c> or <c>2 h 07 min</c> (rounded up to the second).</summary>
    public static string Clock(TimeSpan time)
    {
        var seconds = (long)Math.Ceiling(Math.Max(0, time.TotalSeconds));
        return seconds switch
        {
            < 60 => string.Create(CultureInfo.InvariantCulture, $"{seconds} s"),
            < 3600 => string.Create(CultureInfo.InvariantCulture, $"{seconds / 60} min {seconds % 60:D2} s"),
            _ => string.Create(CultureInfo.InvariantCulture, $"{seconds / 3600} h {seconds / 60 % 60:D2} min"),
        };
    }
}

/// <summary>
/// Counts the units of a one-shot run as they are done (from any thread) and reads count, rate and
/// time left on the monotonic clock of <paramref name="clock"/> (a wall-clock jump changes nothing).
/// </summary>
public sealed class ProgressMeter(int total, TimeProvider clock)
{
    private readonly long _started = clock.GetTimestamp();
    private int _done;

    public int Total { get; } = total;

    /// <summary>One more unit done. Thread-safe.</summary>
    public void Add() => Interlocked.Increment(ref _done);

    public ProgressReading Read() => new(Volatile.Read(ref _done), Total, clock.GetElapsedTime(_started));
}
