using MathNet.Numerics.Distributions;
using StandFit.Core.Fitting;
using StandFit.Core.Ingest;
using StandFit.Core.Uncertainty.Resampling;
using StandFit.Tests.Support;

namespace StandFit.Tests.Resampling;

/// <summary>
/// Monte-Carlo checks of the bootstrap standard errors. The relative standard error of a standard
/// deviation estimated from B independent replicates of a roughly normal statistic is about
/// 1/sqrt(2B) (Efron and Tibshirani 1993, section 19.3; Davison and Hinkley 1997, section 2.5.2), so
/// each check allows 4 of those (4 sigma: a false alarm about once in 16000 runs; the seeds are
/// fixed, so a run either passes or fails every time).
/// </summary>
public sealed class BootstrapTests
{
    private const int B = 4000;

    private static double McTolerance => 4 / Math.Sqrt(2.0 * B);

    [Theory]
    [InlineData(BootstrapScheme.Residual)]
    [InlineData(BootstrapScheme.WildRademacher)]
    [InlineData(BootstrapScheme.WildMammen)]
    public void Fixed_design_bootstrap_SEs_of_the_gain_agree_with_their_closed_form_within_the_Monte_Carlo_tolerance(BootstrapScheme scheme)
    {
        // With the set points fixed, b* - b_hat = (X'X)^-1 X' e*, so the ideal (B = infinity) bootstrap SE of the
        // gain is known in closed form (Davison and Hinkley 1997, sections 6.2.3 and 6.2.4): residual,
        // sqrt(mean (r~ - mean r~)^2 / Sxx); wild (E v^2 = 1 for Rademacher and Mammen weights),
        // sqrt(sum (x - mean x)^2 r~^2) / Sxx, with r~ = e / sqrt(1 - h) the leverage-adjusted residuals.
        var sweep = SimulatedUnits.Line(21, 2024);
        var fit = SimulatedUnits.Fit(sweep);
        var (se, _) = BootstrapSe(fit, scheme, 77);
        var x = fit.Stimulus.ToArray();
        var mx = x.Average();
        var sxx = x.Sum(v => (v - mx) * (v - mx));
        var adjusted = Enumerable.Range(0, x.Length).Select(i => fit.Residuals[i] / Math.Sqrt(1 - fit.Leverage[i])).ToArray();
        double ideal;
        if (scheme == BootstrapScheme.Residual)
        {
            var ma = adjusted.Average();
            ideal = Math.Sqrt(adjusted.Average(a => (a - ma) * (a - ma)) / sxx);
        }
        else
        {
            ideal = Math.Sqrt(Enumerable.Range(0, x.Length).Sum(i => (x[i] - mx) * (x[i] - mx) * adjusted[i] * adjusted[i])) / sxx;
        }

        Assert.True(Math.Abs((se / ideal) - 1) < McTolerance, $"{scheme}: bootstrap SE {se}, closed form {ideal}, tolerance {McTolerance:P2}");
    }

    [Theory]
    [InlineData(BootstrapScheme.Pairs)]
    [InlineData(BootstrapScheme.Residual)]
    [InlineData(BootstrapScheme.WildRademacher)]
    [InlineData(BootstrapScheme.WildMammen)]
    public void Bootstrap_SEs_of_the_gain_agree_with_the_analytic_SE_on_Gaussian_data(BootstrapScheme scheme)
    {
        // The analytic SE is s / sqrt(Sxx) (s^2 = RSS / (n - 2)). A bootstrap SE estimates the same
        // quantity with two errors: Monte-Carlo (1/sqrt(2B) relative) and, for the pairs and wild
        // schemes, the sampling error of a heteroscedasticity-consistent variance sum w_i r_i^2 with
        // w_i = (x_i - mean x)^2 / Sxx, whose relative SE under Gaussian errors is sqrt(2 sum w^2)
        // for the variance, sqrt(sum w^2 / 2) for the SE. 210 points (21 set points, 10 repeats)
        // keep the second small; the check allows 4 sigma of both combined.
        var sweep = Repeated(21, 10, 31337);
        var fit = SimulatedUnits.Fit(sweep);
        var (se, _) = BootstrapSe(fit, scheme, 4242);
        var analytic = fit.StandardError(1);
        var x = fit.Stimulus.ToArray();
        var mx = x.Average();
        var sxx = x.Sum(v => (v - mx) * (v - mx));
        var sumW2 = x.Sum(v => Math.Pow((v - mx) * (v - mx) / sxx, 2));
        var sampling = scheme == BootstrapScheme.Residual ? 0.0 : sumW2 / 2;
        var tolerance = 4 * Math.Sqrt((1.0 / (2 * B)) + sampling);
        Assert.True(Math.Abs((se / analytic) - 1) < tolerance, $"{scheme}: bootstrap SE {se}, analytic {analytic}, tolerance {tolerance:P2}");
    }

