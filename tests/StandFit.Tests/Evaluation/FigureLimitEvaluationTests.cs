using System.Globalization;
using StandFit.Core.Curve;
using StandFit.Core.Evaluation;
using StandFit.Core.Ingest;
using StandFit.Core.Judging;
using StandFit.Core.Recipes;
using StandFit.Edges.RecipeFiles;
using StandFit.Tests.Support;

namespace StandFit.Tests.Evaluation;

/// <summary>
/// Limits on every kind of figure a recipe can name, through the recipe text and UnitEvaluator on a
/// demo sweep: an interval half-width, derived figures (a sensitivity and a value at a chosen
/// stimulus) and the fit's diagnostics. The limits are placed from the unit's own figures, computed
/// by another path (the parameter intervals, CurveUse), so each lands where the test means it to.
/// </summary>
public sealed class FigureLimitEvaluationTests
{
    private const string Body = """
        recipe: KP-250 figures
        version: "1"
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
          type: straight-line
        confidence: 0.95
        derived:
          mid_sensitivity: { sensitivity_at: 125 }
          zero_output: { value_at: 0 }

        """;

    private static SweepTable Sweep() =>
        SweepTextParser.Parse("KP250-26110-0001.csv", File.ReadAllText(Path.Combine(DemoSet.Folder, "KP250-26110-0001.csv"))).Value;

    private static Recipe Bind(string text)
    {
        var result = RecipeBinder.Bind("kp-250.yaml", text, "h");
        Assert.True(result.IsSuccess, string.Join('\n', result.Problems));
        return result.Value;
    }

    private static string N(double value) => value.ToString("R", CultureInfo.InvariantCulture);

    [Fact]
    public void Derived_figures_and_half_widths_are_the_curves_own_numbers_with_their_units()
    {
        var unit = UnitEvaluator.Evaluate(Sweep(), Bind(Body));

        var gain = unit.Parameter("gain")!;
        var offset = unit.Parameter("offset")!;
        var sensitivity = CurveUse.SensitivityAt(unit.Fit!, 125, unit.Recipe!.Confidence);

        // A straight line's sensitivity anywhere is its gain; its value at 0 is its offset.
        Assert.Equal(sensitivity.Value, unit.Figures["mid_sensitivity"].Value, 12);
        Assert.Equal(sensitivity.StandardError, unit.Figures["mid_sensitivity"].StandardUncertainty!.Value, 15);
        Assert.Equal(gain.Estimate, unit.Figures["mid_sensitivity"].Value, 12);
        Assert.Equal(offset.Estimate, unit.Figures["zero_output"].Value, 9);
        Assert.Equal(offset.StandardError, unit.Figures["zero_output"].StandardUncertainty!.Value, 9);
        Assert.Equal((gain.High - gain.Low) / 2, unit.Figures["gain.half_width"].Value, 15);
        Assert.Null(unit.Figures["gain.half_width"].StandardUncertainty);
        Assert.Equal("mV/kPa", unit.Figures["mid_sensitivity"].Unit);
        Assert.Equal("mV", unit.Figures["zero_output"].Unit);
        Assert.Equal("mV/kPa", unit.Figures["gain.half_width"].Unit);
    }

    [Fact]
    public void Limits_on_a_half_width_derived_figures_and_diagnostics_each_rule_as_placed()
    {
        var free = UnitEvaluator.Evaluate(Sweep(), Bind(Body));
        var f = free.Figures;
        var halfWidth = f["gain.half_width"].Value;
        var recipe = Bind(Body + $$"""
            decision:
              rule: guarded
            limits:
              gain.half_width: { max: {{N(halfWidth / 2)}}, rule: simple }
              mid_sensitivity: { min: {{N(f["mid_sensitivity"].Value - (10 * halfWidth))}}, max: {{N(f["mid_sensitivity"].Value + (10 * halfWidth))}} }
              zero_output: { max: {{N(f["zero_output"].Value)}} }
              residual_sd: { max: {{N(f["residual_sd"].Value * 2)}}, rule: simple }
              r_squared: { min: {{N(f["r_squared"].Value)}}, rule: simple }
              condition_number: { max: {{N(f["condition_number"].Value / 2)}}, rule: simple }
              runs_p: { max: {{N(f["runs_p"].Value / 2)}}, rule: simple }

            """);

        var unit = UnitEvaluator.Evaluate(Sweep(), recipe);

        // Fails outrank the retest (the guarded value exactly on its limit straddles it), which outranks the passes.
        Assert.Equal(Ruling.Fail, unit.Ruling);
        string[] expected = ["gain.half_width.above_limit", "condition_number.above_limit", "runs_p.above_limit", "zero_output.straddles_limit", "mid_sensitivity.within_limits", "residual_sd.within_limits", "r_squared.within_limits"];
        Assert.True(expected.SequenceEqual(unit.Verdict.Codes), string.Join(", ", unit.Verdict.Codes));
        var zero = unit.Verdict.Reasons.Single(r => r.Code == "zero_output.straddles_limit").Limit!;
        Assert.Equal(DecisionRule.Guarded, zero.Rule);
        Assert.Equal("pass", zero.Conditional); // the estimate itself is on the limit, which is inclusive
        Assert.True(zero.ExpandedUncertainty > 0);
        var half = unit.Verdict.Reasons.Single(r => r.Code == "gain.half_width.above_limit").Limit!;
        Assert.Equal((DecisionRule.Simple, 0.0, halfWidth), (half.Rule, half.ExpandedUncertainty, half.Value));
    }
}
