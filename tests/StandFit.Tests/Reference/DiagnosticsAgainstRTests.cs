using System.Globalization;
using StandFit.Core.Diagnostics;
using StandFit.Tests.Support;

namespace StandFit.Tests.Reference;

/// <summary>
/// Every residual diagnostic and figure of merit against R on the fixture data sets (NIST StRD
/// Pontius, Norris and NoInt1, a 120-point sweep of our own, and eight demo sweeps: clear passes,
/// the bow KP250-26110-0022, the outlier KP250-26110-0027, the hysteresis LC5K-26110-0009). The
/// reference values were computed once by Fixtures/diagnostics/make-fixtures.R (R 4.2.2, lmtest
/// 0.9.40, tseries 0.10.53, nortest 1.0.4, car 3.1.1); the R function behind each quantity is named
/// beside its check. Statistics agree to 1e-8 relative, p-values to 1e-6 absolute, the exact
/// Durbin-Watson p to 1e-4 against lmtest's Pan algorithm (and to 1e-6 against the Imhof integral
/// done by R's integrate()).
/// </summary>
public sealed class DiagnosticsAgainstRTests
{
    private const double Relative = 1e-8;
    private const double PAbsolute = 1e-6;
    private const double PanAbsolute = 1e-4;

    public static TheoryData<string> DataSets => [.. DiagnosticsFixture.Instance.DataSets.Select(d => d.Name)];

    private static DiagnosticsFixture R => DiagnosticsFixture.Instance;

    [Fact]
    public void The_fixture_records_the_R_and_package_versions_that_made_it()
    {
        foreach (var version in new[] { "R version 4.2.2", "lmtest 0.9.40", "tseries 0.10.53", "nortest 1.0.4" })
        {
            Assert.Contains(version, R.Header, StringComparison.Ordinal);
        }

        Assert.True(File.Exists(Path.Combine(DiagnosticsFixture.Folder, "make-fixtures.R")));
        Assert.True(R.DataSets.Length >= 10, "at least ten data sets");
    }

    [Theory]
    [MemberData(nameof(DataSets))]
    public void The_runs_test_z_matches_tseries_and_its_p_does_where_the_normal_approximation_is_used(string name)
    {
        var set = R[name];
        var byStimulus = RunsTest.Compute(set.Fit.Residuals.AsSpan(), ResidualOrders.ByStimulus(set.Fit.Stimulus.AsSpan()));
        var byAcquisition = set.Diagnostics().RunsByAcquisition;
        foreach (var (order, result) in new[] { ("stimulus", byStimulus), ("acquisition", byAcquisition) })
        {
            Assert.Equal(R.Value(name, $"runs_{order}_count"), result.Runs); // tseries::runs.test counts runs the same way
            Stat(name, $"runs_{order}_z", result.Z); // tseries::runs.test statistic
            if (result.Method == RunsMethod.Normal)
            {
                P(name, $"runs_{order}_p_normal", result.P); // tseries::runs.test p-value (normal approximation)
            }
        }
    }

    [Theory]
    [MemberData(nameof(DataSets))]
    public void The_durbin_watson_statistic_and_exact_p_match_lmtest_dwtest(string name)
    {
        var dw = R[name].Diagnostics().DurbinWatson;
        Assert.Equal(DiagnosticMethods.Exact, dw.Method);
        Stat(name, "dw_statistic", dw.Statistic); // lmtest::dwtest statistic
        Near(name, "dw_p_pan", dw.P, PanAbsolute); // lmtest::dwtest p-value, alternative "greater", Pan's algorithm
        Near(name, "dw_p_imhof", dw.P, PAbsolute); // Imhof's integral by stats::integrate at rel.tol 1e-12
    }

    [Theory]
    [MemberData(nameof(DataSets))]
    public void The_durbin_watson_eigenvalues_match_R_eigen(string name)
    {
        var set = R[name];
        var design = DesignBasisOf(set);
        var expected = R.Vector(name, "dw_eigenvalues"); // eigen(M A M) in make-fixtures.R, those above 1e-10
        var fast = DurbinWatson.Eigenvalues(design, null);
        var dense = DurbinWatson.Eigenvalues(design, null, dense: true);
        Assert.Equal(expected.Length, fast.Length);
        Assert.Equal(expected.Length, dense.Length);
        for (var i = 0; i < expected.Length; i++)
        {
            // Eigenvalues lie in (0, 4): compared to 1e-10 absolute (1e-8 relative for all but the smallest few).
            Assert.True(Math.Abs(fast[i] - expected[i]) <= 1e-10 + (Relative * expected[i]), Describe(name, $"eigenvalue {i + 1}", fast[i], expected[i]));
            Assert.True(Math.Abs(dense[i] - expected[i]) <= 1e-10 + (Relative * expected[i]), Describe(name, $"dense eigenvalue {i + 1}", dense[i], expected[i]));
        }
    }

