using System.Text.Json;
using Microsoft.Extensions.Logging.Abstractions;
using StandFit.Core.Fitting;
using StandFit.Edges.Outputs;
using StandFit.Edges.Processing;
using StandFit.Edges.Readers;
using StandFit.Edges.RecipeFiles;

namespace StandFit.Cli.Commands;

/// <summary><c>standfit inspect FILE</c>: fit and rule one file with no side effects.</summary>
internal static class InspectCommand
{
    private static readonly JsonSerializerOptions Json = new() { WriteIndented = true };

    public static int Execute(string[] args, TextWriter output, TextWriter error)
    {
        var (parsed, problem) = Arguments.Parse(args, ["--config", "--recipe", "--model"], ["--json", "--help"]);
        if (parsed is not null && parsed.Has("--help"))
        {
            output.WriteLine(Help.Inspect);
            return ExitCodes.Ok;
        }

        if (parsed is null || parsed.Positional.Count != 1)
        {
            error.WriteLine("standfit inspect: " + (problem ?? "give one sweep file"));
            error.WriteLine(Help.Inspect);
            return ExitCodes.Usage;
        }

        var file = parsed.Positional[0];
        if (!File.Exists(file))
        {
            error.WriteLine($"standfit inspect: '{file}' does not exist.");
            return ExitCodes.Invalid;
        }

        LinearModel? model = null;
        if (parsed.Value("--model") is { } modelName && (model = ParseModel(modelName)) is null)
        {
            error.WriteLine($"standfit inspect: unknown model '{modelName}'; use straight-line, straight-line-through-zero or polynomial-K (K = 1..10).");
            return ExitCodes.Usage;
        }

        RecipeCatalog catalog;
        long maxBytes;
        if (parsed.Value("--recipe") is { } recipeFile)
        {
            catalog = RecipeCatalog.Load(recipeFile);
            maxBytes = new Edges.Configuration.StandFitOptions { ConfigFile = "", ConfigHash = "", Inbox = "", Archive = "", Rejected = "", Output = "", Recipes = "", Logs = "" }.MaxFileBytes;
        }
        else
        {
            var options = Startup.LoadOptions(parsed.Value("--config"), error, needInbox: false, prepareFolders: false);
            if (options is null)
            {
                return ExitCodes.Configuration;
            }

            catalog = RecipeCatalog.Load(options.Recipes);
            maxBytes = options.MaxFileBytes;
        }

        if (!catalog.IsValid)
        {
            Startup.Print(error, "recipes", catalog.Problems);
            return ExitCodes.Configuration;
        }

        if (parsed.Has("--recipe") && catalog.Recipes.Length != 1)
        {
            error.WriteLine($"standfit inspect: --recipe needs one recipe file; '{parsed.Value("--recipe")}' holds {catalog.Recipes.Length}.");
            return ExitCodes.Usage;
        }

        var processor = new UnitProcessor(new SweepFileReader(maxBytes), () => catalog, NullLogger.Instance)
        {
            RecipeOverride = parsed.Has("--recipe") ? catalog.Recipes.Single() : null,
            ModelOverride = model,
        };
        ProcessedUnit unit;
        try
        {
            unit = processor.Process(file);
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            error.WriteLine($"standfit inspect: '{file}' cannot be read: {e.Message}");
            return ExitCodes.Invalid;
        }

        var record = SummaryRecordFactory.Create(unit.Evaluation, unit.File.Sha256, DateTime.UtcNow, ToolInfo.Version, unit.File.Metadata);
        output.WriteLine(parsed.Has("--json") ? JsonSerializer.Serialize(record, Json) : UnitReport.Render(unit.Evaluation, record));
        return ExitCodes.Ok;
    }

    public static LinearModel? ParseModel(string name) => name switch
    {
        "straight-line" => Polynomial.StraightLine,
        "straight-line-through-zero" => Polynomial.StraightLineThroughZero,
        _ when name.StartsWith("polynomial-", StringComparison.Ordinal)
            && int.TryParse(name["polynomial-".Length..], System.Globalization.NumberStyles.None, System.Globalization.CultureInfo.InvariantCulture, out var k)
            && k is >= 1 and <= Polynomial.MaxDegree => Polynomial.OfDegree(k),
        _ => null,
    };
}
