using System.Collections.Immutable;
using StandFit.Core.Diagnostics;
using StandFit.Core.Fitting;
using StandFit.Core.Ingest;
using StandFit.Core.Judging;
using StandFit.Core.Problems;
using StandFit.Core.Uncertainty.Resampling;

namespace StandFit.Tests.Judging;

/// <summary>
/// A small version of the decision-quality study (bench/StandFit.Benchmarks <c>gates</c>; the full
/// tables in docs/diagnostics.md), checking its machinery through the real fit, diagnostics and
/// gates: KP-250-like 21-point up/down straight-line sweeps with independent Gaussian noise.
/// <para>
/// Monte-Carlo tolerance: over N independent units an observed rate has binomial standard error
/// sqrt(p (1 - p) / N); with N = 2,000 and p = 0.05 that is 0.49 percentage points. The exact tests
/// (Durbin-Watson by Imhof's integral, the F tests of curvature and lack of fit) must land within
/// four SE of 5 % (3.05 % to 6.95 %): a wrong null distribution, or residuals taken in the wrong
/// order, moves them further. The stream is seeded, so each run draws the same units.
/// </para>
/// </summary>
public sealed class GateDecisionQualityTests
{
    private const int Units = 2000;
    private const double Sigma = 0.005; // mV
    private const double Level = 0.05;

    [Fact]
    public void The_exact_gates_fail_about_five_per_cent_of_well_behaved_units_at_a_floor_of_0_05()
    {
        var gates = new[]
        {
            new DiagnosticGate(DiagnosticGateKind.DurbinWatson, Level, order: ResidualOrder.Acquisition),
            new DiagnosticGate(DiagnosticGateKind.DurbinWatson, Level, order: ResidualOrder.PerLeg),
            new DiagnosticGate(DiagnosticGateKind.Curvature, Level),
            new DiagnosticGate(DiagnosticGateKind.LackOfFit, Level),
        };
        var failed = new int[gates.Length];
        for (var u = 0; u < Units; u++)
        {
            var (fit, legs) = Unit(u, bow: 0);
            var d = ResidualDiagnostics.Compute(fit, legs.AsSpan(), new DiagnosticsOptions { SetPointTolerance = 1.0, DurbinWatsonOrder = ResidualOrder.PerLeg });
            for (var g = 0; g < gates.Length; g++)
            {
                failed[g] += gates[g].Judge(d).Kind == ReasonKind.Fail ? 1 : 0;
            }
        }

        var se = Math.Sqrt(Level * (1 - Level) / Units);
        for (var g = 0; g < gates.Length; g++)
        {
            var rate = (double)failed[g] / Units;
            Assert.True(Math.Abs(rate - Level) <= 4 * se, $"{gates[g].Kind} ({gates[g].Order}): {rate:P2} of well-behaved units failed at a floor of 0.05");
        }
    }

    [Fact]
    public void The_recommended_gates_catch_a_four_sd_mid_scale_bow_in_nearly_every_unit()
    {
        // The bench measures 99.6 % over 10,000 units; over 500 units the SE near 99.5 % is 0.3 points.
        const int units = 500;
        var caught = 0;
        for (var u = 0; u < units; u++)
        {
            var (fit, legs) = Unit(u, bow: 4 * Sigma);
            var d = ResidualDiagnostics.Compute(fit, legs.AsSpan(), DiagnosticsOptions.Default);
            var runs = RunsTest.Compute(fit.Residuals.AsSpan(), ResidualOrders.ByStimulus(fit.Stimulus.AsSpan()));
            var fails = RecommendedGates.Runs.Judge(runs, d).Kind == ReasonKind.Fail
                || RecommendedGates.Diagnostic.Any(g => g.Judge(d).Kind == ReasonKind.Fail);
            caught += fails ? 1 : 0;
        }

        Assert.True(caught >= 0.98 * units, $"{caught} of {units} bowed units caught");
    }

    /// <summary>Unit u: 0..250 kPa in 25 kPa steps up, back down to 0 (21 points), y = 0.01 + 0.2 x + bow 4x(250 - x)/250^2 + noise.</summary>
    private static (FitResult Fit, ImmutableArray<Leg> Legs) Unit(int u, double bow)
    {
        var rng = new Xoshiro256StarStar(StreamSeed.Derive(20261202, "QUALITY-" + u.ToString(System.Globalization.CultureInfo.InvariantCulture), "noise"));
        var x = new double[21];
        var y = new double[21];
        var legs = new Leg[21];
        for (var i = 0; i < 21; i++)
        {
            var k = i < 11 ? i : 20 - i;
            x[i] = (25.0 * k) + (0.002 * Gaussian(ref rng));
            y[i] = 0.01 + (0.2 * 25.0 * k) + (bow * 4 * x[i] * (250 - x[i]) / (250.0 * 250.0)) + (Sigma * Gaussian(ref rng));
            legs[i] = i < 11 ? Leg.Up : Leg.Down;
        }

        var fit = LeastSquaresFitter.Fit(Polynomial.OfDegree(1), [.. x], [.. y]);
        Assert.True(fit.IsSuccess);
        return (fit.Value, [.. legs]);
    }

    private static double Gaussian(ref Xoshiro256StarStar rng)
    {
        while (true)
        {
            var a = (2 * rng.NextDouble()) - 1;
            var b = (2 * rng.NextDouble()) - 1;
            var w = (a * a) + (b * b);
            if (w is > 0 and < 1)
            {
                return a * Math.Sqrt(-2 * Math.Log(w) / w);
            }
        }
    }
}
