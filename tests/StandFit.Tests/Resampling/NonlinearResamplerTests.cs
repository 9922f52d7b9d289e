using System.Collections.Immutable;
using System.Globalization;
using StandFit.Core.Evaluation;
using StandFit.Core.Fitting;
using StandFit.Core.Fitting.Expressions;
using StandFit.Core.Fitting.Nonlinear;
using StandFit.Core.Uncertainty.Resampling;
using StandFit.Tests.Support;
using Xunit.Abstractions;

namespace StandFit.Tests.Resampling;

/// <summary>
/// <see cref="NonlinearResampler"/> against two references that share none of its shortcuts: the
/// full Levenberg-Marquardt fit (<see cref="LevenbergMarquardt.Fit"/>, from the recipe's start,
/// with its refinement) of every resample written out as data, and, for a curve linear in its
/// parameters written as an expression, <see cref="LinearResampler"/> on the same draws (itself
/// checked against R's boot in BootReferenceTests and against QR refits in PairsKernelRefitTests).
/// </summary>
public sealed class NonlinearResamplerTests
{
    private const string Rise = "y0 + span*(1 - exp(-x/tau))";

    private readonly ITestOutputHelper _output;

    public NonlinearResamplerTests(ITestOutputHelper output) => _output = output;

    public static TheoryData<BootstrapScheme> Schemes => new() { BootstrapScheme.Pairs, BootstrapScheme.Residual, BootstrapScheme.WildRademacher, BootstrapScheme.WildMammen };

    [Theory]
    [MemberData(nameof(Schemes))]
    public void Every_resample_has_the_estimates_of_a_full_fit_of_its_own_data(BootstrapScheme scheme)
    {
        var (model, fit) = RiseUnit(21, seed: 7);
        var resampler = new NonlinearResampler(fit, model, []);
        const int B = 200;
        var replicates = new double[3 * B];
        var indices = new int[B * 21];
        var rng = new Xoshiro256StarStar(99);
        var counts = resampler.Bootstrap(scheme, B, ref rng, replicates, indices);
        Assert.Equal(B, counts.Succeeded);

        // The errors of the residual and wild schemes, drawn again from the same stream.
        var errors = FixedDesignErrors(scheme, fit, B, 99);
        var worst = 0.0;
        for (var r = 0; r < B; r++)
        {
            var x = new double[21];
            var y = new double[21];
            for (var i = 0; i < 21; i++)
            {
                var k = scheme == BootstrapScheme.Pairs ? indices[(r * 21) + i] : i;
                x[i] = fit.Stimulus[k];
                y[i] = scheme == BootstrapScheme.Pairs ? fit.Output[k] : fit.Fitted[i] + errors[r][i];
            }

            // Reference: the full search on the resample's rows, from the recipe's start (not from theta_hat).
            var full = LevenbergMarquardt.Fit(model.Expression, [[.. x]], [.. y], model.Start, model.Options);
            Assert.True(full.IsSuccess && full.Value.Converged);
            for (var j = 0; j < 3; j++)
            {
                var gap = Math.Abs(replicates[(j * B) + r] - full.Value.Estimates[j]) / fit.StandardErrors[j];
                worst = Math.Max(worst, gap);
                Assert.True(gap <= 1e-8, string.Create(CultureInfo.InvariantCulture, $"resample {r}, {fit.ParameterNames[j]}: {replicates[(j * B) + r]:R} against the full fit's {full.Value.Estimates[j]:R} ({gap:E2} SE)"));
            }
        }

        _output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{scheme}: largest difference {worst:E2} SE, {resampler.HandedOver} handed to the full search"));
    }

    [Fact]
    public void Each_deletion_has_the_estimates_of_a_full_fit_without_its_points()
    {
        var (model, fit) = RiseUnit(21, seed: 11);
        var resampler = new NonlinearResampler(fit, model, []);
        // Delete-one, then groups of three consecutive points.
        foreach (var (groupOf, groups) in new[] { (Enumerable.Range(0, 21).ToArray(), 21), (Enumerable.Range(0, 21).Select(i => i / 3).ToArray(), 7) })
        {
            var output = new double[3 * groups];
            var failures = new ResampleFailure[groups];
            resampler.LeaveOut(groupOf, groups, output, failures);
            for (var g = 0; g < groups; g++)
            {
                Assert.Equal(ResampleFailure.None, failures[g]);
                var kept = Enumerable.Range(0, 21).Where(i => groupOf[i] != g).ToArray();
                var full = LevenbergMarquardt.Fit(model.Expression, [[.. kept.Select(i => fit.Stimulus[i])]], [.. kept.Select(i => fit.Output[i])], model.Start, model.Options);
                for (var j = 0; j < 3; j++)
                {
                    var gap = Math.Abs(output[(j * groups) + g] - full.Value.Estimates[j]) / fit.StandardErrors[j];
                    Assert.True(gap <= 1e-8, $"group {g} of {groups}, {fit.ParameterNames[j]}: {gap:E2} SE");
                }
            }
        }
    }

