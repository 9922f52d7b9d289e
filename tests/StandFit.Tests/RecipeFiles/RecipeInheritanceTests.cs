using System.Security.Cryptography;
using System.Text;
using System.Text.RegularExpressions;
using StandFit.Core.Ingest;
using StandFit.Core.Judging;
using StandFit.Core.Problems;
using StandFit.Core.Recipes;
using StandFit.Core.Screening;
using StandFit.Edges.RecipeFiles;
using StandFit.Tests.Support;

namespace StandFit.Tests.RecipeFiles;

/// <summary>
/// Family recipes and <c>extends</c> (RecipeCatalog.Resolve and Merge), and how a sweep finds its
/// recipe: by part, else by file pattern. A family and two variants, in one folder.
/// </summary>
public sealed partial class RecipeInheritanceTests : IDisposable
{
    private const string FamilyFile = "kp-family.yaml";

    // Line numbers of the family file below.
    private const int FamilyGainLine = 20;
    private const int FamilyOffsetLine = 21;
    private const int FamilyConfidenceLine = 15;
    private const int FamilyLegsLine = 25;

    private const string Family = """
        # The KP pressure-transducer family: what every KP variant shares.
        recipe: KP family
        version: "2026.11-a"
        family: true
        columns:
          stimulus: pressure_kPa
          output: output_mV
          leg: leg
          order: step
        units:
          stimulus: kPa
          output: mV
        model:
          type: straight-line
        confidence: 0.95
        decision:
          rule: guarded
        limits:
          # nominal 0.2000 mV/kPa +/- 0.5 %
          gain: { min: 0.1990, max: 0.2010 }
          offset: { min: -0.10, max: 0.10 }
        sweep:
          min_points: 21
          range: { min: 0, max: 250 }
          legs: [up, down]
        gates:
          runs_test:
            p_min: 0.01

        """;

    // Line numbers of the high-temperature variant below.
    private const int HighTempGainLine = 6;

    private const string HighTemp = """
        recipe: KP-250-HT high-temperature variant
        version: "2026.11-ht"
        extends: KP family
        parts: [KP-250-HT]
        limits:
          gain: { max: 0.2020 }
        sweep:
          legs: [up]

        """;

    private const string Zero = """
        recipe: KP-250-Z zero-based variant
        version: "2026.11-z"
        extends: KP family
        parts: [KP-250-Z]
        file_patterns: ["KP250Z-*.csv", "Z??-*.csv"]
        confidence: 0.99

        """;

    private readonly TempFolder _folder = new();

    public void Dispose() => _folder.Dispose();

    private string Write(string name, string text)
    {
        var path = Path.Combine(_folder.Path, name);
        File.WriteAllText(path, text, new UTF8Encoding(encoderShouldEmitUTF8Identifier: false));
        return path;
    }

    private RecipeCatalog LoadAll(string? family = null, string? highTemp = null, string? zero = null)
    {
        Write(FamilyFile, family ?? Family);
        Write("kp-250-ht.yaml", highTemp ?? HighTemp);
        Write("kp-250-z.yaml", zero ?? Zero);
        return RecipeCatalog.Load(_folder.Path);
    }

    private static string Sha(byte[] bytes) => Convert.ToHexStringLower(SHA256.HashData(bytes));

    private static SweepTable Sweep(string fileName, string metadata) =>
        SweepTextParser.Parse(fileName, metadata + "pressure_kPa,output_mV\n0,0\n").Value;

    [Fact]
    public void The_line_constants_match_the_family_and_variant_texts()
    {
        var family = Family.Split('\n');
        Assert.StartsWith("  gain:", family[FamilyGainLine - 1], StringComparison.Ordinal);
        Assert.StartsWith("  offset:", family[FamilyOffsetLine - 1], StringComparison.Ordinal);
        Assert.StartsWith("confidence:", family[FamilyConfidenceLine - 1], StringComparison.Ordinal);
        Assert.StartsWith("  legs:", family[FamilyLegsLine - 1], StringComparison.Ordinal);
        Assert.StartsWith("  gain:", HighTemp.Split('\n')[HighTempGainLine - 1], StringComparison.Ordinal);
    }

