using System.Globalization;
using StandFit.Core.Curve;
using StandFit.Core.Evaluation;
using StandFit.Core.Fitting;
using StandFit.Core.Fitting.Expressions;
using StandFit.Core.Fitting.Nonlinear;
using StandFit.Core.Ingest;
using StandFit.Core.Problems;
using StandFit.Core.Uncertainty.Resampling;
using StandFit.Tests.Support;
using Xunit.Abstractions;

namespace StandFit.Tests.Resampling;

/// <summary>
/// Resampled inverse predictions (inverse_at): every jackknife deletion's and bootstrap resample's
/// figure is the root of its refitted curve in the calibrated range, found by the full-data rule
/// (<see cref="InverseRoot"/>); a resample without exactly one root fails, counted by cause.
/// </summary>
public sealed class InverseResamplingTests
{
    private const int B = 1000;

    private readonly ITestOutputHelper _output;

    public InverseResamplingTests(ITestOutputHelper output) => _output = output;

    public static TheoryData<BootstrapScheme> Schemes => new() { BootstrapScheme.Pairs, BootstrapScheme.Residual, BootstrapScheme.WildRademacher, BootstrapScheme.WildMammen };

    [Theory]
    [MemberData(nameof(Schemes))]
    public void A_straight_lines_resampled_inverse_is_y0_minus_offset_over_gain_of_each_resample(BootstrapScheme scheme)
    {
        // Closed form (common practice): the line a + b x reaches y0 at x = (y0 - a) / b.
        const double y0 = 25.0;
        var fit = SimulatedUnits.Fit(SimulatedUnits.Line(21, 31, sigma: 0.05));
        var kernel = new LinearResampler(fit, [1, 0, 0, 1], [y0]);
        Assert.Equal(3, kernel.Figures);
        Assert.Equal(InversePrediction.RootOf(fit, y0).Stimulus, kernel.Estimates[2]);
        Assert.Equal((y0 - fit.Estimates[0]) / fit.Estimates[1], kernel.Estimates[2], Tolerance((y0 - fit.Estimates[0]) / fit.Estimates[1]));

        var output = new double[3 * B];
        var rng = new Xoshiro256StarStar(2026);
        var counts = kernel.Bootstrap(scheme, B, ref rng, output);
        Assert.Equal(B, counts.Succeeded);
        var worst = 0.0;
        for (var s = 0; s < B; s++)
        {
            var closed = (y0 - output[s]) / output[B + s];
            var root = output[(2 * B) + s];
            worst = Math.Max(worst, Math.Abs(root - closed) / Math.Abs(closed));
            Assert.True(Math.Abs(root - closed) <= Tolerance(closed), $"resample {s}: root {root:R}, (y0 - a*)/b* {closed:R}");
        }

        _output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{scheme}: largest relative difference {worst:E2}"));
    }

    [Fact]
    public void A_straight_lines_jackknifed_inverse_is_y0_minus_offset_over_gain_of_each_deletion()
    {
        // Closed form (common practice), for delete-one and for delete-leg.
        const double y0 = 12.5;
        var sweep = SimulatedUnits.Line(21, 32, sigma: 0.05);
        var fit = SimulatedUnits.Fit(sweep);
        var kernel = new LinearResampler(fit, [1, 0, 0, 1], [y0]);
        foreach (var groups in new[] { JackknifeGroups.DeleteOne, JackknifeGroups.DeleteLeg })
        {
            var (groupOf, g) = ResamplingAnalysis.Groups(sweep, groups);
            var output = new double[3 * g];
            var failures = new ResampleFailure[g];
            kernel.LeaveOut(groupOf, g, output, failures);
            for (var d = 0; d < g; d++)
            {
                Assert.Equal(ResampleFailure.None, failures[d]);
                var closed = (y0 - output[d]) / output[g + d];
                Assert.True(Math.Abs(output[(2 * g) + d] - closed) <= Tolerance(closed), $"{groups} deletion {d}: {output[(2 * g) + d]:R} vs {closed:R}");
            }
        }
    }

