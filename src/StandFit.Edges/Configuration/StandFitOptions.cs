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

    /// <summary>How long an inbox file's size and modification time must stay the same before it is taken (seconds; default 2; 0 takes ready files at once).</summary>
    public double StableSeconds { get; init; } = 2;

    /// <summary>The worker's identity (claim folder, journal, Parquet names, status file); default the host name.</summary>
    public string WorkerId { get; init; } = "worker";

    /// <summary>True when <c>watch.worker_id</c> is set: the status file is then named after it.</summary>
    public bool WorkerIdConfigured { get; init; }

    /// <summary>How often <c>watch</c> rewrites its status file (seconds; default 5).</summary>
    public double StatusSeconds { get; init; } = 5;

    /// <summary>How often a fault that goes on is logged again (seconds; default 300).</summary>
    public double FaultLogSeconds { get; init; } = 300;

    /// <summary>The status file: <c>output/status.json</c>, or <c>output/status-WORKER.json</c> when the worker id is configured.</summary>
    public string StatusFile => Path.Combine(Output, WorkerIdConfigured ? $"status-{WorkerId}.json" : "status.json");

    /// <summary>The most units in one batch (one Parquet file per partition, one pass/fail log flush); a batch is published once this many wait (default 1000, at most <see cref="MaxFlushUnits"/>; the next batch is judged while one is published, so two batches, besides the units waiting for a fuller batch, are in memory at once).</summary>
    public int FlushUnits { get; init; } = 1000;

    /// <summary>The largest <see cref="FlushUnits"/> accepted.</summary>
    public const int MaxFlushUnits = 50_000;

    /// <summary><c>watch</c>: publish the waiting units once the oldest was taken this long ago (seconds; default 30; 0 publishes after every pass; at most <see cref="MaxFlushSeconds"/>).</summary>
    public double FlushSeconds { get; init; } = 30;

    /// <summary>The largest <see cref="FlushSeconds"/> accepted.</summary>
    public const double MaxFlushSeconds = 3600;

    /// <summary>Compact the publish journal into its index files once it holds this many units (default 10000).</summary>
    public int JournalCompactUnits { get; init; } = Outputs.PublishJournal.DefaultCompactUnits;
}
