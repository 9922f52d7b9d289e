namespace StandFit.Core.Curve;

/// <summary>A curve's gap f(x) - y0 and its slope f'(x), for <see cref="InverseRoot.Refine{TCurve}(ref TCurve, double, double, double)"/>.</summary>
public interface IGapCurve
{
    /// <summary>f(x) - y0.</summary>
    double Gap(double x);

    /// <summary>f'(x).</summary>
    double Slope(double x);
}

/// <summary>
/// The rule by which an inverse prediction finds its root, shared by the full-data figure
/// (<see cref="InversePrediction"/>) and every jackknife deletion and bootstrap resample
/// (<c>LinearResampler</c>, <c>NonlinearResampler</c>), so that a resample's root is found exactly as the
/// unit's own. The calibrated range [lo, hi] is scanned at <see cref="ScanSteps"/> + 1 equally spaced
/// grid points; a step (x_{k-1}, x_k) holds a root when g(x_k) = 0, or when g(x_{k-1}) is not 0 and
/// the two differ in sign (and x_0 holds one when g(x_0) = 0): a root that lies exactly on a grid
/// point is counted once. The curve gives y0 at exactly one stimulus when exactly one step holds a
/// root; none is <see cref="InverseStatus.OutsideRange"/>, several <see cref="InverseStatus.NotMonotonic"/>.
/// The root is then refined inside its step by a safeguarded Newton iteration (Newton steps from a
/// start point, each kept only inside the bracket that the signs so far leave, bisection otherwise)
/// to full double precision. Nothing here allocates.
/// </summary>
public static class InverseRoot
{
    /// <summary>The number of equal steps the calibrated range is scanned in.</summary>
    public const int ScanSteps = 512;

    /// <summary>Most iterations of <see cref="Refine{TCurve}(ref TCurve, double, double, double)"/>; bisection alone needs at most about 64 on a step of the grid.</summary>
    public const int MaxIterations = 200;

    /// <summary>Grid point i (0 .. <see cref="ScanSteps"/>) of the range [lo, hi]; the last is hi exactly.</summary>
    public static double GridPoint(double lo, double hi, int i) => i == ScanSteps ? hi : lo + ((hi - lo) * i / ScanSteps);

    /// <summary>True when the step from a grid point with gap <paramref name="previous"/> to the next, with gap <paramref name="current"/>, holds a root.</summary>
    public static bool Crosses(double previous, double current) =>
        current == 0 || (previous != 0 && Math.Sign(current) != Math.Sign(previous));

    /// <summary>
    /// The steps of the grid that hold a root, from the gaps at the <see cref="ScanSteps"/> + 1 grid
    /// points; <paramref name="step"/> is the first: k for the step (x_{k-1}, x_k), 0 for a root on
    /// x_0. A NaN gap never crosses (Math.Sign of NaN throws, so it is tested first).
    /// </summary>
    public static int CountRoots(ReadOnlySpan<double> gaps, out int step)
    {
        step = -1;
        var count = 0;
        if (gaps[0] == 0)
        {
            step = 0;
            count = 1;
        }

        for (var k = 1; k < gaps.Length; k++)
        {
            if (StepCrosses(gaps[k - 1], gaps[k]))
            {
                if (count == 0)
                {
                    step = k;
                }

                count++;
            }
        }

        return count;
    }

    /// <summary><see cref="Crosses"/>, false when either gap is NaN (no sign to compare).</summary>
    public static bool StepCrosses(double previous, double current) =>
        !double.IsNaN(previous) && !double.IsNaN(current) && Crosses(previous, current);

    /// <summary>
    /// The status of a root count: one is <see cref="InverseStatus.Solved"/>, none
    /// <see cref="InverseStatus.OutsideRange"/>, several <see cref="InverseStatus.NotMonotonic"/>.
    /// </summary>
    public static InverseStatus StatusOf(int roots) => roots switch
    {
        1 => InverseStatus.Solved,
        0 => InverseStatus.OutsideRange,
        _ => InverseStatus.NotMonotonic,
    };

    /// <summary>
    /// The root of the curve's gap in [a, b], where g(a) and g(b) differ in sign or one of them is 0,
    /// to full precision: a safeguarded Newton iteration from <paramref name="start"/> (the midpoint
    /// when it is not inside (a, b)). Each iteration evaluates g and f' at x, keeps the half of the
    /// bracket where the sign changes, and takes the Newton step x - g/f' when it lands strictly
    /// inside the bracket and is at most half the step before it; otherwise it bisects. It stops when
    /// g(x) = 0, when a step is within 2 ulp of x, or when the bracket is two adjacent doubles. NaN
    /// when g is not finite inside the bracket.
    /// </summary>
    public static double Refine<TCurve>(ref TCurve curve, double a, double b, double start)
        where TCurve : struct, IGapCurve
    {
        return Refine(ref curve, a, curve.Gap(a), b, a == b ? double.NaN : curve.Gap(b), start);
    }

    /// <summary>
    /// <see cref="Refine{TCurve}(ref TCurve, double, double, double)"/> with the gaps at the bracket's
    /// ends already known, or any values of the same sign (0 only where the gap is 0): only their
    /// signs are used.
    /// </summary>
    public static double Refine<TCurve>(ref TCurve curve, double a, double fa, double b, double fb, double start)
        where TCurve : struct, IGapCurve
    {
        if (fa == 0)
        {
            return a;
        }

        if (a == b)
        {
            return double.NaN;
        }

        if (fb == 0)
        {
            return b;
        }

        var x = start > a && start < b ? start : a + ((b - a) / 2);
        var previousStep = 2 * (b - a);
        for (var i = 0; i < MaxIterations; i++)
        {
            var fx = curve.Gap(x);
            if (fx == 0)
            {
                return x;
            }

            if (!double.IsFinite(fx))
            {
                return double.NaN;
            }

            if (Math.Sign(fx) == Math.Sign(fa))
            {
                (a, fa) = (x, fx);
            }
            else
            {
                b = x;
            }

            var next = x - (fx / curve.Slope(x));
            if (next == x)
            {
                return x;
            }

            if (!(next > a && next < b) || Math.Abs(next - x) > 0.5 * previousStep)
            {
                next = a + ((b - a) / 2);
                if (next == a || next == b)
                {
                    return x;
                }
            }

            var step = Math.Abs(next - x);
            if (step <= 4.440892098500626E-16 * Math.Abs(x))
            {
                return next;
            }

            previousStep = step;
            x = next;
        }

        return x;
    }
}
