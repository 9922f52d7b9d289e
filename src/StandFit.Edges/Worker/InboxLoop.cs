using Microsoft.Extensions.Logging;
using StandFit.Edges.Folders;
using StandFit.Edges.Logging;
using StandFit.Edges.Outputs;
using StandFit.Edges.Processing;
using StandFit.Edges.RecipeFiles;

namespace StandFit.Edges.Worker;

/// <summary>The timings of the watch loop.</summary>
public sealed record LoopSettings
{
    /// <summary>Rescan the inbox this often, watcher events or not.</summary>
    public TimeSpan Poll { get; init; } = TimeSpan.FromSeconds(2);

    /// <summary>A file's size and time must stay the same this long before it is taken.</summary>
    public TimeSpan Stable { get; init; } = TimeSpan.FromSeconds(2);

    /// <summary>Rewrite the status file this often.</summary>
    public TimeSpan StatusInterval { get; init; } = TimeSpan.FromSeconds(5);

    /// <summary>Log a fault that goes on at most this often.</summary>
    public TimeSpan FaultLogInterval { get; init; } = TimeSpan.FromMinutes(5);

    /// <summary>The first wait after a failed pass; it doubles up to <see cref="MaxBackoff"/>.</summary>
    public TimeSpan FirstBackoff { get; init; } = TimeSpan.FromSeconds(1);

    public TimeSpan MaxBackoff { get; init; } = TimeSpan.FromSeconds(60);

    /// <summary>Where the status file goes; none when null.</summary>
    public string? StatusFile { get; init; }

    /// <summary>Rewrite the run's row in the runs table this often while the counts change (and always at shutdown).</summary>
    public TimeSpan RunRecordInterval { get; init; } = TimeSpan.FromMinutes(1);
}

/// <summary>
/// The long-lived worker's loop, as a plain class: read the journal and finish committed work;
/// then rescan the inbox on a timer (watcher events only wake it early), reload the recipes if their
/// folder changed, take what is ready and stable, process it, repeat until stopped; write the status
/// file on its own timer. Failure policy: an output fault (output, archive or rejected folder
/// missing, read-only or full; the pass/fail log unwritable) is retried with backoff (doubling up to
/// a minute) while the inputs stay claimed, logged once per interval, and clears by itself; a
/// damaged journal or an unexpected exception ends the loop (the host then exits with code 5).
/// A unit whose part no recipe lists is held by the runner (<see cref="BatchRunner.HoldUncoveredParts"/>)
/// and judged on the first pass after a reload brings a recipe that lists it.
/// With a <see cref="RunRecorder"/>, the worker's row in the runs table is rewritten every
/// <see cref="LoopSettings.RunRecordInterval"/> while its counts change (state <c>running</c>) and
/// once more at shutdown (<c>finished</c>, or <c>failed</c> after a fatal error); a runs row that
/// cannot be written is logged and never stops the work.
/// </summary>
public sealed class InboxLoop
{
    private readonly string _inbox;
    private readonly BatchRunner _runner;
    private readonly RecipeSource? _recipes;
    private readonly LoopSettings _settings;
    private readonly TimeProvider _clock;
    private readonly ILogger _logger;
    private readonly InboxScanner _scanner;
    private readonly FaultReporter _outputFault;
    private readonly FaultReporter _inboxFault;
    private readonly RunRecorder? _runs;
    private TaskCompletionSource _wake = NewSignal();
    private bool _statusFaultLogged;

    public InboxLoop(string inbox, BatchRunner runner, RecipeSource? recipes, LoopSettings settings, TimeProvider clock, ILogger logger, RunRecorder? runs = null)
    {
        _runs = runs;
        _inbox = inbox;
        _runner = runner;
        _recipes = recipes;
        _settings = settings;
        _clock = clock;
        _logger = logger;
        _scanner = new InboxScanner(inbox, settings.Stable, clock);
        _outputFault = new FaultReporter("Output (summaries, journal, pass/fail log, archive or rejected folder)", settings.FaultLogInterval, clock, logger);
        _inboxFault = new FaultReporter("The inbox", settings.FaultLogInterval, clock, logger);
        Status = new WorkerStatus(runner.WorkerId, ToolInfo.Version, clock.GetUtcNow().UtcDateTime);
    }

    /// <summary>Raised after each pass over the inbox, with the counts of that pass (tests wait on it).</summary>
    public event Action<BatchCounts>? PassCompleted;

    /// <summary>Raised after each pass that failed, with its exception (tests wait on it).</summary>
    public event Action<Exception>? PassFailed;

    /// <summary>Raised after each write of the status file.</summary>
    public event Action? StatusWritten;

    /// <summary>Raised after each write of the run's row in the runs table, with the row written.</summary>
    public event Action<RunRecord>? RunRecorded;

    public BatchCounts Totals { get; } = new();

    public WorkerStatus Status { get; }

    /// <summary>Wakes the loop before the next rescan (a watcher event).</summary>
    public void Nudge() => Volatile.Read(ref _wake).TrySetResult();

    private static TaskCompletionSource NewSignal() => new(TaskCreationOptions.RunContinuationsAsynchronously);

