using Microsoft.Extensions.Logging;
using StandFit.Edges.Folders;
using StandFit.Edges.Logging;
using StandFit.Edges.Outputs;
using StandFit.Edges.Processing;

namespace StandFit.Edges.Worker;

/// <summary>
/// The long-lived worker's loop, as a plain class: rescan the inbox on a timer (watcher events only
/// wake it early), process what is ready, repeat until stopped. Failure policy: an output fault is
/// retried with backoff (1 s doubling to 60 s) while the inputs stay in the inbox; an audit-sink
/// failure ends the loop with <see cref="AuditSinkException"/>.
/// </summary>
public sealed class InboxLoop(string inbox, BatchRunner runner, TimeSpan pollInterval, TimeProvider clock, ILogger logger)
{
    private static readonly TimeSpan MaxBackoff = TimeSpan.FromSeconds(60);
    private TaskCompletionSource _wake = NewSignal();

    /// <summary>Raised after each pass over the inbox, with the counts of that pass (tests wait on it).</summary>
    public event Action<BatchCounts>? PassCompleted;

    public BatchCounts Totals { get; } = new();

    /// <summary>Wakes the loop before the next rescan (a watcher event).</summary>
    public void Nudge() => Volatile.Read(ref _wake).TrySetResult();

    private static TaskCompletionSource NewSignal() => new(TaskCreationOptions.RunContinuationsAsynchronously);

    public async Task RunAsync(CancellationToken stop)
    {
        Log.WorkerStarted(logger, inbox, pollInterval.TotalSeconds);
        using var watcher = new InboxWatcher(inbox, Nudge, logger);
        var backoff = TimeSpan.Zero;
        while (!stop.IsCancellationRequested)
        {
            var delay = pollInterval;
            try
            {
                var counts = await runner.ProcessAsync(DropFolder.ListReady(inbox), stop).ConfigureAwait(false);
                Totals.Add(counts);
                backoff = TimeSpan.Zero;
                PassCompleted?.Invoke(counts);
            }
            catch (AuditSinkException e)
            {
                Log.AuditSinkFailed(logger, e);
                throw;
            }
            catch (Exception e) when (e is IOException or UnauthorizedAccessException)
            {
                backoff = backoff == TimeSpan.Zero ? TimeSpan.FromSeconds(1) : TimeSpan.FromTicks(Math.Min(backoff.Ticks * 2, MaxBackoff.Ticks));
                delay = backoff;
            }

            using var delayCancel = CancellationTokenSource.CreateLinkedTokenSource(stop);
            var woken = Volatile.Read(ref _wake).Task;
            await Task.WhenAny(woken, Task.Delay(delay, clock, delayCancel.Token)).ConfigureAwait(false);
            await delayCancel.CancelAsync().ConfigureAwait(false);
            if (woken.IsCompleted)
            {
                Interlocked.Exchange(ref _wake, NewSignal());
            }
        }

        Log.WorkerStopping(logger);
    }
}
