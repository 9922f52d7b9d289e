using Microsoft.Extensions.Logging;
using StandFit.Edges.Configuration;
using StandFit.Edges.Folders;
using StandFit.Edges.Logging;
using StandFit.Edges.Outputs;
using StandFit.Edges.Readers;
using StandFit.Edges.RecipeFiles;

namespace StandFit.Edges.Processing;

/// <summary>
/// The composition root shared by <c>run</c> and <c>watch</c>: takes the worker identity's lock,
/// builds the reader, the recipes in force, the intake (claims out of the inbox, or a folder read in
/// place), the sinks and the batch runner from validated options. Plain objects, no host needed.
/// Throws <see cref="WorkerBusyException"/> when another process works under the same identity.
/// </summary>
public sealed class Pipeline : IDisposable
{
    private readonly WorkerLock _lock;
    private readonly StandFitOptions _options;

    private Pipeline(WorkerLock workerLock, StandFitOptions options, DateTime startedAt, RecipeSource recipes, UnitProcessor processor, BatchRunner runner, ClaimFolder? claims)
    {
        _lock = workerLock;
        _options = options;
        StartedAt = startedAt;
        Recipes = recipes;
        Processor = processor;
        Runner = runner;
        Claims = claims;
    }

    /// <summary>The recipes in force at start.</summary>
    public RecipeCatalog Catalog => Recipes.Current;

    /// <summary>The recipes in force, reloaded by <c>watch</c> when their folder changes.</summary>
    public RecipeSource Recipes { get; }

    public UnitProcessor Processor { get; }

    public BatchRunner Runner { get; }

    /// <summary>The claim folder (inbox mode), or null (read in place).</summary>
    public ClaimFolder? Claims { get; }

    /// <summary>When the pipeline was built (UTC): the start of the run, as its run id says.</summary>
    public DateTime StartedAt { get; }

    /// <summary>The writer of this process's row in the runs table; <paramref name="command"/> is <c>run</c> or <c>watch</c>.</summary>
    public RunRecorder NewRunRecorder(string command) =>
        new(_options.Output, Runner.RunId, command, _options.WorkerId, StartedAt, ToolInfo.Version, _options.ConfigHash);

    /// <summary>
    /// Builds the pipeline. <paramref name="holdUncoveredParts"/>: <c>watch</c> holds a unit whose part
    /// no recipe lists until one does (see <see cref="BatchRunner.HoldUncoveredParts"/>); <c>run</c>
    /// rejects it. <paramref name="flushAge"/>: <c>watch</c> lets judged units wait up to this long for
    /// a fuller batch (<c>output.flush_seconds</c>, see <see cref="BatchRunner.FlushAge"/>); null
    /// (<c>run</c>): every pass publishes what it judged.
    /// </summary>
    public static Pipeline Build(
        StandFitOptions options,
        ILoggerFactory loggers,
        DispositionMode mode,
        TimeProvider clock,
        Action<SummaryRecord>? onPublished = null,
        Action<SummaryRecord>? onDuplicate = null,
        bool holdUncoveredParts = false,
        TimeSpan? flushAge = null,
        StageTimes? times = null,
        Action? onUnitDone = null)
    {
        var logger = loggers.CreateLogger("StandFit");
        var workerLock = WorkerLock.Acquire(options.Output, options.WorkerId);
        try
        {
            var catalog = RecipeCatalog.Load(options.Recipes);
            foreach (var problem in catalog.Problems)
            {
                Log.RecipeProblem(logger, problem.ToString());
            }

            Log.RecipesLoaded(logger, catalog.Recipes.Length, options.Recipes);
            var recipes = new RecipeSource(options.Recipes, catalog, logger);
            var processor = new UnitProcessor(new SweepFileReader(options.MaxFileBytes) { Times = times }, () => recipes.Current, logger) { Times = times };
            var startedAt = clock.GetUtcNow();
            var runId = ToolInfo.NewRunId(startedAt, options.WorkerId);
            var claims = mode == DispositionMode.Move ? new ClaimFolder(options.Inbox, options.WorkerId) : null;
            var runner = new BatchRunner(
                processor,
                new ParquetSummaryWriter(options.Output, runId, options.WorkerId),
                new PassFailLog(options.Output),
                new FileDisposer(options.Archive, options.Rejected, mode),
                claims is null ? new InPlaceIntake() : claims,
                options.Output,
                options.WorkerId,
                runId,
                clock,
                ToolInfo.Version,
                options.FlushUnits,
                logger)
            {
                OnPublished = onPublished,
                OnDuplicate = onDuplicate,
                HoldUncoveredParts = holdUncoveredParts && claims is not null,
                RepeatLogInterval = TimeSpan.FromSeconds(options.FaultLogSeconds),
                JournalCompactUnits = options.JournalCompactUnits,
                FlushAge = flushAge ?? TimeSpan.Zero,
                Times = times,
                OnUnitDone = onUnitDone,
            };
            return new Pipeline(workerLock, options, startedAt.UtcDateTime, recipes, processor, runner, claims);
        }
        catch
        {
            workerLock.Dispose();
            throw;
        }
    }

    public void Dispose()
    {
        Runner.Dispose();
        _lock.Dispose();
    }
}
