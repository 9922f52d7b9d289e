using System.Security.Cryptography;
using System.Text;
using StandFit.Core.Ingest;
using StandFit.Core.Problems;
using StandFit.Edges.RecipeFiles;

namespace StandFit.Tests.RecipeFiles;

public sealed class RecipeCatalogTests : IDisposable
{
    private readonly string _folder = Directory.CreateTempSubdirectory("standfit-recipes-").FullName;

    public void Dispose() => Directory.Delete(_folder, recursive: true);

    private static string Recipe(string name, string parts) => $$"""
        recipe: {{name}}
        version: "2026.11"
        parts: [{{parts}}]
        columns:
          stimulus: pressure_kPa
          output: output_mV
        model:
          type: straight-line
        confidence: 0.95
        limits:
          gain: { min: 0.1990, max: 0.2010 }
        decision:
          rule: guarded

        """;

    private string Write(string fileName, string text)
    {
        var path = Path.Combine(_folder, fileName);
        File.WriteAllText(path, text, new UTF8Encoding(encoderShouldEmitUTF8Identifier: false));
        return path;
    }

    private static SweepTable Sweep(string metadata) =>
        SweepTextParser.Parse("SN-1.csv", metadata + "pressure_kPa,output_mV\n0,0\n").Value;

    [Fact]
    public void A_folder_with_two_recipes_loads_both_and_matches_each_by_part_in_any_case()
    {
        Write("kp-250.yaml", Recipe("KP-250 transducer", "KP-250"));
        Write("kp-100.yml", Recipe("KP-100 transducer", "KP-100, KP-100B"));

        var catalog = RecipeCatalog.Load(_folder);

        Assert.True(catalog.IsValid, catalog.Report());
        Assert.Equal(2, catalog.Recipes.Length);
        Assert.Equal<string>(["kp-100.yml", "kp-250.yaml"], catalog.FilesChecked);
        Assert.Equal("KP-250 transducer", catalog.Match(Sweep("# part: kp-250\n")).Value.Name);
        Assert.Equal("KP-100 transducer", catalog.Match(Sweep("# Part: KP-100b\n")).Value.Name);
        Assert.Equal("kp-100.yml", catalog.Match(Sweep("# part: KP-100\n")).Value.SourceFile);
        Assert.Equal(string.Empty, catalog.Report());
    }

    [Fact]
    public void The_recipe_hash_is_the_sha256_of_the_file_bytes()
    {
        var path = Write("kp-250.yaml", Recipe("KP-250 transducer", "KP-250"));

        var catalog = RecipeCatalog.Load(_folder);

        Assert.Equal(Convert.ToHexStringLower(SHA256.HashData(File.ReadAllBytes(path))), Assert.Single(catalog.Recipes).ContentHash);
    }

    [Fact]
    public void Files_that_are_not_yaml_are_not_read()
    {
        Write("kp-250.yaml", Recipe("KP-250 transducer", "KP-250"));
        Write("notes.txt", "not a recipe: [");

        var catalog = RecipeCatalog.Load(_folder);

        Assert.True(catalog.IsValid, catalog.Report());
        Assert.Equal<string>(["kp-250.yaml"], catalog.FilesChecked);
    }

    [Fact]
    public void A_single_recipe_file_can_be_loaded_by_its_path()
    {
        var path = Write("kp-250.yaml", Recipe("KP-250 transducer", "KP-250"));

        var catalog = RecipeCatalog.Load(path);

        Assert.Equal("KP-250 transducer", Assert.Single(catalog.Recipes).Name);
    }

