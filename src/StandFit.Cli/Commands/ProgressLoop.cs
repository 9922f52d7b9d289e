using Microsoft.Extensions.Logging;
using StandFit.Edges.Logging;
using StandFit.Edges.Processing;

namespace StandFit.Cli.Commands;

/// <summary>
/// Shows a one-shot run's progress until stopped: every second one updating line on
/// <c>terminal</c> (an interactive standard error; null: none), every 10 seconds a progress line
/// in the operations log (event 2010).
/// </summary>
internal static class ProgressLoop
{
    public static Task RunAsync(ProgressMeter meter, ILogger logger, TextWriter? terminal, CancellationToken stop) =>
        RunAsync(meter, logger, terminal, TimeSpan.FromSeconds(1), 10, stop);

    /// <summary>Shows the progress every <paramref name="tick"/> and logs it every <paramref name="logEvery"/> ticks.</summary>
    public static async Task RunAsync(ProgressMeter meter, ILogger logger, TextWriter? terminal, TimeSpan tick, int logEvery, CancellationToken stop)
    {
        using var timer = new PeriodicTimer(tick);
        var ticks = 0;
        var shown = 0;
        try
        {
            while (await timer.WaitForNextTickAsync(stop).ConfigureAwait(false))
            {
                ticks++;
                var reading = meter.Read();
                if (terminal is not null)
                {
                    var line = reading.ToString();
                    terminal.Write("\r" + line.PadRight(shown));
                    terminal.Flush();
                    shown = line.Length;
                }

                if (ticks % logEvery == 0)
                {
                    Log.RunProgress(logger, reading.Done, reading.Total, reading.Percent, reading.Rate ?? 0, (reading.Remaining ?? TimeSpan.Zero).TotalSeconds);
                }
            }
        }
        catch (OperationCanceledException)
        {
            // The run is over.
        }

        if (terminal is not null && shown > 0)
        {
            terminal.Write("\r" + new string(' ', shown) + "\r");
            terminal.Flush();
        }
    }
}
