namespace StandFit.Tests.Support;

/// <summary>A clock the test moves by hand: wall time (which may jump back) and a monotonic timestamp apart.</summary>
public sealed class ManualClock(DateTimeOffset start) : TimeProvider
{
    private DateTimeOffset _now = start;
    private long _ticks;

    public override long TimestampFrequency => TimeSpan.TicksPerSecond;

    public override DateTimeOffset GetUtcNow() => _now;

    public override long GetTimestamp() => Interlocked.Read(ref _ticks);

    /// <summary>Moves both clocks forward.</summary>
    public void Advance(TimeSpan by)
    {
        _now += by;
        Interlocked.Add(ref _ticks, by.Ticks);
    }

    /// <summary>Sets the wall clock only (a clock jump); the monotonic clock is not affected.</summary>
    public void SetWallClock(DateTimeOffset now) => _now = now;
}
