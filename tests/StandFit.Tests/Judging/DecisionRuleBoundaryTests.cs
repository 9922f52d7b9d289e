using StandFit.Core.Judging;
using StandFit.Core.Problems;
using StandFit.Core.Uncertainty;

namespace StandFit.Tests.Judging;

/// <summary>
/// The decision rules at their boundaries, through <see cref="LimitJudge.Judge"/>: simple acceptance
/// (the estimate against the tolerance limits) and guarded acceptance (the estimate against the
/// acceptance limits, the tolerance limits narrowed by U on each side; ILAC-G8:09/2019, JCGM 106:2012).
/// The numbers are chosen to be exact in binary floating point (0.5, 0.25, 1.0), so that "exactly on
/// a limit" and "touching a limit" are exact.
/// </summary>
public sealed class DecisionRuleBoundaryTests
{
    private const double Max = 1.0;
    private const double Min = -1.0;
    private const int Df = 19;

    private static readonly ConfidenceLevel Level95 = ConfidenceLevel.Of(0.95);

    private static FigureLimit Simple(double? min = Min, double? max = Max) => new("gain", min, max) { Rule = DecisionRule.Simple };

    private static FigureLimit GuardedAtRecipeLevel(double? min = Min, double? max = Max) => new("gain", min, max) { Rule = DecisionRule.Guarded };

    private static FigureLimit GuardedK(double k, double? min = Min, double? max = Max) => new("gain", min, max) { Rule = DecisionRule.Guarded, Guard = GuardBand.WithCoverageFactor(k) };

    private static FigureValue Gain(double value, double? u = 0.25, int? df = Df) => new("gain", value, u, df, "mV/kPa");

    private static LimitResult Judge(FigureLimit limit, FigureValue figure) => LimitJudge.Judge(limit, figure, Level95).Limit!;

    [Fact]
    public void An_estimate_exactly_on_the_upper_limit_is_within_under_simple_acceptance()
    {
        var finding = LimitJudge.Judge(Simple(), Gain(Max), Level95);

        Assert.Equal("gain.within_limits", finding.Code);
        Assert.Equal(ReasonKind.Pass, finding.Kind);
        Assert.Equal(LimitZone.Within, finding.Limit!.Zone);
        Assert.Equal(0.0, finding.Limit.ExpandedUncertainty);
        Assert.Null(finding.Limit.Conditional);
        Assert.Equal("gain 1 mV/kPa lies inside the limits [-1, 1] (simple acceptance)", finding.Sentence);
    }

    [Fact]
    public void An_estimate_exactly_on_the_upper_limit_straddles_under_guarded_acceptance_as_a_conditional_pass()
    {
        var finding = LimitJudge.Judge(GuardedK(2), Gain(Max), Level95);

        Assert.Equal("gain.straddles_limit", finding.Code);
        Assert.Equal(ReasonKind.Retest, finding.Kind);
        Assert.Equal(LimitZone.Straddles, finding.Limit!.Zone);
        Assert.Equal("pass", finding.Limit.Conditional);
        Assert.Equal("gain 1 +/- 0.5 mV/kPa = [0.5, 1.5] straddles a limit of [-1, 1] (guarded, U = 2 u): undecided, conditional pass", finding.Sentence);
    }

    [Fact]
    public void An_estimate_exactly_on_the_lower_limit_is_within_under_simple_and_a_conditional_pass_under_guarded()
    {
        Assert.Equal(LimitZone.Within, Judge(Simple(), Gain(Min)).Zone);

        var guarded = Judge(GuardedK(2), Gain(Min));
        Assert.Equal(LimitZone.Straddles, guarded.Zone);
        Assert.Equal("pass", guarded.Conditional);
    }

    [Fact]
    public void An_interval_touching_the_upper_limit_from_inside_is_within()
    {
        // 0.5 + 2 x 0.25 = 1.0 exactly: the estimate is on the upper acceptance limit max - U.
        var result = Judge(GuardedK(2), Gain(0.5));

        Assert.Equal(1.0, result.High);
        Assert.Equal(LimitZone.Within, result.Zone);
        Assert.Null(result.Conditional);
    }

