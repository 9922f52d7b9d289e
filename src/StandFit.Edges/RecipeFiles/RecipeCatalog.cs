using System.Collections.Immutable;
using System.Text;
using StandFit.Core.Ingest;
using StandFit.Core.Problems;
using StandFit.Core.Recipes;
using StandFit.Edges.Readers;

namespace StandFit.Edges.RecipeFiles;

/// <summary>The recipes in force, and the problems of the recipe files that were refused.</summary>
public sealed class RecipeCatalog
{
    private readonly Dictionary<string, Recipe> _byPart;

    private RecipeCatalog(ImmutableArray<Recipe> recipes, ImmutableArray<Problem> problems, ImmutableArray<string> filesChecked)
    {
        Recipes = recipes;
        Problems = problems;
        FilesChecked = filesChecked;
        _byPart = new Dictionary<string, Recipe>(StringComparer.OrdinalIgnoreCase);
        foreach (var recipe in recipes)
        {
            foreach (var part in recipe.Parts)
            {
                _byPart[part] = recipe;
            }
        }
    }

    public ImmutableArray<Recipe> Recipes { get; }

    /// <summary>Every problem of every recipe file (a file with any problem is not in force).</summary>
    public ImmutableArray<Problem> Problems { get; }

    public ImmutableArray<string> FilesChecked { get; }

    public bool IsValid => Problems.IsEmpty;

    /// <summary>The cell format of the recipe that the leading metadata's <c>part</c> names; standard when none does.</summary>
    public SweepFormat FormatFor(ImmutableArray<MetadataEntry> metadata)
    {
        foreach (var m in metadata)
        {
            if (m.Key == MetadataKeys.Part)
            {
                return _byPart.TryGetValue(m.Value, out var recipe) ? recipe.Format : SweepFormat.Standard;
            }
        }

        return SweepFormat.Standard;
    }

    /// <summary>The hashes of the recipe files in force, in name order: what changed between two loads.</summary>
    public string Fingerprint => string.Join(",", Recipes.Select(r => r.SourceFile + "=" + r.ContentHash));

    /// <summary>The recipe for a sweep, chosen by its <c>part</c> metadata; a problem when none lists it.</summary>
    public Result<Recipe> Match(SweepTable table)
    {
        var part = table.Meta(MetadataKeys.Part);
        if (part is null)
        {
            return new Problem(ReasonCodes.InputNoRecipe.Code, Messages.NoPartMetadata(MetadataKeys.Part), SourceLocation.WholeFile(table.SourceName));
        }

        if (_byPart.TryGetValue(part, out var recipe))
        {
            return recipe;
        }

        var line = table.Metadata.First(m => m.Key == MetadataKeys.Part).Line;
        return new Problem(ReasonCodes.InputNoRecipe.Code, Messages.NoRecipe(MetadataKeys.Part, SweepAssembler.Shown(part)), SourceLocation.At(table.SourceName, line));
    }

    /// <summary>Loads every *.yaml / *.yml file of a folder (or one file). Files are read in ordinal name order.</summary>
    public static RecipeCatalog Load(string path)
    {
        var files = Directory.Exists(path)
            ? Directory.EnumerateFiles(path).Where(f => f.EndsWith(".yaml", StringComparison.OrdinalIgnoreCase) || f.EndsWith(".yml", StringComparison.OrdinalIgnoreCase)).Order(StringComparer.Ordinal).ToArray()
            : [path];
        var recipes = ImmutableArray.CreateBuilder<Recipe>();
        var problems = ImmutableArray.CreateBuilder<Problem>();
        var partOwner = new Dictionary<string, string>(StringComparer.OrdinalIgnoreCase);
        foreach (var file in files)
        {
            var shown = Path.GetFileName(file);
            byte[] bytes;
            try
            {
                bytes = File.ReadAllBytes(file);
            }
            catch (Exception e) when (e is IOException or UnauthorizedAccessException)
            {
                problems.Add(new Problem(RecipeCodes.Unreadable, Messages.UnreadableFile(e.Message), SourceLocation.WholeFile(shown)));
                continue;
            }

            var decoded = SweepFileReader.Decode(shown, bytes);
            if (!decoded.IsSuccess)
            {
                problems.AddRange(decoded.Problems.Select(p => p with { Code = RecipeCodes.Unreadable }));
                continue;
            }

            var bound = RecipeBinder.Bind(shown, decoded.Value, Hashing.Sha256Hex(bytes));
            if (!bound.IsSuccess)
            {
                problems.AddRange(bound.Problems);
                continue;
            }

            var duplicate = false;
            foreach (var part in bound.Value.Parts)
            {
                if (partOwner.TryGetValue(part, out var other))
                {
                    problems.Add(new Problem(RecipeCodes.DuplicatePart, Messages.DuplicatePart(part, other), SourceLocation.WholeFile(shown)));
                    duplicate = true;
                }
            }

            if (!duplicate)
            {
                foreach (var part in bound.Value.Parts)
                {
                    partOwner[part] = shown;
                }

                recipes.Add(bound.Value);
            }
        }

        return new RecipeCatalog(recipes.ToImmutable(), problems.ToImmutable(), [.. files.Select(Path.GetFileName).OfType<string>()]);
    }

    /// <summary>One line per problem, <c>file:line:column: message [code]</c>.</summary>
    public string Report()
    {
        var builder = new StringBuilder();
        foreach (var p in Problems)
        {
            builder.Append(p.ToString()).Append('\n');
        }

        return builder.ToString();
    }
}
