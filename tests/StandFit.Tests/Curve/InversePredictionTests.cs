using System.Collections.Immutable;
using StandFit.Core.Curve;
using StandFit.Core.Fitting;
using StandFit.Core.Uncertainty;

namespace StandFit.Tests.Curve;

/// <summary>
/// What inverse prediction and the bands do at the edges, as docs/curve.md states it: no
/// extrapolation beyond the calibrated range, no answer where the curve turns, an open end of the
/// inverse interval where the data cannot bound the stimulus, and a weighted fit that needs the
/// new reading's uncertainty.
/// </summary>
public sealed class InversePredictionTests
{
    private static readonly ConfidenceLevel Level = ConfidenceLevel.Default95;

    // A fixed, sign-alternating scatter (no random numbers): +-0.5 and +-0.3 in turn.
    private static double Scatter(int i) => (i % 2 == 0 ? 1 : -1) * (i % 3 == 0 ? 0.5 : 0.3);

    private static FitResult Fit(LinearModel model, Func<double, double> curve, double scatterScale, ImmutableArray<double> uncertainties = default)
    {
        ImmutableArray<double> x = [.. Enumerable.Range(0, 21).Select(i => i * 0.5)];
        ImmutableArray<double> y = [.. x.Select((v, i) => curve(v) + (scatterScale * Scatter(i)))];
        return LeastSquaresFitter.Fit(model, new FitData(x, y) { Uncertainties = uncertainties }).Value;
    }

    [Fact]
    public void A_response_beyond_the_curve_s_ends_is_outside_the_calibrated_range()
    {
        var fit = Fit(Polynomial.StraightLine, x => 2 * x, 0.01);

        var solved = InversePrediction.Solve(fit, 25.0, Level); // the curve reaches only about 20 at x = 10

        Assert.Equal(InverseStatus.OutsideRange, solved.Status);
        Assert.True(double.IsNaN(solved.Stimulus));
    }

    [Fact]
    public void A_response_the_curve_reaches_twice_is_not_monotonic()
    {
        var fit = Fit(Polynomial.OfDegree(2), x => (x - 5) * (x - 5), 0.01);

        var solved = InversePrediction.Solve(fit, 4.0, Level); // (x - 5)^2 = 4 at x = 3 and x = 7

        Assert.Equal(InverseStatus.NotMonotonic, solved.Status);
    }

    [Fact]
    public void The_inverse_interval_is_open_where_the_band_does_not_close_inside_the_range()
    {
        var fit = Fit(Polynomial.StraightLine, x => 2 * x, 2.0);

        var solved = InversePrediction.Solve(fit, 19.5, Level); // x0 near 9.75, the band is wider than 0.25 in x

        Assert.Equal(InverseStatus.Solved, solved.Status);
        Assert.NotNull(solved.IntervalLow);
        Assert.Null(solved.IntervalHigh);
        Assert.True(solved.WaldHigh > fit.InputMax[0]);
    }

    [Fact]
    public void The_inverse_of_the_fitted_value_at_a_point_is_that_point()
    {
        var fit = Fit(Polynomial.OfDegree(2), x => 1 + (0.3 * x) + (0.05 * x * x), 0.01);
        var y0 = fit.Model.Evaluate(fit.Estimates.AsSpan(), 6.25);

        var solved = InversePrediction.Solve(fit, y0, Level);

        Assert.Equal(6.25, solved.Stimulus, 12);
        Assert.Equal(CurveUse.SensitivityAt(fit, 6.25, Level).Value, solved.Slope, 12);
        Assert.True(solved.IntervalLow < 6.25 && solved.IntervalHigh > 6.25);
    }

    [Fact]
    public void A_weighted_fit_needs_the_new_reading_s_uncertainty_and_an_unweighted_one_refuses_it()
    {
        var weighted = Fit(Polynomial.StraightLine, x => 2 * x, 0.01, [.. Enumerable.Repeat(0.01, 21)]);
        var plain = Fit(Polynomial.StraightLine, x => 2 * x, 0.01);

        Assert.Throws<ArgumentException>(() => CurveUse.BandAt(weighted, 5.0, Level));
        Assert.Throws<ArgumentException>(() => CurveUse.BandAt(plain, 5.0, Level, newReadingUncertainty: 0.01));
        Assert.True(CurveUse.BandAt(weighted, 5.0, Level, newReadingUncertainty: 0.01).PredictionStandardError > 0);
    }

    [Fact]
    public void Equal_uncertainties_give_the_bands_of_the_unweighted_fit()
    {
        // With every u equal to u0, the weights are relative only: s^2 u0^2 and C are those of the ordinary fit.
        var weighted = Fit(Polynomial.StraightLine, x => 2 * x, 0.2, [.. Enumerable.Repeat(0.05, 21)]);
        var plain = Fit(Polynomial.StraightLine, x => 2 * x, 0.2);

        var a = CurveUse.BandAt(weighted, 3.0, Level, newReadingUncertainty: 0.05);
        var b = CurveUse.BandAt(plain, 3.0, Level);

        Assert.Equal(b.PredictionLow, a.PredictionLow, 12);
        Assert.Equal(b.ConfidenceHigh, a.ConfidenceHigh, 12);
    }
}
