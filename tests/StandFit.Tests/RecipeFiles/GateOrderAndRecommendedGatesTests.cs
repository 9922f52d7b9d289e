using StandFit.Core.Diagnostics;
using StandFit.Core.Judging;
using StandFit.Core.Recipes;
using StandFit.Edges.RecipeFiles;
using StandFit.Tests.Support;

namespace StandFit.Tests.RecipeFiles;

/// <summary>
/// The gates' <c>order</c> keys as the binder reads them, and the recommended gates: the shipped
/// demo recipes state exactly <see cref="RecommendedGates"/> (the block docs/diagnostics.md lists),
/// and a recipe that states its own gates keeps them (nothing is added to it).
/// </summary>
public sealed class GateOrderAndRecommendedGatesTests
{
    private const string Head = """
        recipe: KP-250 pressure transducer
        version: "2026.11"
        parts: [KP-250]
        columns:
          stimulus: pressure_kPa
          output: output_mV
          leg: leg
        model:
          type: straight-line
        confidence: 0.95
        gates:

        """;

    private static Recipe Bind(string gates)
    {
        var result = RecipeBinder.Bind("kp-250.yaml", Head + gates, "h");
        Assert.True(result.IsSuccess, string.Join("; ", result.Problems.Select(p => p.ToString())));
        return result.Value;
    }

    [Fact]
    public void Without_an_order_the_runs_gate_takes_stimulus_order_and_durbin_watson_acquisition_order()
    {
        var recipe = Bind("  runs_test: { p_min: 0.01 }\n  durbin_watson: { p_min: 0.01 }\n");
        Assert.Equal(ResidualOrder.Stimulus, recipe.RunsGate!.Order);
        Assert.Equal(ResidualOrder.Acquisition, Assert.Single(recipe.DiagnosticGates).Order);
        Assert.Equal(ResidualOrder.Acquisition, recipe.DiagnosticsOptions.DurbinWatsonOrder);
    }

    [Theory]
    [InlineData("stimulus", ResidualOrder.Stimulus)]
    [InlineData("acquisition", ResidualOrder.Acquisition)]
    [InlineData("per-leg", ResidualOrder.PerLeg)]
    public void Each_gate_takes_the_order_the_recipe_names(string text, ResidualOrder order)
    {
        var recipe = Bind($"  runs_test: {{ p_min: 0.01, order: {text} }}\n  durbin_watson: {{ p_min: 0.01, order: {text} }}\n");
        Assert.Equal(order, recipe.RunsGate!.Order);
        Assert.Equal(order, Assert.Single(recipe.DiagnosticGates).Order);
        Assert.Equal(order, recipe.DiagnosticsOptions.DurbinWatsonOrder); // the diagnostics compute that order's test
    }

    [Fact]
    public void An_unknown_order_is_a_bad_value_that_names_the_choices_and_the_closest_one()
    {
        var result = RecipeBinder.Bind("kp-250.yaml", Head + "  runs_test: { p_min: 0.01, order: per_leg }\n", "h");
        var problem = Assert.Single(result.Problems);
        Assert.Equal("recipe.bad_value", problem.Code);
        Assert.Contains("per-leg", problem.Message, StringComparison.Ordinal);
        Assert.Contains("gates.runs_test.order", problem.Message, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("kp-250.yaml")]
    [InlineData("lc-5k.yaml")]
    public void The_demo_recipes_state_exactly_the_recommended_gates(string file)
    {
        var path = RepoPaths.InRepo("config", "recipes", file);
        var result = RecipeBinder.Bind(file, File.ReadAllText(path), "h");
        Assert.True(result.IsSuccess);
        var recipe = result.Value;

        Assert.Equal(RecommendedGates.Runs, recipe.RunsGate);
        Assert.Equal(RecommendedGates.Diagnostic.Length, recipe.DiagnosticGates.Length);
        for (var i = 0; i < RecommendedGates.Diagnostic.Length; i++)
        {
            Assert.Equal(RecommendedGates.Diagnostic[i], recipe.DiagnosticGates[i]);
        }
    }

    [Fact]
    public void The_recommended_block_in_the_docs_is_the_one_the_code_and_the_demo_recipes_carry()
    {
        var docs = File.ReadAllText(RepoPaths.InRepo("docs", "diagnostics.md"));
        var kp = File.ReadAllText(RepoPaths.InRepo("config", "recipes", "kp-250.yaml"));
        var block = kp[kp.IndexOf("gates:", StringComparison.Ordinal)..].Split('\n').Skip(1).TakeWhile(l => l.StartsWith("  ", StringComparison.Ordinal)).ToList();
        Assert.Equal(4, block.Count);
        foreach (var line in block)
        {
            Assert.Contains(line.TrimEnd(), docs, StringComparison.Ordinal);
        }
    }

    [Fact]
    public void A_recipe_that_states_its_own_gates_keeps_exactly_them()
    {
        var recipe = Bind("  runs_test: { p_min: 0.01 }\n");
        Assert.Equal(0.01, recipe.RunsGate!.PValueFloor);
        Assert.Empty(recipe.DiagnosticGates);

        var none = RecipeBinder.Bind("kp-250.yaml", Head.Replace("gates:\n", "", StringComparison.Ordinal), "h").Value;
        Assert.Null(none.RunsGate);
        Assert.Empty(none.DiagnosticGates);
    }
}