    public async Task RunAsync(CancellationToken stop)
    {
        _runner.Start();
        Log.WorkerStarted(_logger, _inbox, _settings.Poll.TotalSeconds);
        using var watcher = new InboxWatcher(_inbox, Nudge, _logger);
        using var statusStop = CancellationTokenSource.CreateLinkedTokenSource(stop);
        Status.SetState("running");
        var statusTask = _settings.StatusFile is null ? Task.CompletedTask : WriteStatusPeriodicallyAsync(statusStop.Token);
        var runsTask = _runs is null ? Task.CompletedTask : RecordRunPeriodicallyAsync(_runs, statusStop.Token);
        var backoff = TimeSpan.Zero;
        try
        {
            while (!stop.IsCancellationRequested)
            {
                _recipes?.Check();
                var ok = await PassAsync(stop).ConfigureAwait(false);
                backoff = ok ? TimeSpan.Zero : Next(backoff);
                var delay = ok ? _settings.Poll : backoff;
                if (ok && _runner.UntilFlush() is { } due && due < delay)
                {
                    delay = due; // a quiet inbox: wake when the waiting units are due by age
                }

                using var delayCancel = CancellationTokenSource.CreateLinkedTokenSource(stop);
                var woken = Volatile.Read(ref _wake).Task;
                await Task.WhenAny(woken, Task.Delay(delay, _clock, delayCancel.Token)).ConfigureAwait(false);
                await delayCancel.CancelAsync().ConfigureAwait(false);
                if (woken.IsCompleted)
                {
                    Interlocked.Exchange(ref _wake, NewSignal());
                }
            }
        }
        finally
        {
            if (stop.IsCancellationRequested)
            {
                await FlushOnStopAsync().ConfigureAwait(false);
            }

            Status.SetState(stop.IsCancellationRequested ? "stopped" : "failed");
            await statusStop.CancelAsync().ConfigureAwait(false);
            await statusTask.ConfigureAwait(false);
            await runsTask.ConfigureAwait(false);
            WriteStatus();
            if (_runs is not null)
            {
                await RecordRunAsync(_runs, stop.IsCancellationRequested ? RunStates.Finished : RunStates.Failed).ConfigureAwait(false);
            }
        }

        Log.WorkerStopping(_logger);
    }

    /// <summary>One pass: scan, then finish and process what is in hand; false when a fault stopped it.</summary>
    private async Task<bool> PassAsync(CancellationToken stop)
    {
        IReadOnlyList<string> ready = [];
        var ok = true;
        try
        {
            ready = _scanner.Scan();
            _inboxFault.Succeeded();
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            _inboxFault.Failed(e);
            Status.SetError(e.Message, _clock.GetUtcNow().UtcDateTime);
            ok = false;
        }

        try
        {
            var counts = await _runner.ProcessAsync(ready, stop).ConfigureAwait(false);
            _outputFault.Succeeded();
            Totals.Add(counts);
            Status.Add(counts, _clock.GetUtcNow().UtcDateTime);
            Status.SetHeld(SafeHeld(), _runner.HeldForRecipe);
            PassCompleted?.Invoke(counts);
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException or AuditSinkException)
        {
            _outputFault.Failed(e);
            Status.SetError(e.Message, _clock.GetUtcNow().UtcDateTime);
            Status.SetHeld(SafeHeld(), _runner.HeldForRecipe);
            PassFailed?.Invoke(e);
            ok = false;
        }

        return ok;
    }

    /// <summary>A clean stop publishes the units waiting for their batch; if that fails they stay claimed and are judged again at the next start.</summary>
    private async Task FlushOnStopAsync()
    {
        if (_runner.Pending == 0)
        {
            return;
        }

        try
        {
            var counts = await _runner.FlushAsync().ConfigureAwait(false);
            Totals.Add(counts);
            Status.Add(counts, _clock.GetUtcNow().UtcDateTime);
            PassCompleted?.Invoke(counts);
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException or AuditSinkException)
        {
            _outputFault.Failed(e);
        }
    }

    private TimeSpan Next(TimeSpan backoff) =>
        backoff == TimeSpan.Zero ? _settings.FirstBackoff : TimeSpan.FromTicks(Math.Min(backoff.Ticks * 2, _settings.MaxBackoff.Ticks));

    private int SafeHeld()
    {
        try
        {
            return _runner.Held();
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            return -1;
        }
    }

    private async Task WriteStatusPeriodicallyAsync(CancellationToken stop)
    {
        using var timer = new PeriodicTimer(_settings.StatusInterval, _clock);
        WriteStatus();
        try
        {
            while (await timer.WaitForNextTickAsync(stop).ConfigureAwait(false))
            {
                WriteStatus();
            }
        }
        catch (OperationCanceledException)
        {
            // Stopping: the final status is written by the loop.
        }
    }

    private async Task RecordRunPeriodicallyAsync(RunRecorder runs, CancellationToken stop)
    {
        using var timer = new PeriodicTimer(_settings.RunRecordInterval, _clock);
        var written = -1L;
        try
        {
            while (await timer.WaitForNextTickAsync(stop).ConfigureAwait(false))
            {
                var counts = _runner.Published();
                var total = counts.Processed + counts.Duplicates;
                if (total != written && await RecordRunAsync(runs, RunStates.Running).ConfigureAwait(false))
                {
                    written = total;
                }
            }
        }
        catch (OperationCanceledException)
        {
            // Stopping: the final row is written by the loop.
        }
    }

    private async Task<bool> RecordRunAsync(RunRecorder runs, string state)
    {
        var written = await runs.TryWriteAsync(_runner.Published(), _clock.GetUtcNow().UtcDateTime, state, _logger).ConfigureAwait(false);
        if (written is not null)
        {
            RunRecorded?.Invoke(written);
        }

        return written is not null;
    }

    private void WriteStatus()
    {
        if (_settings.StatusFile is not { } file)
        {
            return;
        }

        try
        {
            AtomicFile.Replace(file, Status.ToJson(_clock.GetUtcNow().UtcDateTime));
            _statusFaultLogged = false;
            StatusWritten?.Invoke();
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            if (!_statusFaultLogged)
            {
                _statusFaultLogged = true;
                Log.StatusUnwritable(_logger, file, e.Message);
            }
        }
    }
}
