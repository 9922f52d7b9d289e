using StandFit.Edges.RecipeFiles;

namespace StandFit.Cli.Commands;

/// <summary><c>standfit recipes explain PART</c> and <c>standfit recipes schema</c>.</summary>
internal static class RecipesCommand
{
    public static int Explain(string[] args, TextWriter output, TextWriter error)
    {
        var (parsed, problem) = Arguments.Parse(args, ["--config", "--recipes"], ["--help"]);
        if (parsed is not null && parsed.Has("--help"))
        {
            output.WriteLine(Help.RecipesExplain);
            return ExitCodes.Ok;
        }

        if (parsed is null || parsed.Positional.Count != 1)
        {
            error.WriteLine("standfit recipes explain: " + (problem ?? "give one part number"));
            error.WriteLine(Help.RecipesExplain);
            return ExitCodes.Usage;
        }

        string folder;
        if (parsed.Value("--recipes") is { } given)
        {
            folder = given;
        }
        else
        {
            var options = Startup.LoadOptions(parsed.Value("--config"), error, needInbox: false, prepareFolders: false);
            if (options is null)
            {
                return ExitCodes.Configuration;
            }

            folder = options.Recipes;
        }

        var catalog = RecipeCatalog.Load(folder);
        if (!catalog.IsValid)
        {
            Startup.Print(error, "recipes", catalog.Problems);
            return ExitCodes.Configuration;
        }

        var part = parsed.Positional[0];
        if (catalog.ForPart(part) is not { } recipe)
        {
            error.WriteLine($"standfit recipes explain: no recipe lists part '{part}'.");
            return ExitCodes.Invalid;
        }

        output.WriteLine($"# effective recipe for part {part}: {recipe.Name} version {recipe.Version}, sha256 {recipe.ContentHash}");
        output.Write(catalog.Explain(recipe));
        return ExitCodes.Ok;
    }

    public static int Schema(string[] args, TextWriter output, TextWriter error)
    {
        if (args.Length == 1 && args[0] == "--help")
        {
            output.WriteLine(Help.RecipesSchema);
            return ExitCodes.Ok;
        }

        if (args.Length != 0)
        {
            error.WriteLine(Help.RecipesSchema);
            return ExitCodes.Usage;
        }

        output.Write(RecipeJsonSchema.Generate());
        return ExitCodes.Ok;
    }
}
