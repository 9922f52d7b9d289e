using StandFit.Core.Diagnostics;
using StandFit.Core.Judging;
using StandFit.Core.Problems;

namespace StandFit.Tests.Judging;

public sealed class VerdictTests
{
    private static Finding Of(ReasonKind kind, string code) => new(code, kind, code + " sentence");

    private static readonly Finding PassA = Of(ReasonKind.Pass, "gain.within_limits");
    private static readonly Finding PassB = Of(ReasonKind.Pass, "residuals.runs_ok");
    private static readonly Finding RetestA = Of(ReasonKind.Retest, "offset.straddles_limit");
    private static readonly Finding FailA = Of(ReasonKind.Fail, "gain.above_limit");
    private static readonly Finding FailB = Of(ReasonKind.Fail, "residuals.runs_structure");
    private static readonly Finding RejectA = Of(ReasonKind.Reject, "fit.too_few_points");

    [Fact]
    public void No_findings_is_a_pass_with_no_reasons()
    {
        var verdict = Verdict.From([]);

        Assert.Equal(Ruling.Pass, verdict.Ruling);
        Assert.Empty(verdict.Reasons);
    }

    [Fact]
    public void Only_passing_checks_is_a_pass()
    {
        Assert.Equal(Ruling.Pass, Verdict.From([PassA, PassB]).Ruling);
    }

    [Fact]
    public void A_retest_outranks_passes()
    {
        Assert.Equal(Ruling.Retest, Verdict.From([PassA, RetestA, PassB]).Ruling);
    }

    [Fact]
    public void A_fail_outranks_retests_and_passes()
    {
        Assert.Equal(Ruling.Fail, Verdict.From([PassA, RetestA, FailA]).Ruling);
    }

    [Fact]
    public void A_reject_outranks_everything()
    {
        Assert.Equal(Ruling.Rejected, Verdict.From([PassA, RetestA, FailA, RejectA, PassB]).Ruling);
    }

    [Fact]
    public void Findings_are_ordered_by_severity_and_keep_their_order_within_a_severity()
    {
        var verdict = Verdict.From([PassA, FailA, RetestA, PassB, FailB, RejectA]);

        Assert.Equal<Finding>([RejectA, FailA, FailB, RetestA, PassA, PassB], verdict.Reasons);
        Assert.Equal(
            ["fit.too_few_points", "gain.above_limit", "residuals.runs_structure", "offset.straddles_limit", "gain.within_limits", "residuals.runs_ok"],
            verdict.Codes);
    }

    [Fact]
    public void The_order_within_a_severity_follows_the_input_not_the_codes()
    {
        var verdict = Verdict.From([FailB, PassB, FailA, PassA]);

        Assert.Equal<Finding>([FailB, FailA, PassB, PassA], verdict.Reasons);
    }

    [Fact]
    public void A_rejected_verdict_from_a_problem_carries_its_code_and_located_message_without_repeating_the_code()
    {
        var problem = new Problem("input.bad_number", "'x' in column 'output_mV' is not a number", SourceLocation.At("SN-1.csv", 4, 2));

        var verdict = Verdict.Rejected(problem);

        Assert.Equal(Ruling.Rejected, verdict.Ruling);
        var reason = Assert.Single(verdict.Reasons);
        Assert.Equal("input.bad_number", reason.Code);
        Assert.Equal(ReasonKind.Reject, reason.Kind);
        Assert.Equal("SN-1.csv:4:2: 'x' in column 'output_mV' is not a number", reason.Sentence);
    }

    [Fact]
    public void A_guarded_acceptance_straddle_and_a_within_rule_retest()
    {
        var gain = GuardedAcceptance.Judge(new FigureLimit("gain", 0.199, 0.201), 0.1995, 0.2005, "mV/kPa");
        var offset = GuardedAcceptance.Judge(new FigureLimit("offset", -0.1, 0.1), 0.05, 0.15, "mV");

        var verdict = Verdict.From([gain, offset]);

        Assert.Equal(Ruling.Retest, verdict.Ruling);
        Assert.Equal(["offset.straddles_limit", "gain.within_limits"], verdict.Codes);
    }

    [Fact]
    public void A_runs_mid_p_below_the_floor_fails_the_unit_as_residuals_runs_structure_even_when_the_exact_p_is_above_it()
    {
        // The gate judges the mid-p (docs/diagnostics.md): an exact p of 0.012 with a mid-p of 0.009 fails at 0.01.
        var gate = new RunsGate(0.01);
        var runs = new RunsTestResult(2, 10, 10, 11, 4.74, -4.13, 0.012, RunsMethod.Exact) { MidP = 0.009 };

        var finding = gate.Judge(runs);

        Assert.Equal("residuals.runs_structure", finding.Code);
        Assert.Equal(ReasonKind.Fail, finding.Kind);
        Assert.Contains("exact p = 0.012, mid-p = 0.009 is below the floor 0.01", finding.Sentence, StringComparison.Ordinal);
        Assert.Contains("2 runs of 10+/10- signs", finding.Sentence, StringComparison.Ordinal);
    }

