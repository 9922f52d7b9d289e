using Microsoft.Extensions.Logging;
using StandFit.Edges.Logging;

namespace StandFit.Edges.Worker;

/// <summary>
/// Logs a fault that goes on once per interval, not once per attempt: when it starts, again at most
/// once per <c>interval</c> while it lasts (with the number of attempts), and once when it clears.
/// </summary>
public sealed class FaultReporter(string stage, TimeSpan interval, TimeProvider clock, ILogger logger)
{
    private long _since;
    private long _lastLogged;
    private int _attempts;

    public bool Active => _attempts > 0;

    public int Attempts => _attempts;

    public void Failed(Exception e)
    {
        var now = clock.GetTimestamp();
        _attempts++;
        if (_attempts == 1)
        {
            _since = now;
        }

        if (_attempts == 1 || clock.GetElapsedTime(_lastLogged, now) >= interval)
        {
            _lastLogged = now;
            Log.Fault(logger, stage, e.Message, _attempts, interval.TotalSeconds);
        }
    }

    public void Succeeded()
    {
        if (_attempts == 0)
        {
            return;
        }

        var seconds = clock.GetElapsedTime(_since).TotalSeconds;
        Log.FaultCleared(logger, stage, seconds, _attempts);
        _attempts = 0;
    }
}