    [Theory]
    [MemberData(nameof(Schemes))]
    public void A_straight_line_written_as_an_expression_resamples_to_the_linear_kernels_figures_on_the_same_draws(BootstrapScheme scheme)
    {
        var rng = new Xoshiro256StarStar(2026);
        var x = Enumerable.Range(0, 21).Select(i => 12.5 * i).ToArray();
        var y = x.Select(v => 0.01 + (0.2 * v) + (0.005 * SimulatedUnits.Gaussian(ref rng))).ToArray();
        var linear = LeastSquaresFitter.Fit(Polynomial.StraightLine, [.. x], [.. y]).Value;
        var parsed = ExpressionParser.Parse("offset + gain*x", ["x"], ["offset", "gain"]);
        var model = new ExpressionModel(parsed.Expression, [new("offset", 0), new("gain", 0.1)]);
        var nonlinear = NonlinearFitter.Fit(model, new FitData([.. x], [.. y])).Search!;

        // The sensitivity and the value at 100 kPa: for a straight line, the gain and offset + 100 gain.
        var derived = ImmutableArray.Create(new DerivedFigure("slope", DerivedKind.SensitivityAt, 100), new DerivedFigure("mid", DerivedKind.ValueAt, 100));
        var kernel = new LinearResampler(linear, [1, 0, 0, 1, 0, 1, 1, 100]);
        var refit = new NonlinearResampler(nonlinear, model, derived);
        const int B = 500;
        var a = new double[4 * B];
        var b = new double[4 * B];
        var ra = new Xoshiro256StarStar(77);
        var rb = new Xoshiro256StarStar(77);
        Assert.Equal(B, kernel.Bootstrap(scheme, B, ref ra, a).Succeeded);
        Assert.Equal(B, refit.Bootstrap(scheme, B, ref rb, b).Succeeded);
        Assert.Equal(ra.NextUInt64(), rb.NextUInt64());
        var se = new[] { linear.StandardError(0), linear.StandardError(1), linear.StandardError(1), linear.StandardError(0) };
        for (var k = 0; k < 4 * B; k++)
        {
            Assert.True(Math.Abs(a[k] - b[k]) <= 1e-8 * se[k / B], $"figure {k / B}, resample {k % B}: linear {a[k]:R}, refitted {b[k]:R}");
        }

        var leaveA = new double[4 * 21];
        var leaveB = new double[4 * 21];
        kernel.LeaveOut([.. Enumerable.Range(0, 21)], 21, leaveA, new ResampleFailure[21]);
        refit.LeaveOut([.. Enumerable.Range(0, 21)], 21, leaveB, new ResampleFailure[21]);
        for (var k = 0; k < 4 * 21; k++)
        {
            Assert.True(Math.Abs(leaveA[k] - leaveB[k]) <= 1e-8 * se[k / 21], $"deletion {k % 21}, figure {k / 21}");
        }
    }

    [Fact]
    public void The_derived_figures_of_a_resample_are_its_refitted_curves_slope_and_value()
    {
        var (model, fit) = RiseUnit(21, seed: 3);
        var derived = ImmutableArray.Create(new DerivedFigure("s50", DerivedKind.SensitivityAt, 50), new DerivedFigure("v30", DerivedKind.ValueAt, 30), new DerivedFigure("b80", DerivedKind.BandAt, 80));
        var resampler = new NonlinearResampler(fit, model, derived);
        const int B = 50;
        var output = new double[6 * B];
        var rng = new Xoshiro256StarStar(5);
        resampler.Bootstrap(BootstrapScheme.Pairs, B, ref rng, output);
        for (var r = 0; r < B; r++)
        {
            double y0 = output[r], span = output[B + r], tau = output[(2 * B) + r];
            // By hand: d/dx [y0 + span (1 - exp(-x/tau))] = span exp(-x/tau) / tau.
            Assert.Equal(span * Math.Exp(-50 / tau) / tau, output[(3 * B) + r], 1e-12);
            Assert.Equal(y0 + (span * (1 - Math.Exp(-30 / tau))), output[(4 * B) + r], 1e-12);
            Assert.Equal(y0 + (span * (1 - Math.Exp(-80 / tau))), output[(5 * B) + r], 1e-12);
        }
    }