    [Theory]
    [MemberData(nameof(DataSets))]
    public void The_lag_one_autocorrelation_and_ljung_box_match_acf_and_Box_test(string name)
    {
        var a = R[name].Diagnostics().Autocorrelation;
        Stat(name, "lag1_autocorrelation", a.Lag1); // stats::acf(lag.max = 1)
        Stat(name, "ljung_box_q", a.LjungBoxQ); // stats::Box.test(type = "Ljung-Box", lag = 1)
        P(name, "ljung_box_p", a.P);
    }

    [Theory]
    [MemberData(nameof(DataSets))]
    public void The_lack_of_fit_test_matches_anova_against_the_set_point_means(string name)
    {
        var d = R[name].Diagnostics();
        Assert.Equal(R.Value(name, "set_points"), d.SetPoints.Count);
        if (!R.Has(name, "lof_f"))
        {
            Assert.False(d.LackOfFit.IsApplicable, name + ": R made no lack-of-fit test (no replicated set points)");
            return;
        }

        Stat(name, "lof_f", d.LackOfFit.F); // anova(lm(y ~ x), lm(y ~ factor(set point)))
        Assert.Equal(R.Value(name, "lof_df1"), d.LackOfFit.LackDf);
        Assert.Equal(R.Value(name, "lof_df2"), d.LackOfFit.PureErrorDf);
        P(name, "lof_p", d.LackOfFit.P);
    }

    [Theory]
    [MemberData(nameof(DataSets))]
    public void The_curvature_test_matches_anova_of_the_next_polynomial_power(string name)
    {
        var c = R[name].Diagnostics().Curvature;
        Stat(name, "curvature_f", c.F); // anova(lm(y ~ poly(x, k, raw = TRUE)), lm(y ~ poly(x, k + 1, raw = TRUE)))
        Assert.Equal(R.Value(name, "curvature_df2"), c.Df);
        P(name, "curvature_p", c.P);
    }

    [Theory]
    [MemberData(nameof(DataSets))]
    public void The_breusch_pagan_test_matches_lmtest_bptest_studentized(string name)
    {
        var bp = R[name].Diagnostics().BreuschPagan;
        Stat(name, "bp_statistic", bp.Statistic); // lmtest::bptest(studentize = TRUE)
        Assert.Equal(R.Value(name, "bp_df"), bp.Df);
        P(name, "bp_p", bp.P);
    }

    [Theory]
    [MemberData(nameof(DataSets))]
    public void The_shapiro_wilk_test_matches_stats_shapiro_test(string name)
    {
        var sw = R[name].Diagnostics().ShapiroWilk;
        Stat(name, "sw_w", sw.W); // stats::shapiro.test statistic W
        P(name, "sw_p", sw.P); // stats::shapiro.test p-value
    }

    [Theory]
    [MemberData(nameof(DataSets))]
    public void The_anderson_darling_test_matches_nortest_ad_test(string name)
    {
        var ad = R[name].Diagnostics().AndersonDarling;
        Stat(name, "ad_a2", ad.A2); // nortest::ad.test statistic A
        Stat(name, "ad_astar", ad.AStar); // A (1 + 0.75/n + 2.25/n^2), as ad.test forms it
        P(name, "ad_p", ad.P); // nortest::ad.test p-value
    }

    [Theory]
    [MemberData(nameof(DataSets))]
    public void Skewness_and_excess_kurtosis_follow_the_moment_definitions(string name)
    {
        var m = R[name].Diagnostics().Moments;
        // Dimensionless and of order 1: near 0 (NoInt1's residuals are exactly symmetric) compared at that scale.
        Stat(name, "skewness", m.Skewness, scale: 1); // mean(c^3) / mean(c^2)^1.5 in base R
        Stat(name, "excess_kurtosis", m.ExcessKurtosis, scale: 1); // mean(c^4) / mean(c^2)^2 - 3 in base R
    }

    [Theory]
    [MemberData(nameof(DataSets))]
    public void Leverage_studentized_residuals_and_cooks_distance_match_the_stats_package(string name)
    {
        var points = R[name].Diagnostics().Points;
        Vector(name, "leverage", points.Leverage.AsSpan()); // stats::hatvalues
        Vector(name, "rstandard", points.Standardized.AsSpan()); // stats::rstandard
        Vector(name, "rstudent", points.Studentized.AsSpan()); // stats::rstudent
        Vector(name, "cooks_distance", points.CooksDistance.AsSpan()); // stats::cooks.distance
    }

