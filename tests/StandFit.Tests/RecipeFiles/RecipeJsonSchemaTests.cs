using System.Text.Json;
using StandFit.Edges.RecipeFiles;
using StandFit.Tests.Support;

namespace StandFit.Tests.RecipeFiles;

/// <summary>config/recipe.schema.json is generated from the code's description of the language and kept in sync.</summary>
public sealed class RecipeJsonSchemaTests
{
    private const string FullRecipe = """
        recipe: Everything
        version: "1"
        parts: [X-1]
        file_patterns: ["X1-*.csv"]
        columns:
          stimulus: s
          output: o
          leg: leg
          order: step
        units:
          stimulus: kPa
          output: mV
        model:
          type: polynomial
          degree: 2
        confidence: 0.95
        decision:
          rule: guarded
          coverage_factor: 2
        sweep:
          min_points: 11
          range: { min: 0, max: 100 }
          span_percent: 90
          legs: [up, down]
          monotonic_tolerance: 0.5
          saturation_run: 3
          duplicate_rows: true
        derived:
          mid_sensitivity: { sensitivity_at: 50 }
          zero_output: { value_at: 0 }
        limits:
          gain: { min: 0.19, max: 0.21 }
          offset: { min: -0.1, max: 0.1, rule: simple }
          c2: { max: 0.001, rule: guarded, coverage_factor: 3 }
          gain.half_width: { max: 0.001, rule: simple }
          mid_sensitivity: { min: 0.19 }
          residual_sd: { max: 0.01, rule: simple }
          runs_p: { min: 0.01, rule: simple }
        gates:
          runs_test:
            p_min: 0.01
        """;

    [Fact]
    public void The_committed_json_schema_is_the_one_the_code_generates()
    {
        // Regenerate with: dotnet run --project src/StandFit.Cli -- recipes schema > config/recipe.schema.json
        var committed = File.ReadAllText(RepoPaths.InRepo("config", "recipe.schema.json"));
        Assert.Equal(RecipeJsonSchema.Generate(), committed);
    }

    [Fact]
    public void Every_key_path_of_the_language_is_a_property_in_the_json_schema()
    {
        using var schema = JsonDocument.Parse(RecipeJsonSchema.Generate());
        foreach (var path in RecipeSchema.Paths())
        {
            var node = schema.RootElement;
            foreach (var part in path.Split('.'))
            {
                node = part is "<figure>" or "<name>" ? node.GetProperty("additionalProperties") : node.GetProperty("properties").GetProperty(part);
            }

            Assert.True(node.TryGetProperty("description", out _) || node.TryGetProperty("type", out _), path);
        }
    }

    [Fact]
    public void A_recipe_using_every_key_binds_without_problems()
    {
        var result = RecipeBinder.Bind("everything.yaml", FullRecipe, "hash");

        Assert.True(result.IsSuccess, string.Join("\n", result.Problems));
        var recipe = result.Value;
        Assert.Equal(7, recipe.Limits.Length);
        Assert.Equal(2, recipe.Derived.Length);
        Assert.Equal(11, recipe.Sweep.MinPoints);
        Assert.True(recipe.Sweep.RejectDuplicateRows);
        Assert.Equal("X1-*.csv", Assert.Single(recipe.FilePatterns));
        var c2 = recipe.Limits.Single(l => l.Figure == "c2");
        Assert.Equal(3, c2.Guard!.Value.Value);
        Assert.Equal(2, recipe.Limits.Single(l => l.Figure == "gain").Guard!.Value.Value);
        Assert.Equal(StandFit.Core.Judging.DecisionRule.Simple, recipe.Limits.Single(l => l.Figure == "offset").Rule);
    }

    [Fact]
    public void Code_that_reads_a_key_the_schema_does_not_declare_throws_as_a_bug()
    {
        var map = (YamlMap)YamlTree.Parse("x.yaml", "a: 1\n").Value!;
        var reader = new MapReader(map, "the file", new ProblemSink("x.yaml"), ["a"]);

        Assert.Throws<InvalidOperationException>(() => reader.Text("b", required: false));
    }
}