    [Fact]
    public void A_family_and_two_variants_load_as_two_recipes_and_the_family_judges_no_part()
    {
        var catalog = LoadAll();

        Assert.True(catalog.IsValid, catalog.Report());
        Assert.Equal(["KP-250-HT high-temperature variant", "KP-250-Z zero-based variant"], catalog.Recipes.Select(r => r.Name).Order(StringComparer.Ordinal));
        Assert.All(catalog.Recipes, r => Assert.False(r.IsFamily));
        Assert.All(catalog.Recipes, r => Assert.Equal("KP family", r.Extends));
        Assert.Equal<string>(["kp-250-ht.yaml", "kp-250-z.yaml", FamilyFile], catalog.FilesChecked);
        Assert.DoesNotContain(catalog.Recipes, r => r.SourceFile == FamilyFile);
        Assert.Null(catalog.ForPart("KP family"));
    }

    [Fact]
    public void A_family_alone_is_valid_and_judges_nothing()
    {
        Write(FamilyFile, Family);

        var catalog = RecipeCatalog.Load(_folder.Path);

        Assert.True(catalog.IsValid, catalog.Report());
        Assert.Empty(catalog.Recipes);
    }

    [Fact]
    public void A_variant_that_overrides_a_limits_max_inherits_its_min_because_mappings_merge()
    {
        var highTemp = LoadAll().ForPart("KP-250-HT")!;

        var gain = Assert.Single(highTemp.Limits, l => l.Figure == "gain");
        Assert.Equal(0.1990, gain.Min);
        Assert.Equal(0.2020, gain.Max);
        Assert.Equal(DecisionRule.Guarded, gain.Rule);

        // Keys the variant does not touch come from the family as they are.
        var offset = Assert.Single(highTemp.Limits, l => l.Figure == "offset");
        Assert.Equal((-0.10, 0.10), (offset.Min!.Value, offset.Max!.Value));
        Assert.Equal(new ColumnMap("pressure_kPa", "output_mV", "leg", "step"), highTemp.Columns);
        Assert.Equal(0.95, highTemp.Confidence.Value);
        Assert.Equal(0.01, highTemp.RunsGate!.PValueFloor);
        Assert.Equal(21, highTemp.Sweep.MinPoints);
        Assert.Equal(250, highTemp.Sweep.Range!.Max);
    }

    [Fact]
    public void A_variants_list_replaces_the_familys_list_and_is_not_appended_to_it()
    {
        var catalog = LoadAll();

        Assert.Equal<Leg>([Leg.Up], catalog.ForPart("KP-250-HT")!.Sweep.Legs);
        Assert.Equal<Leg>([Leg.Up, Leg.Down], catalog.ForPart("KP-250-Z")!.Sweep.Legs);
        Assert.Equal<string>(["KP-250-HT"], catalog.ForPart("KP-250-HT")!.Parts);
    }

    [Fact]
    public void A_variants_value_replaces_the_familys_value()
    {
        var catalog = LoadAll();

        Assert.Equal(0.99, catalog.ForPart("KP-250-Z")!.Confidence.Value);
        Assert.Equal("2026.11-z", catalog.ForPart("KP-250-Z")!.Version);
        Assert.Equal("KP-250-Z zero-based variant", catalog.ForPart("KP-250-Z")!.Name);
    }

    [Fact]
    public void A_variant_that_names_no_version_inherits_the_familys()
    {
        var catalog = LoadAll(zero: Zero.Replace("version: \"2026.11-z\"\n", "", StringComparison.Ordinal));

        Assert.True(catalog.IsValid, catalog.Report());
        Assert.Equal("2026.11-a", catalog.ForPart("KP-250-Z")!.Version);
    }

    [Fact]
    public void The_familys_own_family_flag_is_not_inherited()
    {
        var catalog = LoadAll();
        var zero = catalog.ForPart("KP-250-Z")!;

        Assert.False(zero.IsFamily);
        Assert.DoesNotContain(catalog.Explain(zero).Split('\n'), l => l.StartsWith("family:", StringComparison.Ordinal));
    }

    [Fact]
    public void A_variants_problem_in_an_inherited_key_points_to_the_family_files_line()
    {
        // A line through zero has no offset, so the family's offset limit no longer fits the model.
        var catalog = LoadAll(zero: Zero + "model:\n  type: straight-line-through-zero\n");

        var problem = Assert.Single(catalog.Problems);
        Assert.Equal("recipe.unknown_figure", problem.Code);
        Assert.Equal(SourceLocation.At(FamilyFile, FamilyOffsetLine, 3), problem.Location);
        Assert.StartsWith("limit on 'offset', but model straight-line-through-zero", problem.Message, StringComparison.Ordinal);
        Assert.DoesNotContain(catalog.Recipes, r => r.Name.StartsWith("KP-250-Z", StringComparison.Ordinal));
        Assert.NotNull(catalog.ForPart("KP-250-HT"));
    }