    [Fact]
    public void Pairs_resamples_without_stimulus_spread_are_counted_as_degenerate_never_dropped_silently()
    {
        // Five points, four at 0 kPa and one at 250 kPa: a resample misses 250 with probability (4/5)^5 and
        // holds only 250 with probability (1/5)^5; together 0.328 of B (binomial SD sqrt(B 0.328 0.672)).
        double[] x = [0, 0, 0, 0, 250];
        double[] y = [0.01, 0.02, 0.00, 0.015, 50.0];
        var fit = LeastSquaresFitter.Fit(Polynomial.StraightLine, [.. x], [.. y]).Value;
        var kernel = new LinearResampler(fit, [0, 1]);
        var rng = new Xoshiro256StarStar(3);
        var counts = kernel.Bootstrap(BootstrapScheme.Pairs, B, ref rng, new double[B]);
        var p = Math.Pow(0.8, 5) + Math.Pow(0.2, 5);
        var sd = Math.Sqrt(B * p * (1 - p));
        Assert.InRange(counts.DegenerateStimulus, (B * p) - (4 * sd), (B * p) + (4 * sd));
        Assert.Equal(0, counts.RankDeficient);
        Assert.Equal(B, counts.Succeeded + counts.Failed);
    }

    [Fact]
    public void Pairs_resamples_with_too_few_set_points_for_a_quadratic_are_counted_as_rank_deficient()
    {
        double[] x = [0, 0, 0, 125, 250, 250];
        double[] y = [0.0, 0.01, -0.01, 25.2, 50.1, 50.0];
        var fit = LeastSquaresFitter.Fit(Polynomial.OfDegree(2), [.. x], [.. y]).Value;
        var kernel = new LinearResampler(fit, [0, 1, 0]);
        var rng = new Xoshiro256StarStar(5);
        var counts = kernel.Bootstrap(BootstrapScheme.Pairs, B, ref rng, new double[B]);
        // Rank deficient: exactly two of the three set points drawn. By inclusion-exclusion over the events
        // "set point j absent" (0 absent: (3/6)^6, 125: (5/6)^6, 250: (4/6)^6; two absent = only the third
        // present: (1/2)^6, (1/3)^6, (1/6)^6): P(exactly one absent) = sum P(absent) - 2 sum P(two absent).
        Assert.True(counts.DegenerateStimulus > 0);
        var p = Math.Pow(3.0 / 6, 6) + Math.Pow(5.0 / 6, 6) + Math.Pow(4.0 / 6, 6) - (2 * (Math.Pow(1.0 / 2, 6) + Math.Pow(1.0 / 3, 6) + Math.Pow(1.0 / 6, 6)));
        var sd = Math.Sqrt(B * p * (1 - p));
        Assert.InRange(counts.RankDeficient, (B * p) - (4 * sd), (B * p) + (4 * sd));
    }

    [Fact]
    public void Residual_bootstrap_resamples_keep_the_set_points_and_never_fail()
    {
        var sweep = SimulatedUnits.Line(11, 8);
        var fit = SimulatedUnits.Fit(sweep);
        var kernel = new LinearResampler(fit, [1, 0, 0, 1]);
        var rng = new Xoshiro256StarStar(9);
        var counts = kernel.Bootstrap(BootstrapScheme.Residual, 500, ref rng, new double[1000]);
        Assert.Equal(500, counts.Succeeded);
    }

    [Fact]
    public void A_quantile_is_the_order_statistic_at_B_plus_1_alpha_interpolated_on_the_normal_scale()
    {
        // Davison and Hinkley 1997, eq. 5.8, as R's boot computes it (norm.inter): B = 999, alpha = 0.025 gives
        // (B + 1) alpha = 25, the 25th smallest; B = 1000 at 68.27 % gives (B + 1) 0.158650 = 158.80..., between
        // the 158th and 159th smallest on the Phi^-1 scale.
        var values = Enumerable.Range(1, 999).Select(i => (double)i).Reverse().ToArray();
        Assert.Equal(25.0, BootstrapIntervals.Quantile(values, 0.025));

        var thousand = Enumerable.Range(1, 1000).Select(i => i * 0.5).Reverse().ToArray();
        var alpha = (1 - 0.6827) / 2;
        var z = Normal.InvCDF(0, 1, alpha);
        var z158 = Normal.InvCDF(0, 1, 158.0 / 1001);
        var z159 = Normal.InvCDF(0, 1, 159.0 / 1001);
        var expected = 79.0 + ((z - z158) / (z159 - z158) * 0.5);
        Assert.Equal(expected, BootstrapIntervals.Quantile(thousand, alpha), 12);
        Assert.InRange(BootstrapIntervals.Quantile(thousand, alpha), 79.0, 79.5);
    }