    [Fact]
    public void An_interval_touching_the_lower_limit_from_inside_is_within()
    {
        var result = Judge(GuardedK(2), Gain(-0.5));

        Assert.Equal(-1.0, result.Low);
        Assert.Equal(LimitZone.Within, result.Zone);
    }

    [Fact]
    public void An_estimate_just_past_the_acceptance_limit_straddles()
    {
        // One ulp past 0.5 is lost in 0.5 + 0.5 (the sum rounds to 1.0), so step by 1e-12.
        var result = Judge(GuardedK(2), Gain(0.5 + 1e-12));

        Assert.True(result.High > Max);
        Assert.Equal(LimitZone.Straddles, result.Zone);
        Assert.Equal("pass", result.Conditional);
    }

    [Fact]
    public void An_interval_touching_the_upper_limit_from_outside_is_a_conditional_fail_not_a_fail()
    {
        // 1.5 - 2 x 0.25 = 1.0: the low end is on the limit, and the limit value itself conforms.
        var result = Judge(GuardedK(2), Gain(1.5));

        Assert.Equal(1.0, result.Low);
        Assert.Equal(LimitZone.Straddles, result.Zone);
        Assert.Equal("fail", result.Conditional);
    }

    [Fact]
    public void An_estimate_more_than_U_beyond_the_upper_limit_is_a_fail()
    {
        var finding = LimitJudge.Judge(GuardedK(2), Gain(Math.BitIncrement(1.5)), Level95);

        Assert.Equal("gain.above_limit", finding.Code);
        Assert.Equal(ReasonKind.Fail, finding.Kind);
        Assert.Equal(LimitZone.Above, finding.Limit!.Zone);
        Assert.Null(finding.Limit.Conditional);
    }

    [Fact]
    public void An_estimate_more_than_U_below_the_lower_limit_is_a_fail_below()
    {
        var finding = LimitJudge.Judge(GuardedK(2), Gain(-1.75), Level95);

        Assert.Equal("gain.below_limit", finding.Code);
        Assert.Equal(LimitZone.Below, finding.Limit!.Zone);
    }

