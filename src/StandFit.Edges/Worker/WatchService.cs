using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Logging;
using StandFit.Edges.Logging;

namespace StandFit.Edges.Worker;

/// <summary>
/// The hosted worker: a thin <see cref="ExecuteAsync"/> over <see cref="InboxLoop"/>. A fatal error
/// sets a non-zero exit code before stopping the host (the host's default would exit with 0).
/// </summary>
public sealed class WatchService(InboxLoop loop, IHostApplicationLifetime lifetime, ILogger<WatchService> logger) : BackgroundService
{
    /// <summary>The exit code of a worker stopped by a fatal error.</summary>
    public const int FatalExitCode = 5;

    protected override async Task ExecuteAsync(CancellationToken stoppingToken)
    {
        try
        {
            await loop.RunAsync(stoppingToken).ConfigureAwait(false);
        }
        catch (Exception e) when (e is not OperationCanceledException)
        {
            Log.Fatal(logger, e);
            Environment.ExitCode = FatalExitCode;
            lifetime.StopApplication();
        }
    }
}
