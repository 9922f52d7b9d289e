using StandFit.Core.Diagnostics;
using StandFit.Core.Judging;
using StandFit.Core.Problems;
using StandFit.Tests.Support;

namespace StandFit.Tests.Judging;

/// <summary>
/// Every residual gate at its floor, through <see cref="RunsGate.Judge(RunsTestResult, ResidualDiagnostics)"/>
/// and <see cref="DiagnosticGate.Judge"/>: a p-value exactly at <c>p_min</c> passes (the gate fails
/// only below the floor), the next double below it fails, and a test that cannot be made passes
/// with the gate's own <c>*_not_applicable</c> code. The diagnostics are those of a real demo sweep
/// (KP250-26110-0001 of the diagnostics fixture) with the judged p-value set to the floor, since a
/// gate's ruling is a function of that p alone; 0.01 is not exact in binary, so "at" means the same
/// double as the floor.
/// </summary>
public sealed class ResidualGateBoundaryTests
{
    private const double Floor = 0.01;

    public static TheoryData<string> Gates => ["durbin_watson:acquisition", "durbin_watson:stimulus", "durbin_watson:per-leg", "lack_of_fit", "curvature", "normality:shapiro-wilk", "normality:anderson-darling", "heteroscedasticity", "outliers"];

    public static TheoryData<string> RunsOrders => [ResidualOrderNames.Stimulus, ResidualOrderNames.Acquisition, ResidualOrderNames.PerLeg];

    private static ResidualDiagnostics Real(ResidualOrder dwOrder = ResidualOrder.Acquisition)
    {
        var set = DiagnosticsFixture.Instance["KP250-26110-0001"];
        return ResidualDiagnostics.Compute(set.Fit, set.Legs.AsSpan(), set.Options with { DurbinWatsonOrder = dwOrder });
    }

    [Theory]
    [MemberData(nameof(Gates))]
    public void A_p_value_exactly_at_the_floor_passes_and_the_next_double_below_fails(string name)
    {
        var gate = Gate(name);
        var atFloor = gate.Judge(WithP(gate, Floor));
        var below = gate.Judge(WithP(gate, Math.BitDecrement(Floor)));
        var (ok, fail, _) = Codes(gate.Kind);

        Assert.Equal(ok, atFloor.Code);
        Assert.Equal(ReasonKind.Pass, atFloor.Kind);
        Assert.Contains("at or above the floor", atFloor.Sentence, StringComparison.Ordinal);
        Assert.Equal(fail, below.Code);
        Assert.Equal(ReasonKind.Fail, below.Kind);
    }

    [Theory]
    [MemberData(nameof(Gates))]
    public void A_test_that_cannot_be_made_passes_with_the_gates_not_applicable_code(string name)
    {
        var gate = Gate(name);
        var finding = gate.Judge(NotApplicable(gate));
        var (_, _, notApplicable) = Codes(gate.Kind);

        Assert.Equal(notApplicable, finding.Code);
        Assert.Equal(ReasonKind.Pass, finding.Kind);
        Assert.Null(gate.PValue(NotApplicable(gate)));
    }

    [Theory]
    [MemberData(nameof(RunsOrders))]
    public void A_runs_p_value_exactly_at_the_floor_passes_and_the_next_double_below_fails_in_every_order(string orderName)
    {
        var order = ResidualOrderNames.Parse(orderName)!.Value;
        var gate = new RunsGate(Floor, order);
        var d = Real();
        var stimulus = RunsTest.Compute(DiagnosticsFixture.Instance["KP250-26110-0001"].Fit.Residuals.AsSpan(), ResidualOrders.ByStimulus(DiagnosticsFixture.Instance["KP250-26110-0001"].Fit.Stimulus.AsSpan()));
        Assert.True(stimulus.IsApplicable && d.RunsByAcquisition.IsApplicable && d.RunsPerLeg.IsApplicable, "the demo sweep has residuals of both signs in every order");

        var (atS, atD) = RunsWithP(order, stimulus, d, Floor);
        var (belowS, belowD) = RunsWithP(order, stimulus, d, Math.BitDecrement(Floor));
        var at = gate.Judge(atS, atD);
        var below = gate.Judge(belowS, belowD);

        Assert.Equal(ReasonCodes.RunsOk.Code, at.Code);
        Assert.Equal(ReasonKind.Pass, at.Kind);
        Assert.Equal(ReasonCodes.RunsStructure.Code, below.Code);
        Assert.Equal(ReasonKind.Fail, below.Kind);
        Assert.Contains(order == ResidualOrder.PerLeg ? "within legs" : "in " + orderName + " order", at.Sentence, StringComparison.Ordinal);
    }

