using System.Collections.Immutable;
using System.Text;
using System.Text.RegularExpressions;
using StandFit.Core.Ingest;
using StandFit.Core.Problems;
using StandFit.Core.Recipes;
using StandFit.Edges.Readers;

namespace StandFit.Edges.RecipeFiles;

/// <summary>
/// The recipes in force, and the problems of the recipe files that were refused. A recipe that
/// <c>extends</c> a family recipe is bound on its family's keys merged with its own (mappings merge,
/// anything else is replaced); its content hash covers both files.
/// </summary>
public sealed class RecipeCatalog
{
    private readonly Dictionary<string, Recipe> _byPart;
    private readonly ImmutableDictionary<Recipe, YamlMap> _effective;

    private RecipeCatalog(ImmutableArray<Recipe> recipes, ImmutableArray<Problem> problems, ImmutableArray<string> filesChecked, ImmutableDictionary<Recipe, YamlMap> effective)
    {
        Recipes = recipes;
        Problems = problems;
        FilesChecked = filesChecked;
        _effective = effective;
        _byPart = new Dictionary<string, Recipe>(StringComparer.OrdinalIgnoreCase);
        foreach (var recipe in recipes)
        {
            foreach (var part in recipe.Parts)
            {
                _byPart[part] = recipe;
            }
        }
    }

    /// <summary>The recipes that judge parts (family recipes are not among them).</summary>
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

    /// <summary>The recipe for a sweep: by its <c>part</c> metadata, else by its file name against the recipes' file patterns.</summary>
    public Result<Recipe> Match(SweepTable table)
    {
        var part = table.Meta(MetadataKeys.Part);
        if (part is null)
        {
            foreach (var recipe in Recipes)
            {
                if (recipe.FilePatterns.Any(p => Glob(p).IsMatch(table.SourceName)))
                {
                    return recipe;
                }
            }

            return new Problem(ReasonCodes.InputNoRecipe.Code, Messages.NoPartMetadata(MetadataKeys.Part), SourceLocation.WholeFile(table.SourceName));
        }

        if (_byPart.TryGetValue(part, out var byPart))
        {
            return byPart;
        }

        var line = table.Metadata.First(m => m.Key == MetadataKeys.Part).Line;
        return new Problem(ReasonCodes.InputNoRecipe.Code, Messages.NoRecipe(MetadataKeys.Part, SweepAssembler.Shown(part)), SourceLocation.At(table.SourceName, line));
    }

    /// <summary>The recipe that judges a part, or null.</summary>
    public Recipe? ForPart(string part) => _byPart.GetValueOrDefault(part);

    /// <summary>The recipe's keys after inheritance, as YAML, each value followed by the file and line it came from.</summary>
    public string Explain(Recipe recipe) => YamlWriter.Write(_effective[recipe]);