    [Fact]
    public void The_same_stream_gives_the_same_replicates_bit_for_bit_and_a_fresh_resampler_agrees()
    {
        var (model, fit) = RiseUnit(21, seed: 13);
        var first = new NonlinearResampler(fit, model, []);
        var again = new double[3 * 300];
        var once = new double[3 * 300];
        foreach (var scheme in new[] { BootstrapScheme.Pairs, BootstrapScheme.WildMammen })
        {
            var r1 = new Xoshiro256StarStar(1234);
            var r2 = new Xoshiro256StarStar(1234);
            first.Bootstrap(scheme, 300, ref r1, once);
            new NonlinearResampler(fit, model, []).Bootstrap(scheme, 300, ref r2, again);
            Assert.Equal(once, again);
            first.Bootstrap(scheme, 300, ref r2, again); // a different stretch of the stream: different draws
            Assert.NotEqual(once, again);
        }
    }

    [Fact]
    public void Pairs_resamples_that_miss_the_rising_part_of_the_curve_fail_and_are_counted_by_cause()
    {
        var (model, fit) = StepUnit();
        var resampler = new NonlinearResampler(fit, model, []);
        const int B = 1000;
        var n = fit.Count;
        var rng = new Xoshiro256StarStar(31);
        var indices = new int[B * n];
        var counts = resampler.Bootstrap(BootstrapScheme.Pairs, B, ref rng, new double[3 * B], indices);
        _output.WriteLine(counts.ToString());

        // A resample separates y0, span and tau only when it holds a point at 0 (y0), the point at
        // 2 (the only one on the rise: tau) and one on the plateau (span): on the plateau
        // exp(-x/tau) is exactly 0 for every tau within the bounds, and at 0 the slope in tau is 0,
        // so without the point at 2 the Jacobian's tau column is 0; without a point at 0 its rows
        // are (1, a, d) and (1, 1, 0), of rank 2; without the plateau there are two set points.
        var separable = 0;
        for (var r = 0; r < B; r++)
        {
            var drawn = indices.AsSpan(r * n, n).ToArray();
            separable += drawn.Any(i => i <= 1) && drawn.Contains(2) && drawn.Any(i => i >= 3) ? 1 : 0;
        }

        Assert.Equal(separable, counts.Succeeded);
        Assert.Equal(B - separable, counts.Failed);
        Assert.Equal(B - separable, counts.RankDeficient + counts.NotConverged + counts.AtBound + counts.DegenerateStimulus);
        Assert.True(counts.RankDeficient > 0, counts.ToString());
    }

    [Fact]
    public void A_resample_with_fewer_set_points_than_parameters_fails_without_a_search()
    {
        // Three set points, two readings each: a pairs resample from two set points cannot hold three parameters.
        var x = new double[] { 0, 0, 50, 50, 100, 100 };
        var y = x.Select(v => 0.5 + (4.0 * (1 - Math.Exp(-v / 30.0)))).Select((v, i) => v + (0.001 * ((i % 2) - 0.5))).ToArray();
        var parsed = ExpressionParser.Parse(Rise, ["x"], ["y0", "span", "tau"]);
        var model = new ExpressionModel(parsed.Expression, [new("y0", 0), new("span", 3), new("tau", 20)]);
        var fit = NonlinearFitter.Fit(model, new FitData([.. x], [.. y])).Search!;
        var resampler = new NonlinearResampler(fit, model, []);
        const int B = 2000;
        var rng = new Xoshiro256StarStar(4);
        var indices = new int[B * 6];
        var counts = resampler.Bootstrap(BootstrapScheme.Pairs, B, ref rng, new double[3 * B], indices);
        var sets = Enumerable.Range(0, B).Select(r => indices.AsSpan(r * 6, 6).ToArray().Select(i => i / 2).Distinct().Count()).ToArray();
        Assert.Equal(sets.Count(s => s == 1), counts.DegenerateStimulus);
        Assert.Equal(sets.Count(s => s == 2), counts.RankDeficient);
        Assert.Equal(sets.Count(s => s == 3), counts.Succeeded);
        Assert.True(resampler.HandedOver <= sets.Count(s => s == 3), $"{resampler.HandedOver} refits searched");
    }

