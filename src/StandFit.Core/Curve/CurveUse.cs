using StandFit.Core.Fitting;
using StandFit.Core.Uncertainty;

namespace StandFit.Core.Curve;

/// <summary>The slope of the curve with respect to one input at a point, with its standard error and t interval.</summary>
public sealed record Sensitivity(double Value, double StandardError, double Low, double High);

/// <summary>
/// The curve at one point: the fitted mean response, the standard error of that mean, the
/// standard deviation of a new observation about it, and the two bands at the fit's confidence.
/// </summary>
public sealed record BandPoint(
    double Fitted,
    double MeanStandardError,
    double PredictionStandardError,
    double ConfidenceLow,
    double ConfidenceHigh,
    double PredictionLow,
    double PredictionHigh);

/// <summary>
/// Uses of a fitted curve at chosen stimulus points, each a pure function of an <see cref="IFitResult"/> (a linear fit, or a nonlinear one linearised at its estimates: the delta method):
/// <list type="bullet">
/// <item>sensitivity dy/dx_k = sum_j b_j d f_j / d x_k, with se = sqrt(g' C g), g = (d f_j / d x_k)_j the
/// gradient of the slope with respect to the parameters and C their covariance;</item>
/// <item>confidence band (the mean response): yhat(x0) +/- t se(yhat), se(yhat)^2 = f(x0)' C f(x0);</item>
/// <item>prediction band (a new observation, or the mean of m): yhat(x0) +/- t sqrt(s^2 u0^2 / m + se(yhat)^2),
/// u0 the new reading's standard uncertainty in a weighted fit (its weight is 1/u0^2), 1 when unweighted.</item>
/// </list>
/// t is the two-sided Student-t critical value at the level on the fit's residual degrees of freedom.
/// </summary>
public static class CurveUse
{
    /// <summary>The slope of the curve with respect to input <paramref name="input"/> at the point <paramref name="x"/>.</summary>
    public static Sensitivity SensitivityAt(IFitResult fit, ReadOnlySpan<double> x, ConfidenceLevel level, int input = 0)
    {
        CheckPoint(fit, x);
        Span<double> gradient = stackalloc double[fit.ParameterCount];
        var value = fit.SlopeAt(x, input, gradient);
        var se = Math.Sqrt(QuadraticForm(fit, gradient));
        var t = StudentT.TwoSidedCritical(level, fit.DegreesOfFreedom);
        return new Sensitivity(value, se, value - (t * se), value + (t * se));
    }

    /// <summary>The slope of a curve of one input at stimulus <paramref name="x"/>.</summary>
    public static Sensitivity SensitivityAt(IFitResult fit, double x, ConfidenceLevel level) => SensitivityAt(fit, [x], level);

    /// <summary>
    /// The fitted value and both bands at the point <paramref name="x"/>. A weighted fit needs the
    /// new reading's standard uncertainty <paramref name="newReadingUncertainty"/> (in the units the
    /// fit's uncertainties were given in); an unweighted fit takes none.
    /// </summary>
    public static BandPoint BandAt(IFitResult fit, ReadOnlySpan<double> x, ConfidenceLevel level, double? newReadingUncertainty = null, int observations = 1)
    {
        CheckPoint(fit, x);
        Span<double> basis = stackalloc double[fit.ParameterCount];
        var fitted = fit.ValueAt(x, basis);
        var meanVariance = QuadraticForm(fit, basis);
        var meanSe = Math.Sqrt(meanVariance);
        var predictionSe = Math.Sqrt(NewReadingVariance(fit, newReadingUncertainty, observations) + meanVariance);
        var t = StudentT.TwoSidedCritical(level, fit.DegreesOfFreedom);
        return new BandPoint(fitted, meanSe, predictionSe, fitted - (t * meanSe), fitted + (t * meanSe), fitted - (t * predictionSe), fitted + (t * predictionSe));
    }

    /// <summary>The bands of a curve of one input at stimulus <paramref name="x"/>.</summary>
    public static BandPoint BandAt(IFitResult fit, double x, ConfidenceLevel level, double? newReadingUncertainty = null, int observations = 1) =>
        BandAt(fit, [x], level, newReadingUncertainty, observations);

    /// <summary>s^2 u0^2 / m: the variance of the mean of m new readings about the true curve.</summary>
    internal static double NewReadingVariance(IFitResult fit, double? newReadingUncertainty, int observations)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(observations, 1);
        double scale;
        if (fit.IsWeighted)
        {
            if (newReadingUncertainty is not { } u || !(u > 0) || !double.IsFinite(u))
            {
                throw new ArgumentException("A weighted fit needs the new reading's standard uncertainty (above 0).", nameof(newReadingUncertainty));
            }

            scale = u * u;
        }
        else
        {
            if (newReadingUncertainty is not null)
            {
                throw new ArgumentException("An unweighted fit takes no new-reading uncertainty: the residual SD is the scatter of a reading.", nameof(newReadingUncertainty));
            }

            scale = 1.0;
        }

        return fit.ResidualVariance * scale / observations;
    }

    /// <summary>g' C g with C the fit's covariance.</summary>
    internal static double QuadraticForm(IFitResult fit, ReadOnlySpan<double> g)
    {
        var p = fit.ParameterCount;
        var sum = 0.0;
        for (var i = 0; i < p; i++)
        {
            var row = 0.0;
            for (var j = 0; j < p; j++)
            {
                row += fit.Covariance[(i * p) + j] * g[j];
            }

            sum += g[i] * row;
        }

        return Math.Max(sum, 0.0);
    }

    internal static double Dot(ReadOnlySpan<double> a, ReadOnlySpan<double> b)
    {
        var sum = 0.0;
        for (var j = 0; j < a.Length; j++)
        {
            sum += a[j] * b[j];
        }

        return sum;
    }

    private static void CheckPoint(IFitResult fit, ReadOnlySpan<double> x)
    {
        if (x.Length != fit.InputCount)
        {
            throw new ArgumentException("A point needs one value per input of the model.", nameof(x));
        }
    }
}