    /// <summary>Loads every *.yaml / *.yml file of a folder (or one file). Files are read in ordinal name order.</summary>
    public static RecipeCatalog Load(string path)
    {
        var files = Directory.Exists(path)
            ? Directory.EnumerateFiles(path).Where(f => f.EndsWith(".yaml", StringComparison.OrdinalIgnoreCase) || f.EndsWith(".yml", StringComparison.OrdinalIgnoreCase)).Order(StringComparer.Ordinal).ToArray()
            : [path];
        var problems = ImmutableArray.CreateBuilder<Problem>();
        var sources = new List<Source>();
        foreach (var file in files)
        {
            if (Read(file, problems) is { } source)
            {
                sources.Add(source);
            }
        }

        var families = sources.Where(s => s.IsFamily && s.Name is not null).GroupBy(s => s.Name!, StringComparer.Ordinal).ToDictionary(g => g.Key, g => g.First(), StringComparer.Ordinal);
        var recipes = ImmutableArray.CreateBuilder<Recipe>();
        var effective = ImmutableDictionary.CreateBuilder<Recipe, YamlMap>(ReferenceEqualityComparer.Instance);
        var partOwner = new Dictionary<string, string>(StringComparer.OrdinalIgnoreCase);
        foreach (var source in sources)
        {
            var sink = new ProblemSink(source.File);
            var (merged, hash) = Resolve(source, families, sink);
            if (merged is null)
            {
                problems.AddRange(sink.Problems);
                continue;
            }

            var bound = RecipeBinder.Bind(merged, sink, hash);
            if (!bound.IsSuccess)
            {
                problems.AddRange(bound.Problems);
                continue;
            }

            if (bound.Value.IsFamily)
            {
                continue;
            }

            var duplicate = false;
            foreach (var part in bound.Value.Parts)
            {
                if (partOwner.TryGetValue(part, out var other))
                {
                    problems.Add(new Problem(RecipeCodes.DuplicatePart, Messages.DuplicatePart(part, other), SourceLocation.WholeFile(source.File)));
                    duplicate = true;
                }
            }

            if (!duplicate)
            {
                foreach (var part in bound.Value.Parts)
                {
                    partOwner[part] = source.File;
                }

                recipes.Add(bound.Value);
                effective[bound.Value] = merged;
            }
        }

        return new RecipeCatalog(recipes.ToImmutable(), problems.ToImmutable(), [.. files.Select(Path.GetFileName).OfType<string>()], effective.ToImmutable());
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

    private sealed record Source(string File, YamlMap Tree, string Hash, string? Name, string? Extends, bool IsFamily);

    private static Source? Read(string file, ImmutableArray<Problem>.Builder problems)
    {
        var shown = Path.GetFileName(file);
        byte[] bytes;
        try
        {
            bytes = System.IO.File.ReadAllBytes(file);
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            problems.Add(new Problem(RecipeCodes.Unreadable, Messages.UnreadableFile(e.Message), SourceLocation.WholeFile(shown)));
            return null;
        }

        var decoded = SweepFileReader.Decode(shown, bytes);
        if (!decoded.IsSuccess)
        {
            problems.AddRange(decoded.Problems.Select(p => p with { Code = RecipeCodes.Unreadable }));
            return null;
        }

        var tree = YamlTree.Parse(shown, decoded.Value);
        if (!tree.IsSuccess)
        {
            problems.AddRange(tree.Problems);
            return null;
        }

        if (tree.Value is not YamlMap root)
        {
            problems.Add(new Problem(RecipeCodes.BadValue, tree.Value is null ? Messages.RecipeEmptyFile() : Messages.ExpectedMap("the file"), tree.Value is null ? SourceLocation.WholeFile(shown) : SourceLocation.At(shown, tree.Value.Line, tree.Value.Column)));
            return null;
        }

        string? Scalar(string key) => root.Entries.FirstOrDefault(e => e.Key.Text == key)?.Value is YamlScalar s ? s.Text : null;
        return new Source(shown, root, Hashing.Sha256Hex(bytes), Scalar("recipe"), Scalar("extends"), Scalar("family") == "true");
    }

    private static (YamlMap? Merged, string Hash) Resolve(Source source, Dictionary<string, Source> families, ProblemSink sink)
    {
        var chain = new List<Source> { source };
        var current = source;
        while (current.Extends is { } parent)
        {
            var node = current.Tree.Entries.First(e => e.Key.Text == "extends").Value;
            if (!families.TryGetValue(parent, out var family))
            {
                sink.Add(RecipeCodes.UnknownFamily, Messages.FamilyNotFound(parent, families.Keys.Order(StringComparer.Ordinal)), node);
                return (null, "");
            }

            if (chain.Contains(family))
            {
                sink.Add(RecipeCodes.UnknownFamily, Messages.FamilyCycle(parent), node);
                return (null, "");
            }

            chain.Add(family);
            current = family;
        }

        // Merge from the root family down; the content hash chains every file's bytes.
        var merged = chain[^1].Tree;
        var hash = chain[^1].Hash;
        for (var i = chain.Count - 2; i >= 0; i--)
        {
            merged = Merge(merged, chain[i].Tree, inheriting: true);
            hash = Hashing.Sha256Hex(Encoding.UTF8.GetBytes(hash + ":" + chain[i].Hash));
        }

        return (merged, hash);
    }

    /// <summary>The keys of <paramref name="over"/> on top of <paramref name="under"/>: mappings merge, anything else is replaced.</summary>
    private static YamlMap Merge(YamlMap under, YamlMap over, bool inheriting)
    {
        var entries = new List<YamlEntry>();
        foreach (var entry in under.Entries)
        {
            // A family's own 'family' and 'extends' keys are not inherited.
            if (inheriting && entry.Key.Text is "family" or "extends")
            {
                continue;
            }

            var replacement = over.Entries.FirstOrDefault(e => e.Key.Text == entry.Key.Text);
            entries.Add(replacement is null
                ? entry
                : replacement.Value is YamlMap overMap && entry.Value is YamlMap underMap
                    ? new YamlEntry(replacement.Key, Merge(underMap, overMap, inheriting: false))
                    : replacement);
        }

        entries.AddRange(over.Entries.Where(e => !under.Entries.Any(u => u.Key.Text == e.Key.Text) || (inheriting && e.Key.Text is "family" or "extends")));
        return over with { Entries = [.. entries] };
    }

    private static Regex Glob(string pattern) =>
        new("^" + Regex.Escape(pattern).Replace("\\*", ".*", StringComparison.Ordinal).Replace("\\?", ".", StringComparison.Ordinal) + "$", RegexOptions.IgnoreCase | RegexOptions.CultureInvariant, TimeSpan.FromMilliseconds(100));
}