    [Theory]
    [MemberData(nameof(RunsOrders))]
    public void A_runs_test_that_cannot_be_made_passes_with_runs_not_applicable_in_every_order(string orderName)
    {
        var order = ResidualOrderNames.Parse(orderName)!.Value;
        var gate = new RunsGate(Floor, order);

        // One sign only: RunsTest.FromCounts refuses it (Method NotApplicable), computed, not assumed.
        var oneSign = RunsTest.FromCounts(1, 5, 0);
        Assert.False(oneSign.IsApplicable);
        var d = Real() with { RunsByAcquisition = oneSign };
        d = d with { RunsPerLeg = PerLegRunsResult.NotApplicable };
        var finding = gate.Judge(oneSign, d);

        Assert.Equal(ReasonCodes.RunsNotApplicable.Code, finding.Code);
        Assert.Equal(ReasonKind.Pass, finding.Kind);
    }

    [Fact]
    public void The_sidak_combination_of_two_legs_is_one_minus_the_square_of_one_minus_the_smallest_p()
    {
        // Šidák (1967): 1 - (1 - p)^k for k independent tests; 1 - 0.99^2 = 0.0199 exactly in decimals.
        Assert.Equal(0.0199, PerLegRunsResult.Sidak(0.01, 2), 15);
        Assert.Equal(0.01, PerLegRunsResult.Sidak(0.01, 1), 15);
        Assert.True(Math.Abs(PerLegRunsResult.Sidak(1e-12, 2) - (2e-12 - 1e-24)) < 1e-27); // 1 - (1 - p)^2 = 2p - p^2: the series branch, no cancellation
        Assert.Equal(1.0, PerLegRunsResult.Sidak(1.0, 2));
    }

    [Fact]
    public void A_gate_other_than_durbin_watson_takes_no_order()
    {
        Assert.Throws<ArgumentException>(() => new DiagnosticGate(DiagnosticGateKind.Curvature, Floor, order: ResidualOrder.PerLeg));
    }

    private static (RunsTestResult, ResidualDiagnostics) RunsWithP(ResidualOrder order, RunsTestResult stimulus, ResidualDiagnostics d, double p) => order switch
    {
        // The runs gates judge the mid-p; the per-leg gate that of the stratified test within legs.
        ResidualOrder.Stimulus => (stimulus with { MidP = p }, d),
        ResidualOrder.Acquisition => (stimulus, d with { RunsByAcquisition = d.RunsByAcquisition with { MidP = p } }),
        _ => (stimulus, d with { RunsPerLeg = d.RunsPerLeg with { WithinLegs = d.RunsPerLeg.WithinLegs with { MidP = p } } }),
    };

    private static DiagnosticGate Gate(string name)
    {
        var parts = name.Split(':');
        return parts[0] switch
        {
            "durbin_watson" => new DiagnosticGate(DiagnosticGateKind.DurbinWatson, Floor, order: ResidualOrderNames.Parse(parts[1])!.Value),
            "lack_of_fit" => new DiagnosticGate(DiagnosticGateKind.LackOfFit, Floor),
            "curvature" => new DiagnosticGate(DiagnosticGateKind.Curvature, Floor),
            "normality" => new DiagnosticGate(DiagnosticGateKind.Normality, Floor, parts[1] == "shapiro-wilk" ? NormalityTest.ShapiroWilk : NormalityTest.AndersonDarling),
            "heteroscedasticity" => new DiagnosticGate(DiagnosticGateKind.Heteroscedasticity, Floor),
            _ => new DiagnosticGate(DiagnosticGateKind.Outliers, Floor),
        };
    }

