using StandFit.Core.Fitting;
using StandFit.Core.Ingest;
using StandFit.Core.Problems;
using StandFit.Core.Recipes;
using StandFit.Edges.RecipeFiles;

namespace StandFit.Tests.RecipeFiles;

public sealed class RecipeBinderTests
{
    private const string File = "kp-250.yaml";

    private const string Hash = "0123456789abcdef";

    // Line numbers of the valid recipe, used by the tests that change one line.
    private const int RecipeLine = 1;
    private const int PartsLine = 3;
    private const int ModelTypeLine = 13;
    private const int ConfidenceLine = 14;
    private const int GainLine = 16;
    private const int OffsetLine = 17;
    private const int PMinLine = 20;

    private const string Valid = """
        recipe: KP-250 pressure transducer
        version: "2026.11"
        parts: [KP-250]
        columns:
          stimulus: pressure_kPa
          output: output_mV
          leg: leg
          order: step
        units:
          stimulus: kPa
          output: mV
        model:
          type: straight-line        # or straight-line-through-zero, or polynomial with degree: 2
        confidence: 0.95
        limits:
          gain: { min: 0.1990, max: 0.2010 }
          offset: { min: -0.10, max: 0.10 }
        gates:
          runs_test:
            p_min: 0.01
        decision:
          rule: guarded
        """;

    private static string[] Lines => Valid.Split('\n');

    /// <summary>The valid recipe with one line (1-based) replaced.</summary>
    private static string Replace(int line, string text)
    {
        var lines = Lines;
        Assert.True(line >= 1 && line <= lines.Length);
        lines[line - 1] = text;
        return string.Join('\n', lines);
    }

    /// <summary>The valid recipe with a line inserted after a line (1-based); the new line is number <paramref name="after"/> + 1.</summary>
    private static string InsertAfter(int after, string text)
    {
        var lines = Lines.ToList();
        lines.Insert(after, text);
        return string.Join('\n', lines);
    }

    private static Result<Recipe> Bind(string text) => RecipeBinder.Bind(File, text, Hash);

    private static Problem SingleProblem(string text)
    {
        var result = Bind(text);
        Assert.False(result.IsSuccess);
        return Assert.Single(result.Problems);
    }

    [Fact]
    public void The_line_constants_match_the_valid_recipe()
    {
        Assert.StartsWith("recipe:", Lines[RecipeLine - 1], StringComparison.Ordinal);
        Assert.StartsWith("parts:", Lines[PartsLine - 1], StringComparison.Ordinal);
        Assert.StartsWith("  type:", Lines[ModelTypeLine - 1], StringComparison.Ordinal);
        Assert.StartsWith("confidence:", Lines[ConfidenceLine - 1], StringComparison.Ordinal);
        Assert.StartsWith("  gain:", Lines[GainLine - 1], StringComparison.Ordinal);
        Assert.StartsWith("  offset:", Lines[OffsetLine - 1], StringComparison.Ordinal);
        Assert.StartsWith("    p_min:", Lines[PMinLine - 1], StringComparison.Ordinal);
        Assert.Equal(22, Lines.Length);
    }

    [Fact]
    public void The_valid_recipe_binds_with_every_field()
    {
        var recipe = Bind(Valid).Value;

        Assert.Equal("KP-250 pressure transducer", recipe.Name);
        Assert.Equal("2026.11", recipe.Version);
        Assert.Equal<string>(["KP-250"], recipe.Parts);
        Assert.Equal(new ColumnMap("pressure_kPa", "output_mV", "leg", "step"), recipe.Columns);
        Assert.Equal(new ColumnUnits("kPa", "mV"), recipe.Units);
        Assert.Same(Polynomial.StraightLine, recipe.Model);
        Assert.Equal(0.95, recipe.Confidence.Value);
        Assert.Equal(2, recipe.Limits.Length);
        Assert.Equal("gain", recipe.Limits[0].Figure);
        Assert.Equal(0.1990, recipe.Limits[0].Min);
        Assert.Equal(0.2010, recipe.Limits[0].Max);
        Assert.Equal("offset", recipe.Limits[1].Figure);
        Assert.Equal(-0.10, recipe.Limits[1].Min);
        Assert.Equal(0.10, recipe.Limits[1].Max);
        Assert.Equal(0.01, recipe.RunsGate!.PValueFloor);
        Assert.Equal(Hash, recipe.ContentHash);
        Assert.Equal(File, recipe.SourceFile);
        Assert.Equal("mV/kPa", recipe.UnitOf("gain"));
        Assert.Equal("mV", recipe.UnitOf("offset"));
    }

