using StandFit.Edges.RecipeFiles;

namespace StandFit.Cli.Commands;

/// <summary><c>standfit recipes check PATH</c>: validate recipes; exit 0 when all are valid, 1 otherwise.</summary>
internal static class RecipesCheckCommand
{
    public static int Execute(string[] args, TextWriter output, TextWriter error)
    {
        var (parsed, problem) = Arguments.Parse(args, [], ["--help"]);
        if (parsed is not null && parsed.Has("--help"))
        {
            output.WriteLine(Help.RecipesCheck);
            return ExitCodes.Ok;
        }

        if (parsed is null || parsed.Positional.Count != 1)
        {
            error.WriteLine("standfit recipes check: " + (problem ?? "give one recipe file or folder"));
            error.WriteLine(Help.RecipesCheck);
            return ExitCodes.Usage;
        }

        var path = parsed.Positional[0];
        if (!File.Exists(path) && !Directory.Exists(path))
        {
            error.WriteLine($"standfit recipes check: '{path}' does not exist.");
            return ExitCodes.Usage;
        }

        var catalog = RecipeCatalog.Load(path);
        output.Write(catalog.Report());
        output.WriteLine(catalog.IsValid
            ? $"{catalog.FilesChecked.Length} recipe file(s) checked: all valid ({catalog.Recipes.Length} recipes, {catalog.Recipes.Sum(r => r.Parts.Length)} parts)."
            : $"{catalog.FilesChecked.Length} recipe file(s) checked: {catalog.Problems.Length} problem(s).");
        return catalog.IsValid ? ExitCodes.Ok : ExitCodes.Invalid;
    }
}