    [Theory]
    [MemberData(nameof(DataSets))]
    public void The_bonferroni_outlier_test_matches_car_outlierTest(string name)
    {
        var o = R[name].Diagnostics().Outliers;
        Assert.Equal(R.Value(name, "outlier_index"), o.Index + 1); // which.max(abs(rstudent)), 1-based in R
        Stat(name, "max_abs_rstudent", o.MaxAbsStudentized);
        P(name, "outlier_p_unadjusted", o.UnadjustedP); // 2 pt(-|t|, n - p - 1)
        P(name, "outlier_p", o.P); // min(1, n p), checked in the script against car::outlierTest's bonf.p
    }

    [Theory]
    [MemberData(nameof(DataSets))]
    public void The_histogram_has_the_freedman_diaconis_bins_of_R_type_7_quantiles(string name)
    {
        var h = R[name].Diagnostics().Histogram;
        Vector(name, "histogram_edges", h.Edges.AsSpan()); // quantile(type = 7) IQR, equal bins min..max
        var counts = R.Vector(name, "histogram_counts"); // findInterval(rightmost.closed = TRUE)
        Assert.Equal(counts.Select(c => (int)c), h.Counts);
    }

    [Theory]
    [MemberData(nameof(DataSets))]
    public void The_figures_of_merit_match_base_R_on_the_set_point_means(string name)
    {
        var merit = R[name].Diagnostics().Merit;
        Assert.NotNull(merit);
        Stat(name, "fso", merit.FullScaleOutput);
        Vector(name, "curve_stimulus", [.. merit.Curve.Select(p => p.Stimulus)]);
        Vector(name, "curve_output", [.. merit.Curve.Select(p => p.Output)]);
        // Percentages of FSO; NoInt1 lies exactly on a line, so its non-linearity is 0 up to rounding: 1e-3 % is the scale.
        Stat(name, "nonlinearity_terminal_pct", merit.NonlinearityTerminalPct, scale: 1e-3);
        Stat(name, "nonlinearity_ls_pct", merit.NonlinearityLeastSquaresPct, scale: 1e-3); // lm(ybar ~ xbar)
        Stat(name, "nonlinearity_minimax_pct", merit.NonlinearityMinimaxPct, scale: 1e-3); // brute force over every pair's slope
        Optional(name, "hysteresis_pct", merit.HysteresisPct);
        Optional(name, "nonrepeatability_pct", merit.NonrepeatabilityPct);
        Optional(name, "zero_error_pct", merit.ZeroErrorPct);
        Optional(name, "span_error_pct", merit.SpanErrorPct);
        Optional(name, "max_error_pct", merit.MaxErrorPct);
        Stat(name, "llf", merit.LowerLimitFactor); // 2.4 sigma(fit)
    }

    private static DesignBasis DesignBasisOf(DiagnosticsFixture.DataSet set) => DesignBasis.Of(set.Fit);

    private static void Optional(string name, string quantity, double? value)
    {
        if (R.Has(name, quantity))
        {
            Assert.True(value.HasValue, $"{name}: {quantity} is in the R fixture but was not computed");
            Stat(name, quantity, value.Value);
        }
        else
        {
            Assert.False(value.HasValue, $"{name}: {quantity} was computed but R has none");
        }
    }

    /// <summary>1e-8 relative; a value smaller than <paramref name="scale"/> (the quantity's natural size) is compared at that scale.</summary>
    private static void Stat(string name, string quantity, double value, double scale = 0)
    {
        var expected = R.Value(name, quantity);
        Assert.True(Math.Abs(value - expected) <= Relative * Math.Max(Math.Abs(expected), scale), Describe(name, quantity, value, expected));
    }

    private static void P(string name, string quantity, double value) => Near(name, quantity, value, PAbsolute);

    private static void Near(string name, string quantity, double value, double tolerance)
    {
        var expected = R.Value(name, quantity);
        Assert.True(Math.Abs(value - expected) <= tolerance, Describe(name, quantity, value, expected));
    }

    /// <summary>A vector to 1e-8 relative to each element, elements below 1e-6 of the vector's largest compared at that scale.</summary>
    private static void Vector(string name, string quantity, ReadOnlySpan<double> values)
    {
        var expected = R.Vector(name, quantity);
        Assert.Equal(expected.Length, values.Length);
        var scale = expected.Max(Math.Abs);
        for (var i = 0; i < expected.Length; i++)
        {
            var tolerance = Relative * Math.Max(Math.Abs(expected[i]), 1e-6 * scale);
            Assert.True(Math.Abs(values[i] - expected[i]) <= tolerance, Describe(name, $"{quantity}[{i + 1}]", values[i], expected[i]));
        }
    }

    private static string Describe(string name, string quantity, double value, double expected) =>
        string.Create(CultureInfo.InvariantCulture, $"{name}: {quantity} = {value:R}, R gives {expected:R} (difference {value - expected:E2})");
}