    /// <summary>
    /// 14 points of a fast rise (truth y0 0.5, span 4, tau 3): two at 0, one at 2, eleven on the
    /// plateau from 4000 to 5000, where exp(-x/tau) underflows to 0 for any tau up to its bound of 5.
    /// </summary>
    internal static (ExpressionModel Model, NonlinearFitResult Fit) StepUnit()
    {
        var x = new double[] { 0, 0, 2 }.Concat(Enumerable.Range(0, 11).Select(i => 4000.0 + (100 * i))).ToArray();
        var noise = new Xoshiro256StarStar(8);
        var y = x.Select(v => 0.5 + (4.0 * (1 - Math.Exp(-v / 3.0))) + (0.002 * SimulatedUnits.Gaussian(ref noise))).ToArray();
        var parsed = ExpressionParser.Parse(Rise, ["x"], ["y0", "span", "tau"]);
        var model = new ExpressionModel(parsed.Expression, [new("y0", 0), new("span", 3), new("tau", 4, Min: 0.5, Max: 5)], maxIterations: 200);
        var outcome = NonlinearFitter.Fit(model, new FitData([.. x], [.. y]));
        Assert.Null(outcome.Problem);
        return (model, outcome.Search!);
    }

    /// <summary>A seeded 0-100 % sweep of n points of the exponential rise (truth 0.5, 4, 30; noise SD 2 mV), fitted.</summary>
    private static (ExpressionModel Model, NonlinearFitResult Fit) RiseUnit(int n, ulong seed)
    {
        var rng = new Xoshiro256StarStar(seed);
        var x = Enumerable.Range(0, n).Select(i => 100.0 * i / (n - 1)).ToArray();
        var y = x.Select(v => 0.5 + (4.0 * (1 - Math.Exp(-v / 30.0))) + (0.002 * SimulatedUnits.Gaussian(ref rng))).ToArray();
        var parsed = ExpressionParser.Parse(Rise, ["x"], ["y0", "span", "tau"]);
        var model = new ExpressionModel(parsed.Expression, [new("y0", 0), new("span", 3), new("tau", 20)]);
        var outcome = NonlinearFitter.Fit(model, new FitData([.. x], [.. y]));
        Assert.Null(outcome.Problem);
        return (model, outcome.Search!);
    }

    /// <summary>The errors e* of B residual or wild resamples of the fit, drawn from the stream as the resamplers draw them (docs/uncertainty.md, Reproducibility).</summary>
    private static double[][] FixedDesignErrors(BootstrapScheme scheme, NonlinearFitResult fit, int resamples, ulong seed)
    {
        var n = fit.Count;
        var adjusted = new double[n];
        for (var i = 0; i < n; i++)
        {
            adjusted[i] = fit.Residuals[i] / Math.Sqrt(1 - fit.Leverage[i]);
        }

        var mean = adjusted.Average();
        var rng = new Xoshiro256StarStar(seed);
        var result = new double[resamples][];
        var threshold = Xoshiro256StarStar.RejectionThreshold(n);
        var drawn = new int[n];
        for (var r = 0; r < resamples; r++)
        {
            var e = new double[n];
            switch (scheme)
            {
                case BootstrapScheme.Pairs:
                    rng.FillBelow(drawn, (uint)n, threshold);
                    break;
                case BootstrapScheme.Residual:
                    rng.FillBelow(drawn, (uint)n, threshold);
                    for (var i = 0; i < n; i++)
                    {
                        e[i] = adjusted[drawn[i]] - mean;
                    }

                    break;
                case BootstrapScheme.WildRademacher:
                    var bits = rng.NextUInt64();
                    for (var i = 0; i < n; i++)
                    {
                        e[i] = ((bits >> i) & 1) == 1 ? -adjusted[i] : adjusted[i];
                    }

                    break;
                default:
                    for (var i = 0; i < n; i++)
                    {
                        e[i] = adjusted[i] * (rng.NextDouble() < (Math.Sqrt(5) + 1) / (2 * Math.Sqrt(5)) ? -(Math.Sqrt(5) - 1) / 2 : (Math.Sqrt(5) + 1) / 2);
                    }

                    break;
            }

            result[r] = e;
        }

        return result;
    }
}