    [Fact]
    public void A_minimal_recipe_binds_with_no_units_no_limits_and_no_gate()
    {
        var recipe = Bind("""
            recipe: minimal
            version: 1
            parts:
              - KP-1
              - KP-2
            columns:
              stimulus: pressure
              output: signal
            model:
              type: straight-line-through-zero
            confidence: 0.99
            """).Value;

        Assert.Equal<string>(["KP-1", "KP-2"], recipe.Parts);
        Assert.Equal(new ColumnMap("pressure", "signal"), recipe.Columns);
        Assert.Equal(ColumnUnits.None, recipe.Units);
        Assert.Same(Polynomial.StraightLineThroughZero, recipe.Model);
        Assert.Empty(recipe.Limits);
        Assert.Null(recipe.RunsGate);
    }

    [Fact]
    public void A_polynomial_with_a_degree_binds_and_accepts_a_limit_on_c2()
    {
        var recipe = Bind("""
            recipe: KP-900 curved
            version: "1"
            parts: [KP-900]
            columns:
              stimulus: pressure
              output: signal
            model:
              type: polynomial
              degree: 2
            confidence: 0.95
            limits:
              c2: { max: 0.001 }
            decision:
              rule: guarded
            """).Value;

        Assert.Equal("polynomial-2", recipe.Model.Name);
        Assert.Equal(0.001, Assert.Single(recipe.Limits).Max);
        Assert.Null(recipe.Limits[0].Min);
    }

    [Fact]
    public void A_misspelt_key_is_reported_with_file_line_and_column_and_a_suggestion()
    {
        var result = Bind(Replace(ConfidenceLine, "confidance: 0.95"));

        Assert.False(result.IsSuccess);
        var problem = Assert.Single(result.Problems, p => p.Code == "recipe.unknown_key");
        Assert.Equal(SourceLocation.At(File, ConfidenceLine, 1), problem.Location);
        Assert.Contains("did you mean 'confidence'", problem.Message, StringComparison.Ordinal);
        Assert.StartsWith("kp-250.yaml:14:1: ", problem.ToString(), StringComparison.Ordinal);
    }

