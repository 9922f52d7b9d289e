using System.Collections.Immutable;
using StandFit.Core.Fitting;
using StandFit.Core.Uncertainty;

namespace StandFit.Core.Curve;

/// <summary>The outcome of solving f(x) = y0 on the calibrated range.</summary>
public enum InverseStatus
{
    /// <summary>One stimulus in the calibrated range gives the response.</summary>
    Solved,

    /// <summary>No stimulus in the calibrated range gives the response: it lies beyond the curve's ends.</summary>
    OutsideRange,

    /// <summary>More than one stimulus in the calibrated range gives the response: the curve is not monotonic there.</summary>
    NotMonotonic,
}

/// <summary>
/// Which stimulus gives the response y0, with its uncertainty: the estimate x0, the slope f'(x0), the
/// standard error by the calibration formula s_x0 = sqrt(s^2 u0^2 / m + se(yhat(x0))^2) / |f'(x0)|
/// (delta method, including the variance of the new reading or the mean of m), the Wald interval
/// x0 +/- t s_x0, and the inverse (Fieller-type) interval: every x in the calibrated range where y0
/// lies inside the prediction band of the mean of m new readings. An end of that interval that does
/// not close inside the calibrated range is null.
/// </summary>
public sealed record InverseEstimate(
    InverseStatus Status,
    double Response,
    double Stimulus,
    double Slope,
    double StandardError,
    double WaldLow,
    double WaldHigh,
    double? IntervalLow,
    double? IntervalHigh);

/// <summary>
/// Inverse prediction: solves f(x) = y0 on the fitted curve within the calibrated range of one input
/// (the other inputs held at given values), by the rule of <see cref="InverseRoot"/> (a scan of the
/// range for the one step that holds a root, then a safeguarded Newton iteration to full precision;
/// the resamplers find each resample's root the same way), and gives its uncertainty (see <see cref="InverseEstimate"/>). For a model that
/// fits a transform of the output (Steinhart-Hart fits 1/T), y0 is on the fitted response's scale.
/// </summary>
public static class InversePrediction
{
    /// <summary>The number of equal steps the calibrated range is scanned in for sign changes.</summary>
    public const int ScanSteps = InverseRoot.ScanSteps;

    /// <summary>
    /// The stimulus of input <paramref name="input"/> that gives <paramref name="response"/>; for a
    /// model of several inputs, <paramref name="at"/> holds the other inputs' values (its entry for
    /// <paramref name="input"/> is ignored). <paramref name="observations"/> is m, the number of new
    /// readings averaged into the response; <paramref name="newReadingUncertainty"/> their standard
    /// uncertainty for a weighted fit (none for an unweighted one).
    /// </summary>
    public static InverseEstimate Solve(
        IFitResult fit,
        double response,
        ConfidenceLevel level,
        int observations = 1,
        double? newReadingUncertainty = null,
        int input = 0,
        ImmutableArray<double> at = default)
    {
        var m = fit.InputCount;
        if (m > 1 && (at.IsDefault || at.Length != m))
        {
            throw new ArgumentException("A model of several inputs needs the other inputs' values.", nameof(at));
        }

        var point = m == 1 ? new double[1] : at.ToArray();
        var lo = fit.InputMin[input];
        var hi = fit.InputMax[input];
        var newVariance = CurveUse.NewReadingVariance(fit, newReadingUncertainty, observations);
        var t = StudentT.TwoSidedCritical(level, fit.DegreesOfFreedom);

        double Gap(double x) => Value(fit, point, input, x) - response;

        // The root rule shared with the resamplers (InverseRoot): one step of the grid holds a root.
        var grid = Grid(lo, hi);
        var (status, x0) = Root(fit, point, input, response, grid);
        if (status != InverseStatus.Solved)
        {
            return new InverseEstimate(status, response, double.NaN, double.NaN, double.NaN, double.NaN, double.NaN, null, null);
        }

        point[input] = x0;
        Span<double> unused = stackalloc double[fit.ParameterCount];
        var slope = fit.SlopeAt(point, input, unused);
        var meanVariance = MeanVariance(fit, point);
        var se = Math.Sqrt(newVariance + meanVariance) / Math.Abs(slope);

        // The inverse interval: where (f(x) - y0)^2 <= t^2 (s^2 u0^2 / m + se(yhat(x))^2).
        double Outside(double x)
        {
            var gap = Gap(x);
            point[input] = x;
            return (gap * gap) - (t * t * (newVariance + MeanVariance(fit, point)));
        }

        var low = Edge(Outside, x0, grid.Where(g => g < x0).Reverse());
        var high = Edge(Outside, x0, grid.Where(g => g > x0));
        return new InverseEstimate(InverseStatus.Solved, response, x0, slope, se, x0 - (t * se), x0 + (t * se), low, high);
    }

