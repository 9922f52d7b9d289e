using System.Text;
using System.Text.Json.Nodes;
using StandFit.Edges.RecipeFiles;
using StandFit.Tests.Support;

namespace StandFit.Tests.RecipeFiles;

/// <summary>
/// Defects found in the wording of recipe problems and in the generated schema, each kept as the
/// test of the fixed behaviour (the broken-recipe corpus checks the same messages in full).
/// </summary>
public sealed class RecipeMessageDefectTests
{
    private const string Base = """
        recipe: KP-250 pressure transducer
        version: "2026.11-a"
        parts: [KP-250]
        columns:
          stimulus: pressure_kPa
          output: output_mV
        model:
          type: straight-line
        confidence: 0.95

        """;

    private static string Message(string text) => Assert.Single(RecipeBinder.Bind("r.yaml", text, "h").Problems).Message;

    [Fact]
    public void The_recipe_used_by_these_tests_is_valid_without_the_changes()
    {
        Assert.True(RecipeBinder.Bind("r.yaml", Base, "h").IsSuccess);
    }

    [Fact]
    public void The_missing_decision_message_shows_the_yaml_to_write_with_single_braces()
    {
        var message = Message(Base + "limits:\n  gain: { max: 0.201 }\n");

        Assert.Contains("'decision: { rule: guarded }'", message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_range_with_min_equal_to_max_is_not_described_as_min_above_max()
    {
        var message = Message(Base + "sweep:\n  range: { min: 100, max: 100 }\n");

        Assert.DoesNotContain("above max", message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_yaml_syntax_message_has_no_doubled_period()
    {
        var message = Message(Base.Replace("  stimulus: pressure_kPa", "  stimulus: pressure_kPa: kPa", StringComparison.Ordinal));

        Assert.DoesNotContain("..", message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_tag_is_named_as_it_was_written()
    {
        var message = Message(Base.Replace("confidence: 0.95", "confidence: !!float 0.95", StringComparison.Ordinal));

        Assert.Contains("'!!float'", message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_recipe_file_that_is_not_utf8_is_told_to_be_saved_as_utf8_not_to_fix_the_stand()
    {
        using var folder = new TempFolder();
        var bytes = Encoding.Latin1.GetBytes(Base.Replace("output_mV", "output_\u00b5V", StringComparison.Ordinal));
        File.WriteAllBytes(Path.Combine(folder.Path, "r.yaml"), bytes);

        var problem = Assert.Single(RecipeCatalog.Load(folder.Path).Problems);

        Assert.Equal("recipe.unreadable", problem.Code);
        Assert.DoesNotContain("stand", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void The_json_schema_refuses_a_runs_floor_of_one_half_as_the_binder_does()
    {
        var pMin = JsonNode.Parse(RecipeJsonSchema.Generate())!["properties"]!["gates"]!["properties"]!["runs_test"]!["properties"]!["p_min"]!;

        var exclusive = pMin["exclusiveMaximum"];
        Assert.True(exclusive is not null, "p_min has no exclusiveMaximum: " + pMin.ToJsonString());
        Assert.Equal(0.5, exclusive.GetValue<double>());
        Assert.Contains("below 0.5", Message(Base + "gates:\n  runs_test:\n    p_min: 0.5\n"), StringComparison.Ordinal);
    }
}
