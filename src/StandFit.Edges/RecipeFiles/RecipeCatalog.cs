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

    /// <summary>
    /// The part the leading metadata names when no recipe in force lists it (what <c>watch</c> holds
    /// the unit for), or null: no part named (bad input, rejected), or a recipe lists it.
    /// </summary>
    public string? UncoveredPart(ImmutableArray<MetadataEntry> metadata)
    {
        foreach (var m in metadata)
        {
            if (m.Key == MetadataKeys.Part)
            {
                return m.Value.Length == 0 || _byPart.ContainsKey(m.Value) ? null : m.Value;
            }
        }

        return null;
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

        // Every file is bound on its whole chain, so a family's own problems come back from each of
        // its variants: each problem is reported once. A recipe whose family (or one of its families)
        // has problems is not in force either, even when it overrides the broken key.
        var reported = new HashSet<Problem>();
        void Report(IEnumerable<Problem> found)
        {
            foreach (var problem in found)
            {
                if (reported.Add(problem))
                {
                    problems.Add(problem);
                }
            }
        }

        var resolved = new List<(Source Source, List<Source> Chain, YamlMap? Merged, Recipe? Bound)>();
        var ok = new HashSet<string>(StringComparer.Ordinal);
        foreach (var source in sources)
        {
            var sink = new ProblemSink(source.File);
            var (merged, hash, chain) = Resolve(source, families, sink);
            if (merged is null)
            {
                Report(sink.Problems);
                resolved.Add((source, chain, null, null));
                continue;
            }

            var bound = RecipeBinder.Bind(merged, sink, hash);
            Report(bound.Problems);
            resolved.Add((source, chain, merged, bound.IsSuccess ? bound.Value : null));
            if (bound.IsSuccess)
            {
                ok.Add(source.File);
            }
        }

        var recipes = ImmutableArray.CreateBuilder<Recipe>();
        var effective = ImmutableDictionary.CreateBuilder<Recipe, YamlMap>(ReferenceEqualityComparer.Instance);
        var partOwner = new Dictionary<string, string>(StringComparer.OrdinalIgnoreCase);
        foreach (var (source, chain, merged, bound) in resolved)
        {
            if (bound is null || merged is null || bound.IsFamily || !chain.All(c => ok.Contains(c.File)))
            {
                continue;
            }

            var duplicate = false;
            foreach (var part in bound.Parts)
            {
                if (partOwner.TryGetValue(part, out var other))
                {
                    Report([new Problem(RecipeCodes.DuplicatePart, Messages.DuplicatePart(part, other), SourceLocation.WholeFile(source.File))]);
                    duplicate = true;
                }
            }

            if (!duplicate)
            {
                foreach (var part in bound.Parts)
                {
                    partOwner[part] = source.File;
                }

                recipes.Add(bound);
                effective[bound] = merged;
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

        var decoded = Decode(shown, bytes);
        if (!decoded.IsSuccess)
        {
            problems.AddRange(decoded.Problems);
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

    /// <summary>The file's keys merged onto its families' (null after a problem), the chained hash, and the chain: the file, then its families up to the root.</summary>
    private static readonly UTF8Encoding StrictUtf8 = new(encoderShouldEmitUTF8Identifier: false, throwOnInvalidBytes: true);

    /// <summary>
    /// A recipe file's text: UTF-8, with or without a byte-order mark. Anything else is
    /// <c>recipe.unreadable</c>, told as a recipe author needs it (save the file as UTF-8), at the
    /// line and column of the first bad byte when it has one.
    /// </summary>
    private static Result<string> Decode(string shown, byte[] bytes)
    {
        ReadOnlySpan<byte> body = bytes;
        if (body.Length >= 2 && ((body[0] == 0xFF && body[1] == 0xFE) || (body[0] == 0xFE && body[1] == 0xFF)))
        {
            return Result<string>.Failure(new Problem(RecipeCodes.Unreadable, Messages.RecipeUtf16File(), SourceLocation.WholeFile(shown)));
        }

        if (body.Length >= 3 && body[0] == 0xEF && body[1] == 0xBB && body[2] == 0xBF)
        {
            body = body[3..];
        }

        for (var i = 0; i < body.Length; i++)
        {
            if (body[i] < 0x20 && body[i] is not (byte)'\n' and not (byte)'\r' and not (byte)'\t')
            {
                return Result<string>.Failure(new Problem(RecipeCodes.Unreadable, Messages.RecipeNotText(i), At(shown, body, i)));
            }
        }

        try
        {
            return StrictUtf8.GetString(body);
        }
        catch (DecoderFallbackException e)
        {
            var offset = Math.Max(0, e.Index);
            return Result<string>.Failure(new Problem(RecipeCodes.Unreadable, Messages.RecipeInvalidUtf8(offset), At(shown, body, offset)));
        }
    }

    /// <summary>The line and column (in characters) of a byte offset, counting the valid text before it.</summary>
    private static SourceLocation At(string shown, ReadOnlySpan<byte> body, int offset)
    {
        var before = body[..Math.Min(offset, body.Length)];
        var lineStart = before.LastIndexOf((byte)'\n') + 1;
        var line = before.Count((byte)'\n') + 1;
        var prefix = Encoding.UTF8.GetString(before[lineStart..]);
        return SourceLocation.At(shown, line, prefix.Length + 1);
    }

    private static (YamlMap? Merged, string Hash, List<Source> Chain) Resolve(Source source, Dictionary<string, Source> families, ProblemSink sink)
    {
        var chain = new List<Source> { source };
        var current = source;
        while (current.Extends is { } parent)
        {
            var node = current.Tree.Entries.First(e => e.Key.Text == "extends").Value;
            if (!families.TryGetValue(parent, out var family))
            {
                sink.Add(RecipeCodes.UnknownFamily, Messages.FamilyNotFound(parent, families.Keys.Order(StringComparer.Ordinal)), node);
                return (null, "", chain);
            }

            if (chain.Contains(family))
            {
                sink.Add(RecipeCodes.UnknownFamily, Messages.FamilyCycle(parent), node);
                return (null, "", chain);
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

        return (merged, hash, chain);
    }

    /// <summary>
    /// The keys of <paramref name="over"/> on top of <paramref name="under"/>: mappings merge, anything
    /// else is replaced. A key given twice in <paramref name="over"/> stays twice (the first merged,
    /// the second after it as written), so that the binder reports it as a duplicate key wherever it
    /// sits; a key given twice in <paramref name="under"/> is taken once (the family's own binding
    /// reports it).
    /// </summary>
    private static YamlMap Merge(YamlMap under, YamlMap over, bool inheriting)
    {
        var entries = new List<YamlEntry>();
        var seen = new HashSet<string>(StringComparer.Ordinal);
        foreach (var entry in under.Entries)
        {
            // A family's own 'family' and 'extends' keys are not inherited.
            if ((inheriting && entry.Key.Text is "family" or "extends") || !seen.Add(entry.Key.Text))
            {
                continue;
            }

            var replacements = over.Entries.Where(e => e.Key.Text == entry.Key.Text).ToList();
            if (replacements.Count == 0)
            {
                entries.Add(entry);
                continue;
            }

            var first = replacements[0];
            entries.Add(first.Value is YamlMap overMap && entry.Value is YamlMap underMap
                ? new YamlEntry(first.Key, Merge(underMap, overMap, inheriting: false))
                : first);
            entries.AddRange(replacements.Skip(1));
        }

        entries.AddRange(over.Entries.Where(e => !seen.Contains(e.Key.Text) || (inheriting && e.Key.Text is "family" or "extends")));
        return over with { Entries = [.. entries] };
    }

    private static Regex Glob(string pattern) =>
        new("^" + Regex.Escape(pattern).Replace("\\*", ".*", StringComparison.Ordinal).Replace("\\?", ".", StringComparison.Ordinal) + "$", RegexOptions.IgnoreCase | RegexOptions.CultureInvariant, TimeSpan.FromMilliseconds(100));
}