    [Theory]
    [MemberData(nameof(Schemes))]
    public void An_expression_models_resampled_inverse_is_the_closed_form_root_of_each_refitted_curve(BootstrapScheme scheme)
    {
        // NIST StRD Misra1a, y = b1 (1 - exp(-b2 x)): it reaches y0 at x = -ln(1 - y0/b1) / b2 (closed form, common practice).
        const double y0 = 40.0;
        var dataset = StrdNonlinearFile.Load("Misra1a.dat");
        var parsed = ExpressionParser.Parse("b1*(1-exp(-b2*x))", ["x"], ["b1", "b2"]);
        var model = new ExpressionModel(parsed.Expression, dataset.Parameters.Select(p => new ExpressionParameter(p.Name, p.Start2)));
        var outcome = NonlinearFitter.Fit(model, new FitData(dataset.Predictors[0], dataset.Y));
        var fit = outcome.Search!;
        var resampler = new NonlinearResampler(fit, model, [new DerivedFigure("x_at_40", DerivedKind.InverseAt, y0)]);
        Assert.Equal(InversePrediction.RootOf(fit, y0).Stimulus, resampler.Estimates[2]);

        var output = new double[3 * B];
        var rng = new Xoshiro256StarStar(77);
        var counts = resampler.Bootstrap(scheme, B, ref rng, output);
        Assert.Equal(B, counts.Succeeded);
        var leaveOut = new double[3 * fit.Count];
        var failures = new ResampleFailure[fit.Count];
        resampler.LeaveOut([.. Enumerable.Range(0, fit.Count)], fit.Count, leaveOut, failures);
        Assert.All(failures, f => Assert.Equal(ResampleFailure.None, f));
        foreach (var (values, count) in new[] { (output, B), (leaveOut, fit.Count) })
        {
            for (var s = 0; s < count; s++)
            {
                var closed = -Math.Log(1 - (y0 / values[s])) / values[count + s];
                Assert.True(Math.Abs(values[(2 * count) + s] - closed) <= 1e-13 * closed, $"resample {s}: {values[(2 * count) + s]:R} vs {closed:R}");
            }
        }
    }

    [Fact]
    public void A_resample_whose_line_does_not_reach_y0_in_the_range_fails_as_no_root_and_is_counted()
    {
        // y0 just inside the top of the range (the fitted line reaches it at x = 249.97 of 0..250):
        // a resample whose line ends below it has no root in the range (constructed case).
        var sweep = SimulatedUnits.Line(21, 41, sigma: 0.05);
        var fit = SimulatedUnits.Fit(sweep);
        var y0 = fit.Model.Evaluate(fit.Estimates.AsSpan(), 249.97);
        var kernel = new LinearResampler(fit, [1, 0, 0, 1], [y0]);
        var output = new double[3 * B];
        var indices = new int[B * 21];
        var rng = new Xoshiro256StarStar(5);
        var counts = kernel.Bootstrap(BootstrapScheme.Pairs, B, ref rng, output, indices);
        Assert.True(counts.NoRootInRange > 100, counts.ToString());
        Assert.Equal(0, counts.SeveralRoots);
        Assert.Equal(B, counts.Succeeded + counts.Failed);

        // Each resample refitted by QR from its own points and its whole grid scanned: the same count
        // of resamples without a root, and the same roots for the others.
        var (noRoot, several, roots) = Scanned(fit, indices, y0);
        Assert.Equal(noRoot, counts.NoRootInRange);
        Assert.Equal(several, counts.SeveralRoots);
        Assert.Equal(roots.Count, counts.Succeeded);
        for (var s = 0; s < roots.Count; s++)
        {
            Assert.True(Math.Abs(output[(2 * B) + s] - roots[s]) <= 1e-9 * Math.Abs(roots[s]), $"resample {s}: {output[(2 * B) + s]:R} vs {roots[s]:R}");
        }
    }

    [Fact]
    public void A_resample_whose_curve_reaches_y0_twice_in_the_range_fails_as_several_roots_and_is_counted()
    {
        // y = x^2 on [-0.1, 1] reaches y0 = 0.0121 at x = 0.11 only (its other root, -0.11, lies just
        // outside); a resample whose curve rises above y0 again at x = -0.1 has two roots (constructed case).
        var (sweep, fit) = Parabola(seed: 8);
        const double y0 = 0.0121;
        Assert.Equal(InverseStatus.Solved, InversePrediction.RootOf(fit, y0).Status);
        var kernel = new LinearResampler(fit, [1, 0, 0, 0, 1, 0, 0, 0, 1], [y0]);
        var output = new double[4 * B];
        var indices = new int[B * sweep.Count];
        var rng = new Xoshiro256StarStar(6);
        var counts = kernel.Bootstrap(BootstrapScheme.Pairs, B, ref rng, output, indices);
        Assert.True(counts.SeveralRoots > 20, counts.ToString());

        var (noRoot, several, roots) = Scanned(fit, indices, y0);
        Assert.Equal(noRoot, counts.NoRootInRange);
        Assert.Equal(several, counts.SeveralRoots);
        Assert.Equal(roots.Count, counts.Succeeded);
        for (var s = 0; s < roots.Count; s++)
        {
            Assert.True(Math.Abs(output[(3 * B) + s] - roots[s]) <= 1e-9 * Math.Abs(roots[s]), $"resample {s}: {output[(3 * B) + s]:R} vs {roots[s]:R}");
        }

        _output.WriteLine(counts.ToString());
    }

