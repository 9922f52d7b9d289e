using Microsoft.Extensions.Logging;
using StandFit.Edges.Configuration;
using StandFit.Edges.Folders;
using StandFit.Edges.Logging;
using StandFit.Edges.Outputs;
using StandFit.Edges.Readers;
using StandFit.Edges.RecipeFiles;

namespace StandFit.Edges.Processing;

/// <summary>
/// The composition root shared by <c>run</c> and <c>watch</c>: builds the reader, the recipe
/// catalog, the sinks and the batch runner from validated options. Plain objects, no host needed.
/// </summary>
public sealed class Pipeline
{
    private Pipeline(RecipeCatalog catalog, UnitProcessor processor, BatchRunner runner)
    {
        Catalog = catalog;
        Processor = processor;
        Runner = runner;
    }

    public RecipeCatalog Catalog { get; }

    public UnitProcessor Processor { get; }

    public BatchRunner Runner { get; }

    public static Pipeline Build(StandFitOptions options, ILoggerFactory loggers, DispositionMode mode, TimeProvider clock, Action<SummaryRecord>? onPublished = null)
    {
        var logger = loggers.CreateLogger("StandFit");
        var catalog = RecipeCatalog.Load(options.Recipes);
        foreach (var problem in catalog.Problems)
        {
            Log.RecipeProblem(logger, problem.ToString());
        }

        Log.RecipesLoaded(logger, catalog.Recipes.Length, options.Recipes);
        var processor = new UnitProcessor(new SweepFileReader(options.MaxFileBytes), () => catalog, logger);
        var runId = ToolInfo.NewRunId(clock.GetUtcNow());
        var runner = new BatchRunner(
            processor,
            new ParquetSummaryWriter(options.Output, runId),
            new PassFailLog(options.Output),
            new FileDisposer(options.Archive, options.Rejected, mode),
            clock,
            ToolInfo.Version,
            options.FlushUnits,
            logger)
        {
            OnPublished = onPublished,
        };
        return new Pipeline(catalog, processor, runner);
    }
}
