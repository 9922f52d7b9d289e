using Microsoft.Extensions.Logging;
using StandFit.Core.Evaluation;
using StandFit.Core.Fitting;
using StandFit.Core.Ingest;
using StandFit.Core.Problems;
using StandFit.Core.Recipes;
using StandFit.Edges.Folders;
using StandFit.Edges.Logging;
using StandFit.Edges.Outputs;
using StandFit.Edges.Readers;
using StandFit.Edges.RecipeFiles;

namespace StandFit.Edges.Processing;

/// <summary>One input read and judged: the file's bytes' hash, the evaluation, and the per-point rows of a fitted unit.</summary>
public sealed record ProcessedUnit(InputFile Input, SweepFile File, UnitEvaluation Evaluation)
{
    /// <summary>The unit's rows of the per-point table, keyed by its unit key (empty when it was not fitted).</summary>
    public IReadOnlyList<PointRecord> Points { get; init; } = [];

    /// <summary>The part the file names when no recipe in force lists it (<c>watch</c> holds such a unit); null otherwise.</summary>
    public string? UncoveredPart { get; init; }

    /// <summary>The recipes the unit was read and judged under.</summary>
    public RecipeCatalog? Catalog { get; init; }
}

/// <summary>
/// Reads one sweep file, picks its recipe, evaluates it and computes the per-point rows of a fitted
/// unit (in the batch's parallel part, with the unit's other figures). Failure policy: bad input becomes a
/// rejected evaluation with its reason; an exception inside the core (a bug) becomes a rejection
/// with <c>internal.error</c> and the stack in the operations log, and processing goes on. I/O
/// errors on the input itself propagate (the caller skips the file and retries it later).
/// </summary>
public sealed class UnitProcessor(SweepFileReader reader, Func<RecipeCatalog> recipes, ILogger logger)
{
    /// <summary>When set, this recipe judges every file, whatever its part (exploration with <c>inspect --recipe</c>).</summary>
    public Recipe? RecipeOverride { get; init; }

    /// <summary>When set, this model replaces the recipe's (exploration with <c>inspect --model</c>).</summary>
    public LinearModel? ModelOverride { get; init; }

    /// <summary>When set, each unit's time per stage is added here (<c>run --stats</c>).</summary>
    public StageTimes? Times { get; init; }

    public ProcessedUnit Process(string path) => Process(new InputFile(path, Path.GetFileName(path), null));

    /// <summary>Reads the input (its cell format chosen by the recipe its leading metadata names) and judges it.</summary>
    public ProcessedUnit Process(InputFile input)
    {
        var times = Times;
        if (times is not null)
        {
            StageTimes.Start();
        }

        var catalog = recipes();
        var file = reader.Read(input.Path, metadata => RecipeOverride?.Format ?? catalog.FormatFor(metadata), input.Name);
        var evaluation = Evaluate(file, catalog);
        var uncovered = RecipeOverride is null ? catalog.UncoveredPart(file.Metadata) : null;
        try
        {
            var unit = new ProcessedUnit(input, file, evaluation)
            {
                Points = evaluation.Recipe is { } r && !r.KeepsPoints(evaluation.Ruling) ? [] : PointRecordFactory.Create(evaluation, UnitKeys.Of(file.Sha256, evaluation.Recipe?.ContentHash)),
                UncoveredPart = uncovered,
                Catalog = catalog,
            };
            times?.Lap(Stage.Points);
            return unit;
        }
        catch (Exception e) when (e is not OutOfMemoryException)
        {
            // A bug in the per-point figures: the unit is rejected as for any bug in the core, and the batch goes on.
            Log.UnitInternalError(logger, e, file.Name);
            var problem = new Problem(ReasonCodes.InternalError.Code, Messages.InternalError(e.GetType().Name), SourceLocation.WholeFile(file.Name));
            return new ProcessedUnit(input, file, UnitEvaluation.Rejected(file.Name, problem)) { UncoveredPart = uncovered, Catalog = catalog };
        }
    }

    /// <summary>The recipes in force now.</summary>
    public RecipeCatalog Recipes => recipes();

    public UnitEvaluation Evaluate(SweepFile file) => Evaluate(file, recipes());

    private UnitEvaluation Evaluate(SweepFile file, RecipeCatalog catalog)
    {
        Times?.Lap(Stage.Parse);
        try
        {
            if (!file.Table.IsSuccess)
            {
                var known = SweepAssembler.ReadIdentity(file.Name, file.Metadata);
                return UnitEvaluation.Rejected(file.Name, file.Table.Problems[0], known.IsSuccess ? known.Value : null);
            }

            var table = file.Table.Value;
            var recipe = RecipeOverride is not null ? Result<Recipe>.Success(RecipeOverride) : catalog.Match(table);
            if (!recipe.IsSuccess)
            {
                var identity = SweepAssembler.ReadIdentity(table);
                return UnitEvaluation.Rejected(file.Name, recipe.Problems[0], identity.IsSuccess ? identity.Value : null);
            }

            if (recipe.Value.Format != file.Format)
            {
                // The leading metadata named another part than the strict read did: the cells were split for another recipe.
                var identity = SweepAssembler.ReadIdentity(table);
                var mismatch = new Problem(ReasonCodes.InputWrongSeparator.Code, Messages.WrongSeparator(recipe.Value.Format.CellSeparator, file.Format.CellSeparator), SourceLocation.WholeFile(file.Name));
                return UnitEvaluation.Rejected(file.Name, mismatch, identity.IsSuccess ? identity.Value : null, recipe.Value);
            }

            return UnitEvaluator.Evaluate(table, recipe.Value, ModelOverride, file.Sha256, Times);
        }
        catch (Exception e) when (e is not OutOfMemoryException)
        {
            Log.UnitInternalError(logger, e, file.Name);
            var problem = new Problem(ReasonCodes.InternalError.Code, Messages.InternalError(e.GetType().Name), SourceLocation.WholeFile(file.Name));
            return UnitEvaluation.Rejected(file.Name, problem);
        }
    }
}