    [Fact]
    public void A_contradiction_between_a_variants_value_and_an_inherited_one_is_reported_at_the_inherited_value()
    {
        var catalog = LoadAll(highTemp: HighTemp.Replace("gain: { max: 0.2020 }", "gain: { max: 0.1980 }", StringComparison.Ordinal));

        // The merged limit has the family's min 0.1990 above the variant's max 0.1980; the min is the family's.
        var problem = Assert.Single(catalog.Problems);
        Assert.Equal("recipe.contradiction", problem.Code);
        Assert.Equal(SourceLocation.At(FamilyFile, FamilyGainLine, 16), problem.Location);
        Assert.Equal("'limits.gain' has min 0.199 above max 0.198; swap them or fix one.", problem.Message);
    }

    [Fact]
    public void A_misspelt_figure_in_a_variant_is_reported_at_the_variants_own_line()
    {
        var catalog = LoadAll(highTemp: HighTemp.Replace("gain: { max: 0.2020 }", "gian: { max: 0.2020 }", StringComparison.Ordinal));

        var problem = Assert.Single(catalog.Problems);
        Assert.Equal("recipe.unknown_figure", problem.Code);
        Assert.Equal(SourceLocation.At("kp-250-ht.yaml", HighTempGainLine, 3), problem.Location);
    }

    [Fact]
    public void Extends_of_a_family_that_is_not_in_the_folder_is_recipe_unknown_family_at_the_extends_value()
    {
        Write("kp-250-ht.yaml", HighTemp);

        var catalog = RecipeCatalog.Load(_folder.Path);

        var problem = Assert.Single(catalog.Problems);
        Assert.Equal("recipe.unknown_family", problem.Code);
        Assert.Equal(SourceLocation.At("kp-250-ht.yaml", 3, 10), problem.Location);
        Assert.StartsWith("'extends: KP family' names no family recipe in this folder", problem.Message, StringComparison.Ordinal);
        Assert.Empty(catalog.Recipes);
    }

    [Fact]
    public void Extends_of_a_recipe_that_is_not_a_family_is_recipe_unknown_family()
    {
        Write("kp-250-ht.yaml", HighTemp);
        Write("plain.yaml", Family.Replace("family: true\n", "parts: [KP-PLAIN]\n", StringComparison.Ordinal));

        var catalog = RecipeCatalog.Load(_folder.Path);

        Assert.Equal("recipe.unknown_family", Assert.Single(catalog.Problems).Code);
        Assert.Equal("KP family", Assert.Single(catalog.Recipes).Name);
    }

    [Fact]
    public void A_family_can_extend_another_family_and_the_nearest_value_wins()
    {
        var sub = """
            recipe: KP high range
            version: "2026.11-hr"
            family: true
            extends: KP family
            sweep:
              range: { max: 400 }

            """;
        var variant = """
            recipe: KP-400
            version: "1"
            extends: KP high range
            parts: [KP-400]

            """;
        Write(FamilyFile, Family);
        Write("kp-high-range.yaml", sub);
        Write("kp-400.yaml", variant);

        var catalog = RecipeCatalog.Load(_folder.Path);

        Assert.True(catalog.IsValid, catalog.Report());
        var recipe = Assert.Single(catalog.Recipes);
        Assert.Equal(new StimulusRange(0, 400), recipe.Sweep.Range);
        Assert.Equal("KP high range", recipe.Extends);
        Assert.False(recipe.IsFamily);

        // The hash chains from the root family down: H(H(root : middle) : variant).
        var root = Sha(File.ReadAllBytes(Path.Combine(_folder.Path, FamilyFile)));
        var middle = Sha(File.ReadAllBytes(Path.Combine(_folder.Path, "kp-high-range.yaml")));
        var own = Sha(File.ReadAllBytes(Path.Combine(_folder.Path, "kp-400.yaml")));
        var chained = Sha(Encoding.UTF8.GetBytes(Sha(Encoding.UTF8.GetBytes(root + ":" + middle)) + ":" + own));
        Assert.Equal(chained, recipe.ContentHash);
    }

