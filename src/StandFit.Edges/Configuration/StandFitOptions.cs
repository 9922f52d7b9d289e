namespace StandFit.Edges.Configuration;

/// <summary>
/// The worker's configuration (config/standfit.yaml), validated at start. Folders are absolute
/// paths, resolved against the configuration file's folder.
/// </summary>
public sealed record StandFitOptions
{
    public required string ConfigFile { get; init; }

    public required string ConfigHash { get; init; }

    public required string Inbox { get; init; }

    public required string Archive { get; init; }

    public required string Rejected { get; init; }

    public required string Output { get; init; }

    public required string Recipes { get; init; }

    public required string Logs { get; init; }

    /// <summary>Sweep files larger than this are rejected unread (bytes; default 4 MiB).</summary>
    public long MaxFileBytes { get; init; } = 4 * 1024 * 1024;

    /// <summary>How often <c>watch</c> rescans the inbox even without a watcher event (seconds; default 2).</summary>
    public double PollSeconds { get; init; } = 2;

    /// <summary>Units per Parquet file and per pass/fail log flush in a one-shot run (default 5000).</summary>
    public int FlushUnits { get; init; } = 5000;
}