    private static ResidualDiagnostics WithP(DiagnosticGate gate, double p)
    {
        var d = Real(gate.Order);
        var result = gate.Kind switch
        {
            DiagnosticGateKind.DurbinWatson when gate.Order == ResidualOrder.Stimulus => d with { DurbinWatsonByStimulus = d.DurbinWatsonByStimulus! with { P = p } },
            DiagnosticGateKind.DurbinWatson when gate.Order == ResidualOrder.PerLeg => d with { DurbinWatsonPerLeg = d.DurbinWatsonPerLeg! with { P = p } },
            DiagnosticGateKind.DurbinWatson => d with { DurbinWatson = d.DurbinWatson with { P = p } },
            DiagnosticGateKind.LackOfFit => d with { LackOfFit = d.LackOfFit with { P = p } },
            DiagnosticGateKind.Curvature => d with { Curvature = d.Curvature with { P = p } },
            DiagnosticGateKind.Normality when gate.Normality == NormalityTest.ShapiroWilk => d with { ShapiroWilk = d.ShapiroWilk with { P = p } },
            DiagnosticGateKind.Normality => d with { AndersonDarling = d.AndersonDarling with { P = p } },
            DiagnosticGateKind.Heteroscedasticity => d with { BreuschPagan = d.BreuschPagan with { FP = p } }, // the gate judges the F form
            _ => d with { Outliers = d.Outliers with { P = p } },
        };
        Assert.Equal(p, gate.PValue(result)); // the gate reads the p-value set here, and it applies
        return result;
    }

    private static ResidualDiagnostics NotApplicable(DiagnosticGate gate)
    {
        var d = Real(gate.Order);
        return gate.Kind switch
        {
            DiagnosticGateKind.DurbinWatson when gate.Order == ResidualOrder.Stimulus => d with { DurbinWatsonByStimulus = DurbinWatsonResult.NotApplicable },
            DiagnosticGateKind.DurbinWatson when gate.Order == ResidualOrder.PerLeg => d with { DurbinWatsonPerLeg = DurbinWatsonResult.NotApplicable },
            DiagnosticGateKind.DurbinWatson => d with { DurbinWatson = DurbinWatsonResult.NotApplicable },
            DiagnosticGateKind.LackOfFit => d with { LackOfFit = LackOfFitResult.NotApplicable },
            DiagnosticGateKind.Curvature => d with { Curvature = CurvatureResult.NotApplicable },
            // Two values are too few for Shapiro-Wilk (n from 3) and Anderson-Darling (n from 8): computed, not assumed.
            DiagnosticGateKind.Normality => d with { ShapiroWilk = ShapiroWilk.Compute([0.1, -0.1]), AndersonDarling = AndersonDarling.Compute([0.1, -0.1]) },
            DiagnosticGateKind.Heteroscedasticity => d with { BreuschPagan = BreuschPaganResult.NotApplicable },
            _ => d with { Outliers = OutlierTestResult.NotApplicable },
        };
    }

    private static (string Ok, string Fail, string NotApplicable) Codes(DiagnosticGateKind kind) => kind switch
    {
        DiagnosticGateKind.DurbinWatson => (ReasonCodes.DurbinWatsonOk.Code, ReasonCodes.Autocorrelated.Code, ReasonCodes.DurbinWatsonNotApplicable.Code),
        DiagnosticGateKind.LackOfFit => (ReasonCodes.LackOfFitOk.Code, ReasonCodes.LackOfFit.Code, ReasonCodes.LackOfFitNotApplicable.Code),
        DiagnosticGateKind.Curvature => (ReasonCodes.CurvatureOk.Code, ReasonCodes.Curvature.Code, ReasonCodes.CurvatureNotApplicable.Code),
        DiagnosticGateKind.Normality => (ReasonCodes.NormalityOk.Code, ReasonCodes.NotNormal.Code, ReasonCodes.NormalityNotApplicable.Code),
        DiagnosticGateKind.Heteroscedasticity => (ReasonCodes.VarianceOk.Code, ReasonCodes.Heteroscedastic.Code, ReasonCodes.HeteroscedasticityNotApplicable.Code),
        _ => (ReasonCodes.OutliersOk.Code, ReasonCodes.Outlier.Code, ReasonCodes.OutliersNotApplicable.Code),
    };
}
