using StandFit.Core.Fitting;
using StandFit.Core.Problems;
using StandFit.Core.Recipes;
using StandFit.Edges.RecipeFiles;

namespace StandFit.Tests.RecipeFiles;

/// <summary>
/// The recipe keys of the models beyond polynomials, of several stimulus columns and of weights,
/// against their description in docs/recipes.md ("Recipe keys", "Model types", "Basis terms",
/// "Weights"): what binds, and every refusal with its code and position.
/// </summary>
public sealed class RecipeModelBindingTests
{
    private const string File = "surface.yaml";

    private static string Recipe(string columns, string model, string extra = "") => $"""
        recipe: surface
        version: "1"
        parts: [PS-1]
        columns:
        {columns}
          output: output_mV
        model:
        {model}
        confidence: 0.95
        {extra}
        """;

    private static Result<Recipe> Bind(string text) => RecipeBinder.Bind(File, text, "hash");

    private static Problem SingleProblem(string text)
    {
        var result = Bind(text);
        Assert.False(result.IsSuccess);
        return Assert.Single(result.Problems);
    }

    [Fact]
    public void A_list_of_stimulus_columns_binds_a_basis_model_of_two_inputs_with_parameters_b0_to_b4()
    {
        var recipe = Bind(Recipe("  stimulus: [pressure_kPa, temp_C]", "  type: basis\n  terms: [1, x1, x2, x1^2, x1*x2]",
            "units:\n  stimulus: [kPa, degC]\n  output: mV")).Value;

        Assert.Equal<string>(["pressure_kPa", "temp_C"], recipe.Columns.Inputs);
        Assert.Equal(2, recipe.Model.InputCount);
        Assert.Equal<string>(["b0", "b1", "b2", "b3", "b4"], recipe.Model.ParameterNames);
        Assert.Equal("basis(1, x1, x2, x1^2, x1*x2)", recipe.Model.Name);

        // docs/recipes.md, "Basis terms": the output unit over the term's unit.
        Assert.Equal("mV", recipe.UnitOf("b0"));
        Assert.Equal("mV/kPa", recipe.UnitOf("b1"));
        Assert.Equal("mV/degC", recipe.UnitOf("b2"));
        Assert.Equal("mV/kPa^2", recipe.UnitOf("b3"));
        Assert.Equal("mV/(kPa*degC)", recipe.UnitOf("b4"));
    }

    [Fact]
    public void A_mapping_of_terms_names_the_parameters_itself()
    {
        var recipe = Bind(Recipe("  stimulus: r_ohm", "  type: basis\n  terms:\n    A: 1\n    B: ln(x)\n    C: ln(x)^3")).Value;

        Assert.Equal<string>(["A", "B", "C"], recipe.Model.ParameterNames);
        Assert.Equal("basis(1, ln(x), ln(x)^3)", recipe.Model.Name);
    }

