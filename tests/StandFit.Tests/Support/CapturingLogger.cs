using System.Collections.Concurrent;
using Microsoft.Extensions.Logging;

namespace StandFit.Tests.Support;

/// <summary>An in-memory logger and factory: every event with its id, level and rendered message, for tests that count log events.</summary>
public sealed class CapturingLogger : ILogger, ILoggerFactory
{
    public sealed record Event(int Id, LogLevel Level, string Message, Exception? Exception);

    public ConcurrentQueue<Event> Events { get; } = new();

    /// <summary>Raised after each event is captured.</summary>
    public event Action<Event>? Logged;

    public int Count(int eventId) => Events.Count(e => e.Id == eventId);

    public IDisposable? BeginScope<TState>(TState state)
        where TState : notnull => null;

    public bool IsEnabled(LogLevel logLevel) => logLevel >= LogLevel.Information;

    public void Log<TState>(LogLevel logLevel, EventId eventId, TState state, Exception? exception, Func<TState, Exception?, string> formatter)
    {
        if (!IsEnabled(logLevel))
        {
            return;
        }

        var e = new Event(eventId.Id, logLevel, formatter(state, exception), exception);
        Events.Enqueue(e);
        Logged?.Invoke(e);
    }

    public void AddProvider(ILoggerProvider provider) => throw new NotSupportedException();

    public ILogger CreateLogger(string categoryName) => this;

    public void Dispose()
    {
        // Nothing to release.
    }
}
