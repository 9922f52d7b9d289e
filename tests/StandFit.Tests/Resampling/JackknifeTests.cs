using System.Collections.Immutable;
using StandFit.Core.Fitting;
using StandFit.Core.Uncertainty.Resampling;
using StandFit.Tests.Support;

namespace StandFit.Tests.Resampling;

public sealed class JackknifeTests
{
    // Efron and Tibshirani (1993), An Introduction to the Bootstrap, Table 3.1 (law school data, n = 15),
    // as quoted in shared/notes/trade-reference.md.
    private static readonly double[] Lsat = [576, 635, 558, 578, 666, 580, 555, 661, 651, 605, 653, 575, 545, 572, 594];
    private static readonly double[] Gpa = [3.39, 3.30, 2.81, 3.03, 3.44, 3.07, 3.00, 3.43, 3.36, 3.13, 3.12, 2.74, 2.76, 2.88, 2.96];

    [Fact]
    public void The_jackknife_SE_of_the_law_school_correlation_is_0_142()
    {
        var all = Enumerable.Range(0, Lsat.Length).ToArray();
        var theta = Correlation(all);
        var leaveOut = all.Select(i => Correlation([.. all.Where(j => j != i)])).ToArray();
        var jack = Jackknife.Summarise(theta, leaveOut);

        Assert.Equal(0.776, theta, 3);                  // Efron and Tibshirani 1993, section 3.2
        Assert.InRange(jack.StandardError, 0.142, 0.143); // Efron and Tibshirani 1993, section 11.2, prints .142 (3 digits, truncated)
        Assert.Equal(0.14252, jack.StandardError, 5);   // trade-reference.md: 0.14252 computed
        Assert.Equal(15, jack.Deletions);
    }

    [Fact]
    public void The_jackknife_SE_of_a_mean_is_the_usual_standard_error_and_its_bias_is_zero()
    {
        // Efron and Tibshirani 1993, section 11.2: for the mean, the jackknife SE is s / sqrt(n) exactly.
        double[] x = [3.1, 4.7, 2.2, 5.9, 4.4, 3.8, 6.1, 2.9];
        var n = x.Length;
        var mean = x.Average();
        var leaveOut = Enumerable.Range(0, n).Select(i => (x.Sum() - x[i]) / (n - 1)).ToArray();
        var jack = Jackknife.Summarise(mean, leaveOut);
        var s = Math.Sqrt(x.Sum(v => (v - mean) * (v - mean)) / (n - 1));
        Assert.Equal(s / Math.Sqrt(n), jack.StandardError, 14);
        Assert.Equal(0.0, jack.Bias, 12);
    }

    [Fact]
    public void The_bias_corrected_jackknife_of_the_plug_in_variance_is_the_unbiased_variance()
    {
        // Efron and Tibshirani 1993, section 10.5 / 11.4: the jackknife corrects (1/n) sum (x - mean)^2 to (1/(n-1)) sum (x - mean)^2.
        double[] x = [3.1, 4.7, 2.2, 5.9, 4.4, 3.8, 6.1, 2.9];
        static double PlugIn(double[] v) => v.Sum(a => (a - v.Average()) * (a - v.Average())) / v.Length;
        var leaveOut = Enumerable.Range(0, x.Length).Select(i => PlugIn([.. x.Where((_, j) => j != i)])).ToArray();
        var jack = Jackknife.Summarise(PlugIn(x), leaveOut);
        var unbiased = x.Sum(a => (a - x.Average()) * (a - x.Average())) / (x.Length - 1);
        Assert.Equal(unbiased, jack.BiasCorrected, 13);
    }

    [Theory]
    [InlineData(1)]
    [InlineData(2)]
    public void Delete_one_estimates_match_the_closed_form_b_minus_b_i_from_the_QR_factors(int degree)
    {
        // Cook and Weisberg (1982), Residuals and Influence in Regression, eq. 3.4.4 (Belsley, Kuh and Welsch 1980, eq. 2.1):
        // b - b_(i) = (X'X)^-1 x_i e_i / (1 - h_ii). (X'X)^-1 x_i is computed here from a Householder QR of the
        // natural design X P = Q R: (X'X)^-1 x_i = P R^-1 R^-T P' x_i, never from X'X.
        var sweep = SimulatedUnits.Line(21, 99, c2: degree == 2 ? 2e-6 : 0);
        var model = Polynomial.OfDegree(degree);
        var fit = SimulatedUnits.Fit(sweep, model);
        var n = fit.Count;
        var p = fit.ParameterCount;
        var identity = new double[p * p];
        for (var j = 0; j < p; j++)
        {
            identity[(j * p) + j] = 1;
        }

        var kernel = new LinearResampler(fit, identity);
        var leaveOut = new double[p * n];
        var failures = new ResampleFailure[n];
        kernel.LeaveOut([.. Enumerable.Range(0, n)], n, leaveOut, failures);
        Assert.All(failures, f => Assert.Equal(ResampleFailure.None, f));

        var design = new double[n * p];
        var row = new double[p];
        for (var i = 0; i < n; i++)
        {
            model.FillBasis([fit.Stimulus[i]], row);
            for (var j = 0; j < p; j++)
            {
                design[(j * n) + i] = row[j];
            }
        }

        var qr = new HouseholderQr(design, n, p);
        for (var i = 0; i < n; i++)
        {
            model.FillBasis([fit.Stimulus[i]], row);
            var z = new double[p];
            for (var k = 0; k < p; k++)
            {
                var s = row[qr.Permutation(k)];
                for (var m = 0; m < k; m++)
                {
                    s -= qr.R(m, k) * z[m];
                }

                z[k] = s / qr.R(k, k); // R' z = P' x_i
            }

            qr.SolveUpper(z);      // R y = z
            var g = new double[p];
            for (var k = 0; k < p; k++)
            {
                g[qr.Permutation(k)] = z[k];
            }

            var factor = fit.Residuals[i] / (1 - fit.Leverage[i]);
            for (var j = 0; j < p; j++)
            {
                var shift = g[j] * factor;
                var expected = fit.Estimates[j] - shift;
                var tolerance = (1e-10 * Math.Abs(shift)) + (4e-16 * Math.Abs(fit.Estimates[j])) + 1e-300;
                Assert.True(Math.Abs(leaveOut[(j * n) + i] - expected) <= tolerance, $"point {i}, parameter {j}: {leaveOut[(j * n) + i]:R} vs {expected:R}");
            }
        }
    }