    [Fact]
    public void An_unknown_part_is_input_no_recipe_at_the_part_line()
    {
        Write("kp-250.yaml", Recipe("KP-250 transducer", "KP-250"));
        var catalog = RecipeCatalog.Load(_folder);

        var result = catalog.Match(Sweep("# serial: SN-1\n# part: KP-999\n"));

        var problem = Assert.Single(result.Problems);
        Assert.Equal("input.no_recipe", problem.Code);
        Assert.Equal(SourceLocation.At("SN-1.csv", 2), problem.Location);
        Assert.Contains("'KP-999'", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_sweep_without_part_metadata_is_input_no_recipe()
    {
        Write("kp-250.yaml", Recipe("KP-250 transducer", "KP-250"));
        var catalog = RecipeCatalog.Load(_folder);

        var problem = Assert.Single(catalog.Match(Sweep("# serial: SN-1\n")).Problems);

        Assert.Equal(ReasonCodes.InputNoRecipe.Code, problem.Code);
        Assert.Contains("'# part: ...'", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Two_recipes_listing_the_same_part_is_recipe_duplicate_part_and_the_first_file_stays_in_force()
    {
        Write("a-kp-250.yaml", Recipe("first", "KP-250"));
        Write("b-kp-250.yaml", Recipe("second", "kp-250, KP-251"));

        var catalog = RecipeCatalog.Load(_folder);

        Assert.False(catalog.IsValid);
        var problem = Assert.Single(catalog.Problems);
        Assert.Equal("recipe.duplicate_part", problem.Code);
        Assert.Equal(SourceLocation.WholeFile("b-kp-250.yaml"), problem.Location);
        Assert.Contains("a-kp-250.yaml", problem.Message, StringComparison.Ordinal);
        Assert.Equal("first", Assert.Single(catalog.Recipes).Name);
        Assert.Equal("first", catalog.Match(Sweep("# part: KP-250\n")).Value.Name);
        Assert.Equal("input.no_recipe", Assert.Single(catalog.Match(Sweep("# part: KP-251\n")).Problems).Code);
    }

    [Fact]
    public void A_broken_file_reports_all_its_problems_while_the_good_recipe_stays_in_force()
    {
        Write("good.yaml", Recipe("good", "KP-250"));
        var broken = Recipe("broken", "KP-100")
            .Replace("confidence: 0.95", "confidence: yes", StringComparison.Ordinal)
            .Replace("type: straight-line", "type: straight-lin", StringComparison.Ordinal);
        Write("broken.yaml", broken);

        var catalog = RecipeCatalog.Load(_folder);

        Assert.False(catalog.IsValid);
        Assert.Equal(2, catalog.Problems.Length);
        Assert.All(catalog.Problems, p => Assert.Equal("broken.yaml", p.Location.File));
        Assert.Equal(
            [("recipe.bad_value", 8), ("recipe.yaml_trap", 9)],
            catalog.Problems.Select(p => (p.Code, p.Location.Line)).OrderBy(x => x.Line));
        Assert.Equal("good", Assert.Single(catalog.Recipes).Name);
        Assert.Equal("good", catalog.Match(Sweep("# part: KP-250\n")).Value.Name);
        Assert.False(catalog.Match(Sweep("# part: KP-100\n")).IsSuccess);

        var report = catalog.Report().Split('\n', StringSplitOptions.RemoveEmptyEntries);
        Assert.Equal(2, report.Length);
        Assert.All(report, line => Assert.StartsWith("broken.yaml:", line, StringComparison.Ordinal));
    }

    [Fact]
    public void A_recipe_file_with_an_unclosed_flow_mapping_is_reported_and_the_good_recipe_stays_in_force()
    {
        Write("good.yaml", Recipe("good", "KP-250"));
        Write("unclosed.yaml", Recipe("unclosed", "KP-100").Replace("max: 0.2010 }", "max: 0.2010", StringComparison.Ordinal) + "gates:\n  runs_test:\n    p_min: 0.01\n");

        var catalog = RecipeCatalog.Load(_folder);

        Assert.Equal("recipe.syntax", Assert.Single(catalog.Problems).Code);
        Assert.Equal("good", Assert.Single(catalog.Recipes).Name);
    }

    [Fact]
    public void A_recipe_file_that_is_not_utf8_is_recipe_unreadable()
    {
        Write("good.yaml", Recipe("good", "KP-250"));
        File.WriteAllBytes(Path.Combine(_folder, "utf16.yaml"), Encoding.Unicode.GetBytes(Recipe("wide", "KP-100")));

        var catalog = RecipeCatalog.Load(_folder);

        var problem = Assert.Single(catalog.Problems);
        Assert.Equal("recipe.unreadable", problem.Code);
        Assert.Equal("utf16.yaml", problem.Location.File);
        Assert.Equal("good", Assert.Single(catalog.Recipes).Name);
    }

    [Fact]
    public void A_utf16_recipe_file_is_told_to_be_saved_as_utf8_with_or_without_its_byte_order_mark()
    {
        File.WriteAllBytes(Path.Combine(_folder, "a-bom.yaml"), [.. Encoding.Unicode.GetPreamble(), .. Encoding.Unicode.GetBytes(Recipe("wide", "KP-100"))]);
        File.WriteAllBytes(Path.Combine(_folder, "b-no-bom.yaml"), Encoding.Unicode.GetBytes(Recipe("wide", "KP-101")));

        var problems = RecipeCatalog.Load(_folder).Problems;

        Assert.Equal(2, problems.Length);
        Assert.Equal(new Problem("recipe.unreadable", "the recipe file is UTF-16 text; recipe files must be UTF-8. Save it as UTF-8 in your editor.", SourceLocation.WholeFile("a-bom.yaml")), problems[0]);

        // The first NUL byte is the high half of 'r': line 1, after the one character before it.
        Assert.Equal(new Problem("recipe.unreadable", "byte 1 is a NUL or control byte: the file is not UTF-8 text (UTF-16 without a byte-order mark, or not text at all). Save the recipe as UTF-8 text.", SourceLocation.At("b-no-bom.yaml", 1, 2)), problems[1]);
    }

    [Fact]
    public void A_recipe_file_with_a_utf8_byte_order_mark_loads()
    {
        File.WriteAllBytes(Path.Combine(_folder, "bom.yaml"), [0xEF, 0xBB, 0xBF, .. Encoding.UTF8.GetBytes(Recipe("bom", "KP-250"))]);

        var catalog = RecipeCatalog.Load(_folder);

        Assert.True(catalog.IsValid, catalog.Report());
        Assert.Equal("bom", Assert.Single(catalog.Recipes).Name);
    }
}