    [Fact]
    public void A_misspelt_function_is_refused_at_the_term_with_a_suggestion()
    {
        var problem = SingleProblem(Recipe("  stimulus: r_ohm", "  type: basis\n  terms: [1, log(x)]"));

        Assert.Equal(RecipeCodes.BadValue, problem.Code);
        Assert.Equal(SourceLocation.At(File, 9, 14), problem.Location);
        Assert.Contains("did you mean 'ln'?", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void An_input_the_recipe_does_not_have_is_refused_with_the_inputs_listed()
    {
        var problem = SingleProblem(Recipe("  stimulus: [p, t]", "  type: basis\n  terms: [1, x1, x3]"));

        Assert.Equal(RecipeCodes.BadValue, problem.Code);
        Assert.Contains("'x3'", problem.Message, StringComparison.Ordinal);
        Assert.Contains("the inputs are x1, x2", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_single_input_is_x_and_x1_is_suggested_back_to_x()
    {
        var problem = SingleProblem(Recipe("  stimulus: p", "  type: basis\n  terms: [1, x1]"));

        Assert.Contains("did you mean 'x'?", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_term_that_does_not_follow_the_grammar_is_refused_with_the_character_and_what_was_expected()
    {
        var problem = SingleProblem(Recipe("  stimulus: p", "  type: basis\n  terms: [1, ln(x]"));

        Assert.Equal(RecipeCodes.BadValue, problem.Code);
        Assert.Contains("at character 5: expected ')'", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Two_spellings_of_the_same_term_are_refused_as_a_contradiction()
    {
        var problem = SingleProblem(Recipe("  stimulus: p", "  type: basis\n  terms: [1, x^2, x*x]"));

        Assert.Equal(RecipeCodes.Contradiction, problem.Code);
        Assert.Contains("same function as the earlier term 'x^2'", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_power_of_zero_is_refused()
    {
        var problem = SingleProblem(Recipe("  stimulus: p", "  type: basis\n  terms: [1, x^0]"));

        Assert.Equal(RecipeCodes.BadValue, problem.Code);
        Assert.Contains("power '0'", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_polynomial_with_two_stimulus_columns_is_refused()
    {
        var problem = SingleProblem(Recipe("  stimulus: [p, t]", "  type: polynomial\n  degree: 2"));

        Assert.Equal(RecipeCodes.Contradiction, problem.Code);
        Assert.Contains("takes one stimulus column", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Terms_on_a_model_that_is_not_basis_are_refused()
    {
        var problem = SingleProblem(Recipe("  stimulus: p", "  type: straight-line\n  terms: [1, x]"));

        Assert.Equal(RecipeCodes.Contradiction, problem.Code);
        Assert.Contains("'terms' applies only to model type 'basis'", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void The_same_column_twice_among_the_stimulus_columns_is_refused_at_the_second()
    {
        var problem = SingleProblem(Recipe("  stimulus: [p, P]", "  type: basis\n  terms: [1, x1, x2]"));

        Assert.Equal(RecipeCodes.Contradiction, problem.Code);
        Assert.Equal(5, problem.Location.Line);
        Assert.Contains("already stimulus 1", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void One_stimulus_unit_for_two_stimulus_columns_is_refused()
    {
        var problem = SingleProblem(Recipe("  stimulus: [p, t]", "  type: basis\n  terms: [1, x1, x2]", "units:\n  stimulus: kPa\n  output: mV"));

        Assert.Equal(RecipeCodes.Contradiction, problem.Code);
        Assert.Contains("1 unit(s) for 2 stimulus column(s)", problem.Message, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("kelvin", TemperatureScale.Kelvin)]
    [InlineData("celsius", TemperatureScale.Celsius)]
    public void Steinhart_hart_binds_with_the_temperature_unit_of_its_output(string unit, TemperatureScale scale)
    {
        var recipe = Bind(Recipe("  stimulus: r_ohm", $"  type: steinhart-hart\n  temperature: {unit}")).Value;

        var model = Assert.IsType<SteinhartHart>(recipe.Model);
        Assert.Equal(scale, model.Temperature);
        Assert.Equal<string>(["A", "B", "C"], model.ParameterNames);
    }

    [Fact]
    public void Steinhart_hart_without_its_temperature_unit_is_refused()
    {
        var problem = SingleProblem(Recipe("  stimulus: r_ohm", "  type: steinhart-hart"));

        Assert.Equal(RecipeCodes.MissingKey, problem.Code);
        Assert.Contains("'temperature'", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_misspelt_temperature_unit_is_refused_with_a_suggestion()
    {
        var problem = SingleProblem(Recipe("  stimulus: r_ohm", "  type: steinhart-hart\n  temperature: kelvn"));

        Assert.Contains("did you mean 'kelvin'?", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_limit_on_a_derived_callendar_van_dusen_figure_binds()
    {
        var recipe = Bind(Recipe("  stimulus: temp_C", "  type: callendar-van-dusen", "decision:\n  rule: guarded\nlimits:\n  A: { min: 3.9e-3, max: 3.92e-3 }\n  R0: { min: 99.94, max: 100.06 }")).Value;

        Assert.Same(CallendarVanDusen.AboveZero, recipe.Model);
        Assert.Equal<string>(["A", "R0"], recipe.Limits.Select(l => l.Figure));
    }

    [Fact]
    public void A_limit_on_a_figure_the_model_lacks_lists_the_parameters_and_the_derived_figures()
    {
        var problem = SingleProblem(Recipe("  stimulus: temp_C", "  type: callendar-van-dusen", "decision:\n  rule: guarded\nlimits:\n  C: { max: 1 }"));

        Assert.Equal(RecipeCodes.UnknownFigure, problem.Code);
        Assert.Contains("offset, gain, c2, R0, A, B, alpha", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_weight_rule_binds_and_gives_u_as_fixed_plus_relative_times_the_reading()
    {
        var recipe = Bind(Recipe("  stimulus: p", "  type: straight-line", "weights:\n  u_fixed: 0.002\n  u_relative: 0.0005")).Value;

        Assert.True(recipe.IsWeighted);
        Assert.Null(recipe.Columns.Uncertainty);

        // docs/recipes.md, "Weights": u = u_fixed + u_relative * |y|.
        Assert.Equal(0.002 + (0.0005 * 12.0), recipe.Weights!.UncertaintyOf(-12.0));
    }

    [Fact]
    public void A_weight_column_binds_as_the_uncertainty_column()
    {
        var recipe = Bind(Recipe("  stimulus: p", "  type: straight-line", "weights:\n  column: u_mV")).Value;

        Assert.True(recipe.IsWeighted);
        Assert.Null(recipe.Weights);
        Assert.Equal("u_mV", recipe.Columns.Uncertainty);
    }

    [Fact]
    public void A_weight_column_and_a_rule_together_are_refused()
    {
        var problem = SingleProblem(Recipe("  stimulus: p", "  type: straight-line", "weights:\n  column: u_mV\n  u_fixed: 0.002\n  u_relative: 0"));

        Assert.Equal(RecipeCodes.Contradiction, problem.Code);
    }

    [Fact]
    public void A_weight_rule_needs_both_of_its_parts()
    {
        var problem = SingleProblem(Recipe("  stimulus: p", "  type: straight-line", "weights:\n  u_fixed: 0.002"));

        Assert.Equal(RecipeCodes.MissingKey, problem.Code);
        Assert.Contains("'u_relative'", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_weight_rule_of_zero_is_refused()
    {
        var problem = SingleProblem(Recipe("  stimulus: p", "  type: straight-line", "weights:\n  u_fixed: 0\n  u_relative: 0"));

        Assert.Equal(RecipeCodes.BadValue, problem.Code);
        Assert.Contains("infinite weight", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_negative_part_of_the_weight_rule_is_refused()
    {
        var problem = SingleProblem(Recipe("  stimulus: p", "  type: straight-line", "weights:\n  u_fixed: -0.002\n  u_relative: 0.001"));

        Assert.Equal(RecipeCodes.BadValue, problem.Code);
        Assert.Contains("'weights.u_fixed' is -0.002", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Empty_weights_name_neither_source_and_are_refused()
    {
        var problem = SingleProblem(Recipe("  stimulus: p", "  type: straight-line", "weights: {}"));

        Assert.Equal(RecipeCodes.MissingKey, problem.Code);
    }

    [Fact]
    public void A_stimulus_column_that_no_term_uses_is_refused()
    {
        var problem = SingleProblem(Recipe("  stimulus: [p, t]", "  type: basis\n  terms: [1, x1, x1^2]"));

        Assert.Equal(RecipeCodes.Contradiction, problem.Code);
        Assert.Contains("no term uses x2 (stimulus column 2)", problem.Message, StringComparison.Ordinal);
    }
}