    [Fact]
    public void The_summary_reads_the_same_quantiles_as_a_quantile_of_each_tail_on_its_own()
    {
        // The summary puts only the tails in order; its ends must equal Quantile on a fresh copy (boot's norm.inter).
        var rng = new Xoshiro256StarStar(11);
        foreach (var b in new[] { 20, 199, 1000, 1001 })
        {
            foreach (var coverage in new[] { 0.6827, 0.9, 0.95, 0.99 })
            {
                var values = Enumerable.Range(0, b).Select(_ => SimulatedUnits.Gaussian(ref rng) + (0.3 * rng.NextDouble())).ToArray();
                var acceleration = (rng.NextDouble() - 0.5) * 0.4;
                var summary = BootstrapIntervals.Summarise(values.ToArray(), 0.1, coverage, acceleration);
                Assert.Equal(BootstrapIntervals.Quantile(values.ToArray(), (1 - coverage) / 2), summary.Percentile!.Value.Low);
                Assert.Equal(BootstrapIntervals.Quantile(values.ToArray(), (1 + coverage) / 2), summary.Percentile.Value.High);
                if (summary.Bca is { } bca)
                {
                    var zLow = Normal.InvCDF(0, 1, (1 - coverage) / 2);
                    var zHigh = Normal.InvCDF(0, 1, (1 + coverage) / 2);
                    Assert.Equal(BootstrapIntervals.Quantile(values.ToArray(), BootstrapIntervals.BcaLevel(summary.Z0, acceleration, zLow)), bca.Low);
                    Assert.Equal(BootstrapIntervals.Quantile(values.ToArray(), BootstrapIntervals.BcaLevel(summary.Z0, acceleration, zHigh)), bca.High);
                }
            }
        }
    }

    [Fact]
    public void Selection_finds_every_order_statistic()
    {
        var rng = new Xoshiro256StarStar(1);
        var values = Enumerable.Range(0, 301).Select(_ => Math.Floor(rng.NextDouble() * 50)).ToArray();
        var sorted = values.Order().ToArray();
        for (var k = 1; k <= values.Length; k++)
        {
            var scratch = values.ToArray();
            Assert.Equal(sorted[k - 1], OrderStatistics.Select(scratch, k));
        }
    }

    [Fact]
    public void With_no_acceleration_and_no_median_bias_BCa_is_the_percentile_interval()
    {
        // Efron and Tibshirani 1993, section 14.3: a = 0 and z0 = 0 reduce BCa to the percentile interval.
        // 2000 replicates, half of them below the estimate: z0 = Phi^-1(1/2) = 0.
        var values = Enumerable.Range(0, 2000).Select(i => i - 999.5).ToArray();
        var summary = BootstrapIntervals.Summarise(values.ToArray(), 0.0, 0.95, 0.0);
        Assert.Equal(0.0, summary.Z0);
        Assert.Equal(summary.Percentile!.Value.Low, summary.Bca!.Value.Low, 6);
        Assert.Equal(summary.Percentile!.Value.High, summary.Bca!.Value.High, 6);
        Assert.Equal(-summary.Percentile!.Value.High, summary.Basic!.Value.Low, 9);
    }

    private static (double Se, BootstrapCounts Counts) BootstrapSe(FitResult fit, BootstrapScheme scheme, ulong seed)
    {
        var kernel = new LinearResampler(fit, [0, 1]);
        var replicates = new double[B];
        var rng = new Xoshiro256StarStar(seed);
        var counts = kernel.Bootstrap(scheme, B, ref rng, replicates);
        Assert.Equal(B, counts.Succeeded);
        var summary = BootstrapIntervals.Summarise(replicates, fit.Estimates[1], 0.95, double.NaN);
        return (summary.StandardError, counts);
    }

    private static Sweep Repeated(int setPoints, int repeats, ulong seed)
    {
        var rng = new Xoshiro256StarStar(seed);
        var n = setPoints * repeats;
        var x = new double[n];
        var y = new double[n];
        for (var i = 0; i < n; i++)
        {
            x[i] = 250.0 * (i % setPoints) / (setPoints - 1);
            y[i] = 0.01 + (0.2 * x[i]) + (0.005 * SimulatedUnits.Gaussian(ref rng));
        }

        return new Sweep(new UnitIdentity("R", null, null, null), [.. x], [.. y], [.. Enumerable.Repeat(Leg.Unknown, n)], [.. Enumerable.Range(1, n)], []);
    }
}