    [Fact]
    public void Too_many_resamples_without_a_root_rule_the_unit_retest_and_the_reason_counts_each_cause()
    {
        var (sweep, _) = Parabola(seed: 8);
        var recipe = SimulatedUnits.Recipe(
            new ResamplingPlan(11) { Bootstrap = BootstrapScheme.Pairs, Resamples = B, ResamplesStated = true, MaxFailedPercent = 1 },
            Polynomial.OfDegree(2),
            derived: [new DerivedFigure("x_at", DerivedKind.InverseAt, 0.0121)]);
        var unit = UnitEvaluator.Evaluate("parabola.csv", sweep, recipe, sourceSha256: new string('c', 64));
        var counts = unit.Resampling!.Bootstrap!.Value;
        Assert.True(counts.SeveralRoots > 10, counts.ToString());
        Assert.Equal(counts.NoRootInRange + counts.SeveralRoots + counts.DegenerateStimulus + counts.RankDeficient + counts.NonFinite, counts.Failed);
        Assert.Equal(Core.Judging.Ruling.Retest, unit.Ruling);
        var finding = Assert.Single(unit.Verdict.Reasons, r => r.Code == ReasonCodes.ResamplingTooManyFailures.Code);
        Assert.Contains(string.Create(CultureInfo.InvariantCulture, $"{counts.Failed} of 1000 bootstrap resamples could not be fitted"), finding.Sentence, StringComparison.Ordinal);
        Assert.Contains(string.Create(CultureInfo.InvariantCulture, $"{counts.NoRootInRange} whose curve does not reach an inverse_at figure's output in the calibrated range, {counts.SeveralRoots} whose curve reaches it more than once"), finding.Sentence, StringComparison.Ordinal);

        // A failed resample is left out of every figure: each interval rests on the same resamples.
        var summary = unit.Resampling.For("x_at")!.Bootstrap!;
        Assert.Equal(counts.Succeeded, unit.Resampling.Bootstrap.Value.Requested - counts.Failed);
        Assert.NotNull(summary.Percentile);
    }

    [Fact]
    public void A_deletion_without_a_root_makes_the_jackknife_unavailable_and_says_why()
    {
        // The top point carries the line past y0: without it the line ends below y0 (constructed case).
        var sweep = SimulatedUnits.Line(21, 41, sigma: 0.05);
        var fit = SimulatedUnits.Fit(sweep);
        var y0 = fit.Model.Evaluate(fit.Estimates.AsSpan(), 249.99);
        var kernel = new LinearResampler(fit, [1, 0, 0, 1], [y0]);
        var output = new double[3 * 21];
        var failures = new ResampleFailure[21];
        kernel.LeaveOut([.. Enumerable.Range(0, 21)], 21, output, failures);
        Assert.Contains(ResampleFailure.NoRootInRange, failures);

        var recipe = SimulatedUnits.Recipe(new ResamplingPlan(3), derived: [new DerivedFigure("x_top", DerivedKind.InverseAt, y0)]);
        var unit = UnitEvaluator.Evaluate("line.csv", sweep, recipe);
        var finding = Assert.Single(unit.Verdict.Reasons, r => r.Code == ReasonCodes.ResamplingJackknifeUnavailable.Code);
        Assert.Contains("does not reach an inverse_at figure's output in the calibrated range", finding.Sentence, StringComparison.Ordinal);
        Assert.Null(unit.Resampling!.For("x_top")!.DeleteOne);
    }