    [Theory]
    [InlineData(0.75, "pass")]
    [InlineData(1.0, "pass")]
    [InlineData(1.25, "fail")]
    [InlineData(-0.75, "pass")]
    [InlineData(-1.25, "fail")]
    public void In_the_retest_zone_the_estimate_inside_the_tolerance_interval_is_a_conditional_pass_and_outside_a_conditional_fail(double value, string conditional)
    {
        var finding = LimitJudge.Judge(GuardedK(2), Gain(value), Level95);

        Assert.Equal(LimitZone.Straddles, finding.Limit!.Zone);
        Assert.Equal(conditional, finding.Limit.Conditional);
        Assert.EndsWith("undecided, conditional " + conditional, finding.Sentence, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData(0.75)]
    [InlineData(1.0)]
    [InlineData(1.25)]
    [InlineData(-1.25)]
    public void Near_a_limit_a_simple_and_a_guarded_limit_on_the_same_figure_value_rule_differently(double value)
    {
        var figure = Gain(value);
        var simple = Judge(Simple(), figure);
        var guarded = Judge(GuardedK(2), figure);

        Assert.Equal(LimitZone.Straddles, guarded.Zone);
        Assert.NotEqual(guarded.Zone, simple.Zone);
        Assert.Equal(Math.Abs(value) <= 1.0 ? LimitZone.Within : value > 0 ? LimitZone.Above : LimitZone.Below, simple.Zone);
    }

    [Fact]
    public void A_guarded_limit_with_zero_uncertainty_rules_exactly_as_a_simple_one()
    {
        foreach (var value in new[] { -1.5, Min, 0.0, Max, Math.BitIncrement(Max), 1.5 })
        {
            var figure = Gain(value, u: 0.0);
            Assert.Equal(Judge(Simple(), figure).Zone, Judge(GuardedK(2), figure).Zone);
            Assert.Equal(0.0, Judge(GuardedK(2), figure).ExpandedUncertainty);
        }
    }

    [Fact]
    public void Far_from_the_limits_simple_and_guarded_agree()
    {
        foreach (var value in new[] { -3.0, 0.0, 3.0 })
        {
            var figure = Gain(value);
            Assert.Equal(Judge(Simple(), figure).Zone, Judge(GuardedK(2), figure).Zone);
        }
    }

    [Fact]
    public void A_coverage_factor_of_two_gives_U_equal_to_twice_the_standard_uncertainty_exactly()
    {
        const double u = 0.0123456789;
        var finding = LimitJudge.Judge(GuardedK(2, min: 0, max: 10), Gain(5, u), Level95);

        Assert.Equal(2 * u, finding.Limit!.ExpandedUncertainty);
        Assert.Equal(5 - (2 * u), finding.Limit.Low);
        Assert.Equal(5 + (2 * u), finding.Limit.High);
        Assert.Contains("(guarded, U = 2 u)", finding.Sentence, StringComparison.Ordinal);
    }

    [Fact]
    public void A_coverage_factor_ignores_the_degrees_of_freedom()
    {
        var few = Judge(GuardedK(3, min: 0, max: 10), Gain(5, 0.1, df: 2));
        var none = Judge(GuardedK(3, min: 0, max: 10), Gain(5, 0.1, df: null));

        Assert.Equal(few.ExpandedUncertainty, none.ExpandedUncertainty);
        Assert.Equal(3 * 0.1, few.ExpandedUncertainty);
    }

    [Theory]
    [InlineData(0.95, 19, 2.093024054408)]
    [InlineData(0.95, 2, 4.302652729911)]
    [InlineData(0.99, 19, 2.860934606465)]
    public void A_guard_at_a_confidence_level_uses_the_student_t_critical_value_of_the_figures_degrees_of_freedom(double level, int df, double tableValue)
    {
        const double u = 0.001;
        var limit = new FigureLimit("gain", 0, 1) { Rule = DecisionRule.Guarded, Guard = GuardBand.AtConfidence(ConfidenceLevel.Of(level)) };

        var result = LimitJudge.Judge(limit, Gain(0.5, u, df), Level95).Limit!;

        var t = StudentT.TwoSidedCritical(ConfidenceLevel.Of(level), df);
        Assert.Equal(t * u, result.ExpandedUncertainty);
        Assert.Equal(tableValue, t, 1e-9);
    }

    [Fact]
    public void A_guarded_limit_without_a_guard_of_its_own_uses_the_recipes_confidence_level()
    {
        const double u = 0.001;
        var figure = Gain(0.5, u, 19);

        var at95 = LimitJudge.Judge(GuardedAtRecipeLevel(0, 1), figure, Level95);
        var at99 = LimitJudge.Judge(GuardedAtRecipeLevel(0, 1), figure, ConfidenceLevel.Of(0.99));

        Assert.Equal(StudentT.TwoSidedCritical(Level95, 19) * u, at95.Limit!.ExpandedUncertainty);
        Assert.Equal(StudentT.TwoSidedCritical(ConfidenceLevel.Of(0.99), 19) * u, at99.Limit!.ExpandedUncertainty);
        Assert.Contains("(guarded, U = t(95 %, 19 df) u)", at95.Sentence, StringComparison.Ordinal);
        Assert.Contains("(guarded, U = t(99 %, 19 df) u)", at99.Sentence, StringComparison.Ordinal);
    }

    [Fact]
    public void A_figure_without_degrees_of_freedom_is_guarded_with_the_normal_critical_value()
    {
        var result = Judge(GuardedAtRecipeLevel(0, 1), Gain(0.5, 0.001, df: null));

        Assert.Equal(StudentT.NormalTwoSidedCritical(Level95) * 0.001, result.ExpandedUncertainty);
        Assert.Equal(1.959963984540054, StudentT.NormalTwoSidedCritical(Level95), 1e-12);
    }

    [Fact]
    public void The_t_based_guard_band_is_wider_than_a_coverage_factor_of_two_on_few_degrees_of_freedom()
    {
        var t = Judge(GuardedAtRecipeLevel(0, 1), Gain(0.5, 0.01, df: 3)).ExpandedUncertainty;
        var k2 = Judge(GuardedK(2, 0, 1), Gain(0.5, 0.01, df: 3)).ExpandedUncertainty;

        Assert.True(t > 1.5 * k2, $"U at t(95 %, 3 df) = {t}, at k = 2 = {k2}");
    }

    [Theory]
    [InlineData(0.5, LimitZone.Within, null)]
    [InlineData(0.75, LimitZone.Straddles, "pass")]
    [InlineData(1.25, LimitZone.Straddles, "fail")]
    [InlineData(2.0, LimitZone.Above, null)]
    [InlineData(-1000.0, LimitZone.Within, null)]
    public void An_upper_limit_alone_judges_only_the_high_side(double value, LimitZone zone, string? conditional)
    {
        var result = Judge(GuardedK(2, min: null, max: Max), Gain(value));

        Assert.Equal(zone, result.Zone);
        Assert.Equal(conditional, result.Conditional);
        Assert.Null(result.Min);
    }

    [Theory]
    [InlineData(-0.5, LimitZone.Within, null)]
    [InlineData(-1.0, LimitZone.Straddles, "pass")]
    [InlineData(-1.5, LimitZone.Straddles, "fail")]
    [InlineData(-2.0, LimitZone.Below, null)]
    [InlineData(1000.0, LimitZone.Within, null)]
    public void A_lower_limit_alone_judges_only_the_low_side(double value, LimitZone zone, string? conditional)
    {
        var result = Judge(GuardedK(2, min: Min, max: null), Gain(value));

        Assert.Equal(zone, result.Zone);
        Assert.Equal(conditional, result.Conditional);
    }

    [Fact]
    public void A_one_sided_simple_limit_passes_on_the_limit_and_fails_just_past_it()
    {
        Assert.Equal(LimitZone.Within, Judge(Simple(min: null), Gain(Max)).Zone);
        Assert.Equal(LimitZone.Above, Judge(Simple(min: null), Gain(Math.BitIncrement(Max))).Zone);
        Assert.Equal(LimitZone.Within, Judge(Simple(max: null), Gain(Min)).Zone);
        Assert.Equal(LimitZone.Below, Judge(Simple(max: null), Gain(Math.BitDecrement(Min))).Zone);
    }

    [Fact]
    public void A_one_sided_limit_prints_its_open_side_as_an_infinity()
    {
        var finding = LimitJudge.Judge(GuardedK(2, min: null, max: Max), Gain(0.75), Level95);

        Assert.Equal("gain 0.75 +/- 0.5 mV/kPa = [0.25, 1.25] straddles a limit of [-inf, 1] (guarded, U = 2 u): undecided, conditional pass", finding.Sentence);
    }

    [Fact]
    public void When_2U_exceeds_the_tolerance_interval_no_estimate_can_pass_a_guarded_limit()
    {
        // Tolerance interval [-1, 1] is 2 wide; U = 2 x 0.6 = 1.2, so 2U = 2.4 and the acceptance interval is empty.
        foreach (var value in new[] { -0.5, 0.0, 0.5 })
        {
            var result = Judge(GuardedK(2), Gain(value, u: 0.6));
            Assert.Equal(LimitZone.Straddles, result.Zone);
            Assert.Equal("pass", result.Conditional);
        }

        Assert.Equal(LimitZone.Within, Judge(Simple(), Gain(0.0, u: 0.6)).Zone);
    }

    [Fact]
    public void The_limit_result_keeps_the_rule_the_bounds_and_the_value()
    {
        var result = Judge(GuardedK(2), Gain(0.75));

        Assert.Equal("gain", result.Figure);
        Assert.Equal(0.75, result.Value);
        Assert.Equal(Min, result.Min);
        Assert.Equal(Max, result.Max);
        Assert.Equal(DecisionRule.Guarded, result.Rule);
        Assert.Equal(DecisionRule.Simple, Judge(Simple(), Gain(0.75)).Rule);
    }

    [Fact]
    public void A_simple_limit_judges_a_figure_without_uncertainty_and_a_guarded_limit_refuses_it()
    {
        var runsP = new FigureValue("runs_p", 0.2, null, null, "");

        Assert.Equal(LimitZone.Within, LimitJudge.Judge(new FigureLimit("runs_p", 0.05, null) { Rule = DecisionRule.Simple }, runsP, Level95).Limit!.Zone);
        Assert.Throws<ArgumentException>(() => LimitJudge.Judge(new FigureLimit("runs_p", 0.05, null) { Rule = DecisionRule.Guarded }, runsP, Level95));
    }
}