    [Fact]
    public void A_runs_mid_p_exactly_at_the_floor_is_ok()
    {
        var gate = new RunsGate(0.01);
        var runs = new RunsTestResult(6, 10, 10, 11, 4.74, -2.3, 0.02, RunsMethod.Exact) { MidP = 0.01 };

        var finding = gate.Judge(runs);

        Assert.Equal("residuals.runs_ok", finding.Code);
        Assert.Equal(ReasonKind.Pass, finding.Kind);
        Assert.Contains("is at or above the floor 0.01", finding.Sentence, StringComparison.Ordinal);
    }

    [Fact]
    public void A_runs_mid_p_one_ulp_below_the_floor_is_structure()
    {
        var gate = new RunsGate(0.01);
        var runs = new RunsTestResult(6, 10, 10, 11, 4.74, -2.3, 0.02, RunsMethod.Exact) { MidP = Math.BitDecrement(0.01) };

        Assert.Equal("residuals.runs_structure", gate.Judge(runs).Code);
    }

    [Fact]
    public void Two_long_runs_of_residual_signs_computed_by_the_runs_test_fail_the_gate()
    {
        // + + + + + + + + + + - - - - - - - - - - : 2 runs of 10 and 10, exact p far below 0.01.
        var runs = RunsTest.FromCounts(2, 10, 10);

        var finding = new RunsGate(0.01).Judge(runs);

        Assert.Equal(RunsMethod.Exact, runs.Method);
        Assert.True(runs.P < 0.01);
        Assert.Equal("residuals.runs_structure", finding.Code);
        Assert.Equal(Ruling.Fail, Verdict.From([finding]).Ruling);
    }

    [Fact]
    public void Counts_above_the_exact_limit_name_the_normal_approximation()
    {
        var runs = RunsTest.FromCounts(41, 40, 40);

        var finding = new RunsGate(0.01).Judge(runs);

        Assert.Equal(RunsMethod.Normal, runs.Method);
        Assert.Equal("residuals.runs_ok", finding.Code);
        Assert.Contains("(normal approximation)", finding.Sentence, StringComparison.Ordinal);
    }

    [Fact]
    public void A_runs_test_that_does_not_apply_is_residuals_runs_not_applicable_and_does_not_judge()
    {
        var runs = RunsTest.FromCounts(1, 7, 0);

        var finding = new RunsGate(0.01).Judge(runs);

        Assert.False(runs.IsApplicable);
        Assert.Equal("residuals.runs_not_applicable", finding.Code);
        Assert.Equal(ReasonKind.Pass, finding.Kind);
        Assert.Equal("runs test not applicable: 7 positive and 0 negative residuals", finding.Sentence);
        Assert.Equal(Ruling.Pass, Verdict.From([finding]).Ruling);
    }

    [Theory]
    [InlineData(0.0)]
    [InlineData(0.5)]
    [InlineData(-0.01)]
    [InlineData(double.NaN)]
    public void A_runs_gate_floor_outside_0_to_one_half_is_a_bug_at_the_caller(double floor)
    {
        Assert.Throws<ArgumentOutOfRangeException>(() => new RunsGate(floor));
    }

    [Fact]
    public void Every_limit_and_runs_code_has_the_kind_the_ruling_depends_on()
    {
        Assert.Equal(ReasonKind.Pass, ReasonCodes.LimitWithin.Kind);
        Assert.Equal(ReasonKind.Fail, ReasonCodes.LimitAbove.Kind);
        Assert.Equal(ReasonKind.Fail, ReasonCodes.LimitBelow.Kind);
        Assert.Equal(ReasonKind.Retest, ReasonCodes.LimitStraddles.Kind);
        Assert.Equal(ReasonKind.Fail, ReasonCodes.RunsStructure.Kind);
        Assert.Equal(ReasonKind.Pass, ReasonCodes.RunsOk.Kind);
        Assert.Equal(ReasonKind.Pass, ReasonCodes.RunsNotApplicable.Kind);
        Assert.All(ReasonCodes.All.Where(c => c.Code.StartsWith("input.", StringComparison.Ordinal)), c => Assert.Equal(ReasonKind.Reject, c.Kind));
    }
}
