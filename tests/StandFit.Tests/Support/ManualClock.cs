namespace StandFit.Tests.Support;

/// <summary>
/// A clock the test moves by hand: wall time (which may jump back) and a monotonic timestamp apart.
/// Its timers (so <c>Task.Delay(…, clock)</c> and <c>PeriodicTimer</c> on it) fire only when
/// <see cref="Advance"/> moves the monotonic clock past their due time, never by real time.
/// </summary>
public sealed class ManualClock(DateTimeOffset start) : TimeProvider
{
    private readonly Lock _gate = new();
    private readonly List<Timer> _timers = [];
    private DateTimeOffset _now = start;
    private long _ticks;

    public override long TimestampFrequency => TimeSpan.TicksPerSecond;

    public override DateTimeOffset GetUtcNow() => _now;

    public override long GetTimestamp() => Interlocked.Read(ref _ticks);

    /// <summary>Timers waiting to fire now (a test waits for the code under test to start its wait).</summary>
    public int WaitingTimers
    {
        get
        {
            lock (_gate)
            {
                return _timers.Count(t => t.Due is not null);
            }
        }
    }

    /// <summary>Moves both clocks forward, then fires every timer that has come due (each once per period passed).</summary>
    public void Advance(TimeSpan by)
    {
        _now += by;
        var now = Interlocked.Add(ref _ticks, by.Ticks);
        while (true)
        {
            Timer? due;
            lock (_gate)
            {
                due = _timers.Where(t => t.Due is { } d && d <= now).OrderBy(t => t.Due).FirstOrDefault();
                if (due is null)
                {
                    return;
                }

                due.Due = due.Period is { } p && p > 0 ? due.Due + p : null;
            }

            due.Fire();
        }
    }

    /// <summary>Sets the wall clock only (a clock jump); the monotonic clock is not affected.</summary>
    public void SetWallClock(DateTimeOffset now) => _now = now;

    public override ITimer CreateTimer(TimerCallback callback, object? state, TimeSpan dueTime, TimeSpan period)
    {
        var timer = new Timer(this, callback, state);
        lock (_gate)
        {
            _timers.Add(timer);
        }

        timer.Change(dueTime, period);
        return timer;
    }

    private sealed class Timer(ManualClock clock, TimerCallback callback, object? state) : ITimer
    {
        public long? Due { get; set; }

        public long? Period { get; set; }

        public void Fire() => callback(state);

        public bool Change(TimeSpan dueTime, TimeSpan period)
        {
            var fireNow = false;
            lock (clock._gate)
            {
                Period = period == Timeout.InfiniteTimeSpan ? null : period.Ticks;
                if (dueTime == Timeout.InfiniteTimeSpan)
                {
                    Due = null;
                }
                else if (dueTime <= TimeSpan.Zero)
                {
                    Due = Period is { } p && p > 0 ? clock.GetTimestamp() + p : null;
                    fireNow = true;
                }
                else
                {
                    Due = clock.GetTimestamp() + dueTime.Ticks;
                }
            }

            if (fireNow)
            {
                ThreadPool.QueueUserWorkItem(_ => Fire());
            }

            return true;
        }

        public void Dispose()
        {
            lock (clock._gate)
            {
                Due = null;
                clock._timers.Remove(this);
            }
        }

        public ValueTask DisposeAsync()
        {
            Dispose();
            return ValueTask.CompletedTask;
        }
    }
}