    [Fact]
    public void An_inverse_figure_the_fit_itself_does_not_solve_is_left_out_of_resampling()
    {
        var sweep = SimulatedUnits.Line(21, 41);
        var recipe = SimulatedUnits.Recipe(
            new ResamplingPlan(3) { Bootstrap = BootstrapScheme.Residual, Resamples = 200 },
            derived: [new DerivedFigure("beyond", DerivedKind.InverseAt, 1e6), new DerivedFigure("inside", DerivedKind.InverseAt, 20)]);
        var unit = UnitEvaluator.Evaluate("line.csv", sweep, recipe);
        Assert.Equal(["offset", "gain", "inside"], unit.Resampling!.Figures.Select(f => f.Figure));
        Assert.Equal(0, unit.Resampling.Bootstrap!.Value.Failed);
    }

    /// <summary>Within a few hundred ulp of a figure near 100: the root to full precision against a closed form with its own rounding.</summary>
    private static double Tolerance(double x) => 1e-13 * Math.Abs(x);

    /// <summary>n = 23 points evenly on [-0.1, 1], y = x^2 + 0.004 N(0, 1).</summary>
    private static (Sweep Sweep, FitResult Fit) Parabola(ulong seed)
    {
        const int n = 23;
        var rng = new Xoshiro256StarStar(seed);
        var x = new double[n];
        var y = new double[n];
        for (var i = 0; i < n; i++)
        {
            x[i] = -0.1 + (1.1 * i / (n - 1));
            y[i] = (x[i] * x[i]) + (0.004 * SimulatedUnits.Gaussian(ref rng));
        }

        var sweep = new Sweep(new UnitIdentity("PARA-1", "SIM", "EOL-T", null), [.. x], [.. y], [.. Enumerable.Repeat(Leg.Up, n)], [.. Enumerable.Range(2, n)], []);
        return (sweep, SimulatedUnits.Fit(sweep, Polynomial.OfDegree(2)));
    }

    /// <summary>
    /// Every pairs resample refitted by QR from its own points, its curve scanned at every point of
    /// the grid and its one root refined (InversePrediction.RootOf on the refit): the resamples
    /// without a root, with several, and the roots of the others in order.
    /// </summary>
    private static (int NoRoot, int Several, List<double> Roots) Scanned(FitResult fit, int[] indices, double y0)
    {
        var n = fit.Count;
        int noRoot = 0, several = 0;
        var roots = new List<double>();
        for (var r = 0; r < indices.Length / n; r++)
        {
            var rows = indices.AsSpan(r * n, n).ToArray();
            var refit = LeastSquaresFitter.Fit(fit.Model, [.. rows.Select(i => fit.Stimulus[i])], [.. rows.Select(i => fit.Output[i])]);
            if (!refit.IsSuccess)
            {
                continue;
            }

            // The calibrated range is the unit's, not the resample's.
            var model = refit.Value.Model;
            var b = refit.Value.Estimates.ToArray();
            var gaps = new double[InverseRoot.ScanSteps + 1];
            for (var k = 0; k < gaps.Length; k++)
            {
                gaps[k] = model.Evaluate(b, InverseRoot.GridPoint(fit.InputMin[0], fit.InputMax[0], k)) - y0;
            }

            switch (InverseRoot.CountRoots(gaps, out var step))
            {
                case 0:
                    noRoot++;
                    break;
                case 1:
                    var lo = InverseRoot.GridPoint(fit.InputMin[0], fit.InputMax[0], Math.Max(step - 1, 0));
                    var hi = InverseRoot.GridPoint(fit.InputMin[0], fit.InputMax[0], step);
                    roots.Add(Bisect(x => model.Evaluate(b, x) - y0, lo, hi));
                    break;
                default:
                    several++;
                    break;
            }
        }

        return (noRoot, several, roots);
    }

    /// <summary>Plain bisection to the last bit: a root finder that shares nothing with InverseRoot.Refine.</summary>
    private static double Bisect(Func<double, double> f, double a, double b)
    {
        var fa = f(a);
        if (fa == 0)
        {
            return a;
        }

        while (true)
        {
            var mid = a + ((b - a) / 2);
            if (mid == a || mid == b)
            {
                return mid;
            }

            var fm = f(mid);
            if (fm == 0)
            {
                return mid;
            }

            if (Math.Sign(fm) == Math.Sign(fa))
            {
                (a, fa) = (mid, fm);
            }
            else
            {
                b = mid;
            }
        }
    }
}