    /// <summary>
    /// The stimulus alone (no uncertainty) at which a fitted curve of one input gives
    /// <paramref name="response"/>, by the rule of <see cref="InverseRoot"/>: what
    /// <see cref="Solve"/> gives as <see cref="InverseEstimate.Stimulus"/>, and what the resamplers
    /// start every resample's root from.
    /// </summary>
    public static (InverseStatus Status, double Stimulus) RootOf(IFitResult fit, double response)
    {
        ArgumentNullException.ThrowIfNull(fit);
        if (fit.InputCount != 1)
        {
            throw new ArgumentException("The root alone is for a model of one input.", nameof(fit));
        }

        return Root(fit, new double[1], 0, response, Grid(fit.InputMin[0], fit.InputMax[0]));
    }

    private static (InverseStatus Status, double Stimulus) Root(IFitResult fit, double[] point, int input, double response, double[] grid)
    {
        var gaps = new double[grid.Length];
        for (var i = 0; i < grid.Length; i++)
        {
            gaps[i] = Value(fit, point, input, grid[i]) - response;
        }

        var roots = InverseRoot.CountRoots(gaps, out var step);
        if (roots != 1)
        {
            return (InverseRoot.StatusOf(roots), double.NaN);
        }

        var curve = new FitCurve(fit, point, input, response);
        var a = grid[Math.Max(step - 1, 0)];
        var b = grid[step];
        return (InverseStatus.Solved, InverseRoot.Refine(ref curve, a, b, a + ((b - a) / 2)));
    }

    private static double Value(IFitResult fit, double[] point, int input, double x)
    {
        point[input] = x;
        Span<double> gradient = stackalloc double[fit.ParameterCount];
        return fit.ValueAt(point, gradient);
    }

    private static double MeanVariance(IFitResult fit, double[] point)
    {
        Span<double> basis = stackalloc double[fit.ParameterCount];
        fit.ValueAt(point, basis);
        return CurveUse.QuadraticForm(fit, basis);
    }

    private static double[] Grid(double lo, double hi)
    {
        var grid = new double[ScanSteps + 1];
        for (var i = 0; i <= ScanSteps; i++)
        {
            grid[i] = InverseRoot.GridPoint(lo, hi, i);
        }

        return grid;
    }

    /// <summary>The first place, walking from x0 along <paramref name="steps"/>, where <paramref name="outside"/> turns non-negative; null if it never does.</summary>
    private static double? Edge(Func<double, double> outside, double x0, IEnumerable<double> steps)
    {
        var inner = x0;
        foreach (var x in steps)
        {
            if (outside(x) >= 0)
            {
                return Bisect(outside, inner, x);
            }

            inner = x;
        }

        return null;
    }

    /// <summary>A root of f between a and b, where f(a) and f(b) differ in sign (or one is 0), to the last bit.</summary>
    private static double Bisect(Func<double, double> f, double a, double b)
    {
        var fa = f(a);
        if (fa == 0)
        {
            return a;
        }

        if (f(b) == 0)
        {
            return b;
        }

        for (var i = 0; i < 200; i++)
        {
            var mid = a + ((b - a) / 2);
            if (mid == a || mid == b)
            {
                break;
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

        return a + ((b - a) / 2);
    }

    /// <summary>The fitted curve's gap f(x) - y0 along one input, the others held.</summary>
    private readonly struct FitCurve(IFitResult fit, double[] point, int input, double response) : IGapCurve
    {
        public double Gap(double x) => Value(fit, point, input, x) - response;

        public double Slope(double x)
        {
            point[input] = x;
            Span<double> unused = stackalloc double[fit.ParameterCount];
            return fit.SlopeAt(point, input, unused);
        }
    }
}