    [Fact]
    public void Families_that_extend_each_other_in_a_cycle_are_refused()
    {
        Write("a.yaml", "recipe: A\nversion: \"1\"\nfamily: true\nextends: B\n");
        Write("b.yaml", "recipe: B\nversion: \"1\"\nfamily: true\nextends: A\n");
        Write("v.yaml", "recipe: V\nversion: \"1\"\nextends: A\nparts: [V]\n");

        var catalog = RecipeCatalog.Load(_folder.Path);

        // Each family of the cycle is reported once, at its 'extends' value that closes the cycle; the
        // variant's chain runs into the same place, which is not reported a second time. All three are refused.
        Assert.Equal(2, catalog.Problems.Length);
        Assert.Equal(["a.yaml", "b.yaml"], catalog.Problems.Select(p => p.Location.File).Order(StringComparer.Ordinal));
        Assert.All(catalog.Problems, p =>
        {
            Assert.Equal("recipe.unknown_family", p.Code);
            Assert.Equal((4, 10), (p.Location.Line, p.Location.Column));
            Assert.Contains(p.Location.File, new[] { "a.yaml", "b.yaml" });
            Assert.EndsWith("leads back to this recipe; a family chain must end.", p.Message, StringComparison.Ordinal);
        });
        Assert.Empty(catalog.Recipes);
    }

    [Fact]
    public void The_content_hash_of_a_variant_chains_the_family_hash_and_its_own()
    {
        var catalog = LoadAll();

        var family = Sha(File.ReadAllBytes(Path.Combine(_folder.Path, FamilyFile)));
        var own = Sha(File.ReadAllBytes(Path.Combine(_folder.Path, "kp-250-ht.yaml")));
        Assert.Equal(Sha(Encoding.UTF8.GetBytes(family + ":" + own)), catalog.ForPart("KP-250-HT")!.ContentHash);
        Assert.NotEqual(own, catalog.ForPart("KP-250-HT")!.ContentHash);
    }

    [Fact]
    public void The_content_hash_of_a_variant_changes_when_only_the_family_file_changes()
    {
        var before = LoadAll();
        var highTemp = before.ForPart("KP-250-HT")!.ContentHash;
        var zero = before.ForPart("KP-250-Z")!.ContentHash;

        // A comment only: the family's bytes change, nothing it says does.
        var after = LoadAll(family: Family + "# reviewed 2026-12-01\n");

        Assert.True(after.IsValid, after.Report());
        Assert.NotEqual(highTemp, after.ForPart("KP-250-HT")!.ContentHash);
        Assert.NotEqual(zero, after.ForPart("KP-250-Z")!.ContentHash);
        Assert.Equal(0.2020, after.ForPart("KP-250-HT")!.Limits.Single(l => l.Figure == "gain").Max);
    }

    [Fact]
    public void The_content_hash_of_a_variant_stays_the_same_when_nothing_changes()
    {
        var first = LoadAll().ForPart("KP-250-HT")!.ContentHash;
        var second = LoadAll().ForPart("KP-250-HT")!.ContentHash;

        Assert.Equal(first, second);
    }

    [Fact]
    public void A_sweep_without_part_metadata_finds_its_recipe_by_file_pattern_in_any_case()
    {
        var catalog = LoadAll();

        Assert.Equal("KP-250-Z zero-based variant", catalog.Match(Sweep("KP250Z-0001.csv", "# serial: Z-1\n")).Value.Name);
        Assert.Equal("KP-250-Z zero-based variant", catalog.Match(Sweep("kp250z-0002.CSV", "# serial: Z-2\n")).Value.Name);
        Assert.Equal("KP-250-Z zero-based variant", catalog.Match(Sweep("Z01-0003.csv", "# serial: Z-3\n")).Value.Name);
    }

    [Fact]
    public void A_file_pattern_must_match_the_whole_file_name()
    {
        var catalog = LoadAll();

        foreach (var name in new[] { "old-KP250Z-0001.csv", "KP250Z-0001.csv.bak", "Z1-0003.csv", "Z001-0003.csv" })
        {
            var problem = Assert.Single(catalog.Match(Sweep(name, "# serial: X\n")).Problems);
            Assert.Equal("input.no_recipe", problem.Code);
            Assert.Equal(SourceLocation.WholeFile(name), problem.Location);
            Assert.Contains("'# part: ...'", problem.Message, StringComparison.Ordinal);
        }
    }

    [Fact]
    public void Part_metadata_selects_the_recipe_even_when_a_file_pattern_would_match_another()
    {
        var catalog = LoadAll();

        Assert.Equal("KP-250-HT high-temperature variant", catalog.Match(Sweep("KP250Z-0001.csv", "# part: KP-250-HT\n")).Value.Name);

        // A part no recipe lists is not rescued by the file pattern.
        Assert.Equal("input.no_recipe", Assert.Single(catalog.Match(Sweep("KP250Z-0001.csv", "# part: KP-999\n")).Problems).Code);
    }

