using System.Runtime.CompilerServices;

namespace StandFit.Core.Merit;

/// <summary>y = Intercept + Slope x.</summary>
public readonly record struct Line(double Intercept, double Slope)
{
    public double At(double x) => Intercept + (Slope * x);

    /// <summary>The largest |y_i - line(x_i)|.</summary>
    public double MaxDeviation(ReadOnlySpan<double> x, ReadOnlySpan<double> y)
    {
        var max = 0.0;
        for (var i = 0; i < x.Length; i++)
        {
            max = Math.Max(max, Math.Abs(y[i] - At(x[i])));
        }

        return max;
    }
}

/// <summary>The three straight lines a non-linearity figure is taken against.</summary>
public static class StraightLines
{
    /// <summary>The line through the first and last points (the end points of the calibration curve).</summary>
    public static Line Terminal(ReadOnlySpan<double> x, ReadOnlySpan<double> y)
    {
        var last = x.Length - 1;
        var slope = (y[last] - y[0]) / (x[last] - x[0]);
        return new Line(y[0] - (slope * x[0]), slope);
    }

    /// <summary>
    /// The least-squares line. The centred design [1, x - mean(x)] has orthogonal columns, so its QR
    /// factorisation is explicit and the solution is slope = (x - mean)'y / |x - mean|^2 (no normal
    /// equations of the raw design are formed).
    /// </summary>
    public static Line LeastSquares(ReadOnlySpan<double> x, ReadOnlySpan<double> y)
    {
        var n = x.Length;
        double mx = 0, my = 0;
        for (var i = 0; i < n; i++)
        {
            mx += x[i];
            my += y[i];
        }

        mx /= n;
        my /= n;
        double sxy = 0, sxx = 0;
        for (var i = 0; i < n; i++)
        {
            var c = x[i] - mx;
            sxy += c * (y[i] - my);
            sxx += c * c;
        }

        var slope = sxy / sxx;
        return new Line(my - (slope * mx), slope);
    }

    /// <summary>
    /// The minimax (Chebyshev, "independent") line: the line that minimises the largest vertical
    /// deviation, found exactly. For a slope b the smallest band of that slope holding every point
    /// has width W(b) = max(y - b x) - min(y - b x), convex and piecewise linear in b; the maximum is
    /// reached on the upper convex hull and the minimum on the lower one, so W bends only at the
    /// slopes of hull edges, and its minimum is at one of them. The hull slopes are searched (W is
    /// convex), and the line runs down the middle of the band: deviation W/2, reached with alternating
    /// signs at three points (Chebyshev's alternation). <paramref name="x"/> must increase strictly.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public static Line Minimax(ReadOnlySpan<double> x, ReadOnlySpan<double> y)
    {
        var n = x.Length;
        if (n == 2)
        {
            return Terminal(x, y);
        }

        var candidates = new List<double>(2 * n);
        HullSlopes(x, y, upper: true, candidates);
        HullSlopes(x, y, upper: false, candidates);
        candidates.Sort();

        int lo = 0, hi = candidates.Count - 1;
        while (lo < hi)
        {
            var mid = (lo + hi) / 2;
            if (Width(x, y, candidates[mid]) <= Width(x, y, candidates[mid + 1]))
            {
                hi = mid;
            }
            else
            {
                lo = mid + 1;
            }
        }

        // Rounding can make W look flat near its minimum: take the best of the neighbours too.
        var best = lo;
        for (var k = Math.Max(0, lo - 2); k <= Math.Min(candidates.Count - 1, lo + 2); k++)
        {
            if (Width(x, y, candidates[k]) < Width(x, y, candidates[best]))
            {
                best = k;
            }
        }

        var b = candidates[best];
        double max = double.NegativeInfinity, min = double.PositiveInfinity;
        for (var i = 0; i < n; i++)
        {
            var r = y[i] - (b * x[i]);
            max = Math.Max(max, r);
            min = Math.Min(min, r);
        }

        return new Line((max + min) / 2, b);
    }

    private static double Width(ReadOnlySpan<double> x, ReadOnlySpan<double> y, double slope)
    {
        double max = double.NegativeInfinity, min = double.PositiveInfinity;
        for (var i = 0; i < x.Length; i++)
        {
            var r = y[i] - (slope * x[i]);
            max = Math.Max(max, r);
            min = Math.Min(min, r);
        }

        return max - min;
    }

    /// <summary>The edge slopes of the upper (or lower) convex hull of points sorted by x (Andrew's monotone chain).</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static void HullSlopes(ReadOnlySpan<double> x, ReadOnlySpan<double> y, bool upper, List<double> slopes)
    {
        var sign = upper ? 1.0 : -1.0;
        var hull = new int[x.Length];
        var size = 0;
        for (var i = 0; i < x.Length; i++)
        {
            // Drop the last hull point while it lies on or below (above, for the lower hull) the chord to i.
            while (size >= 2)
            {
                int a = hull[size - 2], b = hull[size - 1];
                var cross = ((x[b] - x[a]) * (y[i] - y[a])) - ((y[b] - y[a]) * (x[i] - x[a]));
                if (sign * cross >= 0)
                {
                    size--;
                }
                else
                {
                    break;
                }
            }

            hull[size++] = i;
        }

        for (var k = 1; k < size; k++)
        {
            slopes.Add((y[hull[k]] - y[hull[k - 1]]) / (x[hull[k]] - x[hull[k - 1]]));
        }
    }
}
