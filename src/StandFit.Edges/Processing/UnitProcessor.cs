using Microsoft.Extensions.Logging;
using StandFit.Core.Evaluation;
using StandFit.Core.Fitting;
using StandFit.Core.Ingest;
using StandFit.Core.Problems;
using StandFit.Core.Recipes;
using StandFit.Edges.Logging;
using StandFit.Edges.Readers;
using StandFit.Edges.RecipeFiles;

namespace StandFit.Edges.Processing;

/// <summary>One input read and judged: the file's bytes' hash and the evaluation.</summary>
public sealed record ProcessedUnit(string InputPath, SweepFile File, UnitEvaluation Evaluation);

/// <summary>
/// Reads one sweep file, picks its recipe and evaluates it. Failure policy: bad input becomes a
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

    public ProcessedUnit Process(string path)
    {
        var file = reader.Read(path);
        return new ProcessedUnit(path, file, Evaluate(file));
    }

    public UnitEvaluation Evaluate(SweepFile file)
    {
        try
        {
            if (!file.Table.IsSuccess)
            {
                var known = SweepAssembler.ReadIdentity(file.Name, file.Metadata);
                return UnitEvaluation.Rejected(file.Name, file.Table.Problems[0], known.IsSuccess ? known.Value : null);
            }

            var table = file.Table.Value;
            var recipe = RecipeOverride is not null ? Result<Recipe>.Success(RecipeOverride) : recipes().Match(table);
            if (!recipe.IsSuccess)
            {
                var identity = SweepAssembler.ReadIdentity(table);
                return UnitEvaluation.Rejected(file.Name, recipe.Problems[0], identity.IsSuccess ? identity.Value : null);
            }

            return UnitEvaluator.Evaluate(table, recipe.Value, ModelOverride, file.Sha256);
        }
        catch (Exception e) when (e is not OutOfMemoryException)
        {
            Log.UnitInternalError(logger, e, file.Name);
            var problem = new Problem(ReasonCodes.InternalError.Code, Messages.InternalError(e.GetType().Name), SourceLocation.WholeFile(file.Name));
            return UnitEvaluation.Rejected(file.Name, problem);
        }
    }
}