    [Fact]
    public void Explain_prints_every_value_of_the_effective_recipe_with_the_file_and_line_it_came_from()
    {
        var catalog = LoadAll();

        var text = catalog.Explain(catalog.ForPart("KP-250-HT")!);
        var lines = text.Split('\n', StringSplitOptions.RemoveEmptyEntries);

        // Every line with a value carries its origin; only mapping headers ('limits:') have none.
        foreach (var line in lines)
        {
            Assert.True(line.TrimEnd().EndsWith(':') || Origin().IsMatch(line), $"Explain line without an origin: '{line}'");
        }

        Assert.Contains("recipe: \"KP-250-HT high-temperature variant\"    # kp-250-ht.yaml:1", lines);
        Assert.Contains("confidence: 0.95    # kp-family.yaml:" + FamilyConfidenceLine, lines);
        Assert.Contains("    min: 0.1990    # kp-family.yaml:" + FamilyGainLine, lines);
        Assert.Contains("    max: 0.2020    # kp-250-ht.yaml:" + HighTempGainLine, lines);
        Assert.Contains("  legs: [up]    # kp-250-ht.yaml:8", lines);
        Assert.Contains("    p_min: 0.01    # kp-family.yaml:28", lines);
        Assert.DoesNotContain(lines, l => l.StartsWith("family:", StringComparison.Ordinal));

        // Every key of the language that either file gives is in the effective recipe once.
        foreach (var key in new[] { "recipe:", "version:", "extends:", "parts:", "columns:", "units:", "model:", "confidence:", "decision:", "limits:", "sweep:", "gates:" })
        {
            Assert.Single(lines, l => l.StartsWith(key, StringComparison.Ordinal));
        }
    }

    [Fact]
    public void The_explained_recipe_read_back_binds_to_the_same_recipe()
    {
        var catalog = LoadAll();
        var highTemp = catalog.ForPart("KP-250-HT")!;

        // The family's keys are written out, so the explanation stands on its own without 'extends'.
        var text = string.Join('\n', catalog.Explain(highTemp).Split('\n').Where(l => !l.StartsWith("extends:", StringComparison.Ordinal)));
        var rebound = RecipeBinder.Bind("explained.yaml", text, "h");

        Assert.True(rebound.IsSuccess, string.Join('\n', rebound.Problems));
        Assert.Equal(Describe(highTemp), Describe(rebound.Value));
    }

    private static string Describe(Recipe r) => string.Join(
        "; ",
        r.Name,
        r.Version,
        string.Join(',', r.Parts),
        r.Columns.ToString(),
        r.Model.Name,
        r.Confidence.ToFractionString(),
        string.Join(',', r.Limits.Select(l => $"{l.Figure}[{l.Min},{l.Max}]{l.Rule}{l.Guard}")),
        string.Join(',', r.Sweep.Legs),
        r.Sweep.MinPoints?.ToString(System.Globalization.CultureInfo.InvariantCulture) ?? "",
        r.RunsGate?.PValueFloor.ToString(System.Globalization.CultureInfo.InvariantCulture) ?? "");

    [Fact]
    public void A_key_given_twice_in_a_variant_is_a_duplicate_key_even_when_the_family_has_it()
    {
        var catalog = LoadAll(zero: Zero + "confidence: 0.90\n");

        var problem = Assert.Single(catalog.Problems);
        Assert.Equal("recipe.duplicate_key", problem.Code);
        Assert.Equal(SourceLocation.At("kp-250-z.yaml", 7, 1), problem.Location);
    }

    [Fact]
    public void A_problem_of_a_family_is_reported_once_however_many_variants_extend_it()
    {
        var catalog = LoadAll(family: Family.Replace("confidence: 0.95", "confidence: 1.5", StringComparison.Ordinal));

        var problem = Assert.Single(catalog.Problems);
        Assert.Equal(SourceLocation.At(FamilyFile, FamilyConfidenceLine, 13), problem.Location);
    }

    [Fact]
    public void Extends_in_a_folder_without_any_family_says_there_is_none()
    {
        Write("kp-250-ht.yaml", HighTemp);

        var problem = Assert.Single(RecipeCatalog.Load(_folder.Path).Problems);

        Assert.DoesNotContain("are: .", problem.Message, StringComparison.Ordinal);
    }

    [GeneratedRegex(@"    # [^\s:]+\.yaml:\d+$", RegexOptions.CultureInvariant)]
    private static partial Regex Origin();
}