    [Fact]
    public void Delete_leg_and_delete_one_estimates_equal_a_fresh_fit_of_the_points_that_remain()
    {
        var sweep = SimulatedUnits.Line(21, 5);
        var fit = SimulatedUnits.Fit(sweep);
        var kernel = new LinearResampler(fit, [1, 0, 0, 1]);
        foreach (var kind in new[] { JackknifeGroups.DeleteOne, JackknifeGroups.DeleteLeg })
        {
            var (groupOf, groups) = ResamplingAnalysis.Groups(sweep, kind);
            Assert.Equal(kind == JackknifeGroups.DeleteOne ? 21 : 2, groups);
            var output = new double[2 * groups];
            var failures = new ResampleFailure[groups];
            kernel.LeaveOut(groupOf, groups, output, failures);
            for (var g = 0; g < groups; g++)
            {
                var keep = Enumerable.Range(0, sweep.Count).Where(i => groupOf[i] != g).ToArray();
                var refit = LeastSquaresFitter.Fit(Polynomial.StraightLine, [.. keep.Select(i => sweep.Stimulus[i])], [.. keep.Select(i => sweep.Output[i])]).Value;
                Assert.Equal(refit.Estimates[0], output[g], 12);
                Assert.Equal(refit.Estimates[1], output[groups + g], 13);
            }
        }
    }

    [Fact]
    public void Cycles_pair_consecutive_legs()
    {
        var up = StandFit.Core.Ingest.Leg.Up;
        var down = StandFit.Core.Ingest.Leg.Down;
        var legs = ImmutableArray.Create(up, up, down, down, up, up, down, down);
        var sweep = new StandFit.Core.Ingest.Sweep(new("S", null, null, null), [0, 1, 1, 0, 0, 1, 1, 0], [0, 1, 1, 0, 0, 1, 1, 0], legs, [1, 2, 3, 4, 5, 6, 7, 8], []);
        Assert.Equal([0, 0, 1, 1, 2, 2, 3, 3], ResamplingAnalysis.Groups(sweep, JackknifeGroups.DeleteLeg).GroupOf);
        Assert.Equal([0, 0, 0, 0, 1, 1, 1, 1], ResamplingAnalysis.Groups(sweep, JackknifeGroups.DeleteCycle).GroupOf);
    }

    [Fact]
    public void The_most_influential_point_is_named_by_its_line_in_the_sweep_file()
    {
        var clean = SimulatedUnits.Line(21, 11);
        var output = clean.Output.ToArray();
        output[20] += 0.2; // a wild reading at the top of the range moves the gain most
        var sweep = new StandFit.Core.Ingest.Sweep(clean.Identity, clean.Stimulus, [.. output], clean.Legs, clean.SourceLines, []);
        var fit = SimulatedUnits.Fit(sweep);
        var result = ResamplingAnalysis.Run(fit, sweep, SimulatedUnits.Recipe(new ResamplingPlan(1)), new ResamplingPlan(1), 1);
        Assert.NotNull(result.Influential);
        Assert.Equal(20, result.Influential!.Index);
        Assert.Equal(27, result.Influential.SourceLine);
        var finding = Assert.Single(result.Findings, f => f.Code == "resampling.influential_point");
        Assert.Contains("line 27", finding.Sentence, StringComparison.Ordinal);
    }

    private static double Correlation(int[] rows)
    {
        var mx = rows.Average(i => Lsat[i]);
        var my = rows.Average(i => Gpa[i]);
        double sxy = 0, sxx = 0, syy = 0;
        foreach (var i in rows)
        {
            sxy += (Lsat[i] - mx) * (Gpa[i] - my);
            sxx += (Lsat[i] - mx) * (Lsat[i] - mx);
            syy += (Gpa[i] - my) * (Gpa[i] - my);
        }

        return sxy / Math.Sqrt(sxx * syy);
    }
}