    [Fact]
    public void A_misspelt_required_key_also_leaves_the_required_key_missing_and_both_are_reported()
    {
        var result = Bind(Replace(ConfidenceLine, "confidance: 0.95"));

        Assert.Equal(
            [("recipe.unknown_key", ConfidenceLine, 1), ("recipe.missing_key", 1, 1)],
            result.Problems.Select(p => (p.Code, p.Location.Line, p.Location.Column)));
        Assert.Contains("the file needs the key 'confidence'", result.Problems[1].Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_misspelt_nested_key_is_reported_at_its_own_line_and_column()
    {
        var result = Bind(Replace(PMinLine, "    p_mim: 0.01"));

        var problem = Assert.Single(result.Problems, p => p.Code == "recipe.unknown_key");
        Assert.Equal(SourceLocation.At(File, PMinLine, 5), problem.Location);
        Assert.Contains("did you mean 'p_min'", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void An_unknown_key_with_no_close_match_lists_the_keys_allowed_there()
    {
        var problem = SingleProblem(InsertAfter(ModelTypeLine, "  flavour: vanilla"));

        Assert.Equal("recipe.unknown_key", problem.Code);
        Assert.Equal(SourceLocation.At(File, ModelTypeLine + 1, 3), problem.Location);
        Assert.Contains("type, degree", problem.Message, StringComparison.Ordinal);
        Assert.DoesNotContain("did you mean", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void All_errors_of_a_file_are_reported_at_once()
    {
        var text = Replace(ConfidenceLine, "confidence: 1.5");
        text = text.Replace("  type: straight-line ", "  type: straight-lin ", StringComparison.Ordinal);
        text = text.Replace("gain: { min: 0.1990, max: 0.2010 }", "gain: { min: 0.2010, max: 0.1990 }", StringComparison.Ordinal);

        var result = Bind(text);

        Assert.False(result.IsSuccess);
        Assert.Equal(3, result.Problems.Length);
        Assert.Equal(
            [
                ("recipe.bad_value", ModelTypeLine, 9),
                ("recipe.bad_value", ConfidenceLine, 13),
                ("recipe.contradiction", GainLine, 16),
            ],
            result.Problems.Select(p => (p.Code, p.Location.Line, p.Location.Column)).OrderBy(x => x.Line));
    }

    [Fact]
    public void A_key_given_twice_is_reported_as_recipe_duplicate_key_at_the_second_one()
    {
        var problem = SingleProblem(InsertAfter(RecipeLine, "recipe: KP-250 again"));

        Assert.Equal("recipe.duplicate_key", problem.Code);
        Assert.Equal(SourceLocation.At(File, 2, 1), problem.Location);
        Assert.Contains("first on line 1", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_key_given_twice_inside_a_flow_mapping_is_reported_at_its_column()
    {
        var problem = SingleProblem(Replace(GainLine, "  gain: { min: 0.1990, min: 0.1980, max: 0.2010 }"));

        Assert.Equal("recipe.duplicate_key", problem.Code);
        Assert.Equal(SourceLocation.At(File, GainLine, 24), problem.Location);
    }

    [Fact]
    public void A_leading_zero_number_is_refused_as_a_yaml_1_1_octal_trap()
    {
        var problem = SingleProblem(Replace(ConfidenceLine, "confidence: 095"));

        Assert.Equal("recipe.yaml_trap", problem.Code);
        Assert.Equal(SourceLocation.At(File, ConfidenceLine, 13), problem.Location);
        Assert.Contains("octal", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_sexagesimal_looking_number_is_refused_as_a_yaml_1_1_base_60_trap()
    {
        var problem = SingleProblem(Replace(PMinLine, "    p_min: 1:30"));

        Assert.Equal("recipe.yaml_trap", problem.Code);
        Assert.Equal(SourceLocation.At(File, PMinLine, 12), problem.Location);
        Assert.Contains("base-60", problem.Message, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("yes")]
    [InlineData("No")]
    [InlineData("ON")]
    [InlineData("off")]
    [InlineData("y")]
    [InlineData("true")]
    public void A_yaml_1_1_boolean_where_a_number_belongs_is_refused_as_a_boolean_trap(string value)
    {
        var problem = SingleProblem(Replace(ConfidenceLine, "confidence: " + value));

        Assert.Equal("recipe.yaml_trap", problem.Code);
        Assert.Equal(SourceLocation.At(File, ConfidenceLine, 13), problem.Location);
        Assert.Contains("true/false", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_plain_no_in_the_parts_list_is_refused_as_a_boolean_trap_for_text()
    {
        var problem = SingleProblem(Replace(PartsLine, "parts: [no]"));

        Assert.Equal("recipe.yaml_trap", problem.Code);
        Assert.Equal(SourceLocation.At(File, PartsLine, 9), problem.Location);
        Assert.Contains("not as text", problem.Message, StringComparison.Ordinal);
        Assert.Contains("\"no\"", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_quoted_no_in_the_parts_list_is_text()
    {
        var recipe = Bind(Replace(PartsLine, "parts: [\"no\", 'NO-2']")).Value;

        Assert.Equal<string>(["no", "NO-2"], recipe.Parts);
    }

    [Fact]
    public void An_empty_confidence_is_refused_as_empty_never_read_as_zero()
    {
        var problem = SingleProblem(Replace(ConfidenceLine, "confidence:"));

        Assert.Equal("recipe.bad_value", problem.Code);
        Assert.Equal(ConfidenceLine, problem.Location.Line);
        Assert.Contains("empty", problem.Message, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("~")]
    [InlineData("null")]
    public void A_null_confidence_is_refused_as_empty(string value)
    {
        var problem = SingleProblem(Replace(ConfidenceLine, "confidence: " + value));

        Assert.Equal("recipe.bad_value", problem.Code);
        Assert.Contains("empty", problem.Message, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("\"0.95\"")]
    [InlineData("'0.95'")]
    public void A_quoted_number_is_refused(string value)
    {
        var problem = SingleProblem(Replace(ConfidenceLine, "confidence: " + value));

        Assert.Equal("recipe.bad_value", problem.Code);
        Assert.Equal(SourceLocation.At(File, ConfidenceLine, 13), problem.Location);
        Assert.Contains("without quotes", problem.Message, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("1.5")]
    [InlineData("95")]
    [InlineData("0.4")]
    [InlineData("1")]
    public void A_confidence_outside_one_half_to_0_999999_is_out_of_range(string value)
    {
        var problem = SingleProblem(Replace(ConfidenceLine, "confidence: " + value));

        Assert.Equal("recipe.bad_value", problem.Code);
        Assert.Equal(SourceLocation.At(File, ConfidenceLine, 13), problem.Location);
        Assert.Contains("it must be a fraction from 0.5 to 0.999999", problem.Message, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData(".nan")]
    [InlineData(".inf")]
    [InlineData("0x1F")]
    [InlineData("ninety-five")]
    public void A_value_that_is_not_a_decimal_number_is_refused(string value)
    {
        var problem = SingleProblem(Replace(ConfidenceLine, "confidence: " + value));

        Assert.Equal("recipe.bad_value", problem.Code);
        Assert.Contains("must be a number", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_limit_with_min_above_max_is_a_contradiction_at_the_min()
    {
        var problem = SingleProblem(Replace(GainLine, "  gain: { min: 0.2010, max: 0.1990 }"));

        Assert.Equal("recipe.contradiction", problem.Code);
        Assert.Equal(SourceLocation.At(File, GainLine, 16), problem.Location);
        Assert.Contains("min 0.201 above max 0.199", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_limit_with_neither_min_nor_max_is_reported()
    {
        var problem = SingleProblem(Replace(GainLine, "  gain: {}"));

        Assert.Equal("recipe.missing_key", problem.Code);
        Assert.Equal(GainLine, problem.Location.Line);
    }

    [Fact]
    public void A_limit_on_a_figure_the_model_lacks_is_an_unknown_figure_at_its_key()
    {
        var problem = SingleProblem(InsertAfter(OffsetLine, "  c2: { max: 0.001 }"));

        Assert.Equal("recipe.unknown_figure", problem.Code);
        Assert.Equal(SourceLocation.At(File, OffsetLine + 1, 3), problem.Location);
        Assert.Contains("'c2'", problem.Message, StringComparison.Ordinal);
        Assert.Contains("offset, gain", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void An_offset_limit_on_a_line_through_zero_is_an_unknown_figure()
    {
        var problem = SingleProblem(Replace(ModelTypeLine, "  type: straight-line-through-zero"));

        Assert.Equal("recipe.unknown_figure", problem.Code);
        Assert.Equal(SourceLocation.At(File, OffsetLine, 3), problem.Location);
    }

    [Fact]
    public void An_unknown_model_type_suggests_the_closest_one()
    {
        var problem = SingleProblem(Replace(ModelTypeLine, "  type: straight-lin"));

        Assert.Equal("recipe.bad_value", problem.Code);
        Assert.Equal(SourceLocation.At(File, ModelTypeLine, 9), problem.Location);
        Assert.Contains("did you mean 'straight-line'?", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_degree_on_a_straight_line_is_a_contradiction_at_the_degree()
    {
        var problem = SingleProblem(InsertAfter(ModelTypeLine, "  degree: 2"));

        Assert.Equal("recipe.contradiction", problem.Code);
        Assert.Equal(SourceLocation.At(File, ModelTypeLine + 1, 11), problem.Location);
        Assert.Contains("'degree' applies only to model type 'polynomial'", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_polynomial_without_a_degree_is_a_missing_key()
    {
        var problem = SingleProblem(Replace(ModelTypeLine, "  type: polynomial"));

        Assert.Equal("recipe.missing_key", problem.Code);
        Assert.Equal(SourceLocation.At(File, ModelTypeLine, 3), problem.Location);
        Assert.Contains("'model' needs the key 'degree'", problem.Message, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("0")]
    [InlineData("11")]
    public void A_polynomial_degree_outside_1_to_10_is_out_of_range(string degree)
    {
        var problem = SingleProblem(Replace(ModelTypeLine, "  type: polynomial\n  degree: " + degree));

        Assert.Equal("recipe.bad_value", problem.Code);
        Assert.Equal(SourceLocation.At(File, ModelTypeLine + 1, 11), problem.Location);
    }

    [Fact]
    public void A_fractional_polynomial_degree_is_not_a_whole_number()
    {
        var problem = SingleProblem(Replace(ModelTypeLine, "  type: polynomial\n  degree: 2.5"));

        Assert.Equal("recipe.bad_value", problem.Code);
        Assert.Contains("whole number", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_missing_required_key_is_reported_at_its_mapping()
    {
        var problem = SingleProblem(Valid.Replace("  output: output_mV\n", "", StringComparison.Ordinal));

        Assert.Equal("recipe.missing_key", problem.Code);
        Assert.Equal(SourceLocation.At(File, 5, 3), problem.Location);
        Assert.Contains("'columns' needs the key 'output'", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_runs_gate_floor_outside_0_to_one_half_is_out_of_range()
    {
        var problem = SingleProblem(Replace(PMinLine, "    p_min: 0.5"));

        Assert.Equal("recipe.bad_value", problem.Code);
        Assert.Equal(SourceLocation.At(File, PMinLine, 12), problem.Location);
    }

    [Fact]
    public void An_anchor_is_refused()
    {
        var problem = SingleProblem(Replace(GainLine, "  gain: &band { min: 0.1990, max: 0.2010 }"));

        Assert.Equal("recipe.syntax", problem.Code);
        Assert.Equal(GainLine, problem.Location.Line);
        Assert.Contains("anchors and aliases", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void An_alias_is_refused()
    {
        var problem = SingleProblem(Replace(PartsLine, "parts: [KP-250, *other]"));

        Assert.Equal("recipe.syntax", problem.Code);
        Assert.Equal(SourceLocation.At(File, PartsLine, 17), problem.Location);
        Assert.Contains("anchors and aliases", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_yaml_tag_is_refused()
    {
        var problem = SingleProblem(Replace(ConfidenceLine, "confidence: !!float 0.95"));

        Assert.Equal("recipe.syntax", problem.Code);
        Assert.Equal(ConfidenceLine, problem.Location.Line);
        Assert.Contains("tags", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_second_yaml_document_is_refused()
    {
        var problem = SingleProblem(Valid + "\n---\nrecipe: other\n");

        Assert.Equal("recipe.syntax", problem.Code);
        Assert.Equal(23, problem.Location.Line);
        Assert.Contains("one YAML document", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_yaml_syntax_error_is_reported_as_recipe_syntax_with_its_line()
    {
        var problem = SingleProblem(Replace(5, "  stimulus: pressure_kPa: kPa"));

        Assert.Equal("recipe.syntax", problem.Code);
        Assert.Equal(SourceLocation.At(File, 5, 25), problem.Location);
        Assert.Contains("not valid YAML", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void An_unclosed_flow_mapping_is_reported_as_recipe_syntax_with_a_line()
    {
        var problem = SingleProblem(Replace(GainLine, "  gain: { min: 0.1990, max: 0.2010"));

        Assert.Equal("recipe.syntax", problem.Code);
        Assert.True(problem.Location.Line >= GainLine);
    }

    [Fact]
    public void An_unclosed_flow_mapping_at_the_end_of_the_file_is_reported_as_recipe_syntax()
    {
        var problem = SingleProblem(Valid + "\nextra: { a: 1\n");

        Assert.Equal("recipe.syntax", problem.Code);
        Assert.Equal(24, problem.Location.Line);
    }

    [Fact]
    public void An_empty_file_is_refused_naming_the_keys_to_write()
    {
        var problem = SingleProblem("");

        Assert.Equal("recipe.bad_value", problem.Code);
        Assert.Equal(SourceLocation.WholeFile(File), problem.Location);
        Assert.Contains("'confidence:'", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_file_that_is_a_list_is_refused_as_not_a_mapping()
    {
        var problem = SingleProblem("- recipe: x\n");

        Assert.Equal("recipe.bad_value", problem.Code);
        Assert.Equal(SourceLocation.At(File, 1, 1), problem.Location);
    }

    [Fact]
    public void An_empty_parts_list_is_refused()
    {
        var problem = SingleProblem(Replace(PartsLine, "parts: []"));

        Assert.Equal("recipe.bad_value", problem.Code);
        Assert.Contains("empty list", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Parts_given_as_a_single_value_are_refused_as_not_a_list()
    {
        var problem = SingleProblem(Replace(PartsLine, "parts: KP-250"));

        Assert.Equal("recipe.bad_value", problem.Code);
        Assert.Equal(SourceLocation.At(File, PartsLine, 8), problem.Location);
        Assert.Contains("must be a list", problem.Message, StringComparison.Ordinal);
    }
}

/// <summary>The recipe's <c>output</c> section: which units' sweep points go to the per-point table.</summary>
public sealed class RecipeOutputOptionsTests
{
    private const string Base = """
        recipe: KP-250 pressure transducer
        version: "2026.11"
        parts: [KP-250]
        columns:
          stimulus: pressure_kPa
          output: output_mV
        model:
          type: straight-line
        confidence: 0.95
        """;

    private static Result<Recipe> Bind(string extra) => RecipeBinder.Bind("kp-250.yaml", Base + "\n" + extra, "h");

    [Fact]
    public void Without_an_output_section_every_fitted_unit_keeps_its_points()
    {
        var recipe = Bind("").Value;
        Assert.Equal(PointsOutput.All, recipe.Points);
        Assert.All(Enum.GetValues<Core.Judging.Ruling>(), r => Assert.True(recipe.KeepsPoints(r)));
    }

    [Theory]
    [InlineData("all", PointsOutput.All)]
    [InlineData("flagged", PointsOutput.Flagged)]
    [InlineData("none", PointsOutput.None)]
    public void Each_choice_of_output_points_binds(string text, PointsOutput expected)
    {
        Assert.Equal(expected, Bind("output:\n  points: " + text).Value.Points);
    }

    [Fact]
    public void Flagged_keeps_the_points_of_fail_and_retest_units_only_and_none_keeps_none()
    {
        var flagged = Bind("output:\n  points: flagged").Value;
        Assert.False(flagged.KeepsPoints(Core.Judging.Ruling.Pass));
        Assert.True(flagged.KeepsPoints(Core.Judging.Ruling.Fail));
        Assert.True(flagged.KeepsPoints(Core.Judging.Ruling.Retest));
        var none = Bind("output:\n  points: none").Value;
        Assert.All(Enum.GetValues<Core.Judging.Ruling>(), r => Assert.False(none.KeepsPoints(r)));
    }

    [Fact]
    public void A_misspelt_choice_is_an_error_with_a_suggestion_and_its_place()
    {
        var result = Bind("output:\n  points: flaged");
        Assert.False(result.IsSuccess);
        Assert.Equal("kp-250.yaml:11:11: 'output.points' is 'flaged'; did you mean 'flagged'? The choices are: all, flagged, none. [recipe.bad_value]", Assert.Single(result.Problems).ToString());
    }

    [Fact]
    public void A_yaml_boolean_for_output_points_is_an_error_not_a_silent_none()
    {
        var result = Bind("output:\n  points: no");
        Assert.False(result.IsSuccess);
        Assert.Contains("'output.points'", Assert.Single(result.Problems).Message, StringComparison.Ordinal);
    }
}
