using System.Collections.Concurrent;
using System.Runtime.CompilerServices;

namespace StandFit.Core.Diagnostics;

/// <summary>The Shapiro-Wilk W and its p-value (small W: not normal).</summary>
public sealed record ShapiroWilkResult(double W, double P, string Method)
{
    public bool IsApplicable => Method != DiagnosticMethods.NotApplicable;

    public static ShapiroWilkResult NotApplicable { get; } = new(double.NaN, double.NaN, DiagnosticMethods.NotApplicable);
}

/// <summary>
/// The Shapiro-Wilk test for 3 &lt;= n &lt;= 5000, by Royston's algorithm (Royston 1992, and Remark
/// AS R94, Applied Statistics 44 (1995) 547-551): coefficients from the normal scores
/// m_i = Phi^-1((i - 3/8) / (n + 1/4)), the two outermost corrected by Royston's polynomials in
/// u = n^-1/2, the rest m_i / sqrt(phi); W is the squared correlation of the coefficients with the
/// ordered sample; p from Royston's normalising transformations of ln(1 - W) (n &gt;= 12) or
/// -ln(gamma - ln(1 - W)) (4 &lt;= n &lt;= 11), and exactly for n = 3. The coefficients depend on n
/// only and are cached. Checked against stats::shapiro.test.
/// </summary>
public static class ShapiroWilk
{
    public const int MinCount = 3;
    public const int MaxCount = 5000;

    // Royston (1995): a_n and a_(n-1) corrections, polynomials in u = 1/sqrt(n), constant term first.
    private static readonly double[] LastCoefficient = [0.0, 0.221157, -0.147981, -2.071190, 4.434685, -2.706056];
    private static readonly double[] NextToLastCoefficient = [0.0, 0.042981, -0.293762, -1.752461, 5.682633, -3.582633];

    // p-value: 4 <= n <= 11, polynomials in n; n >= 12, polynomials in ln n.
    private static readonly double[] SmallGamma = [-2.273, 0.459];
    private static readonly double[] SmallMean = [0.5440, -0.39978, 0.025054, -6.714e-4];
    private static readonly double[] SmallLogSd = [1.3822, -0.77857, 0.062767, -0.0020322];
    private static readonly double[] LargeMean = [-1.5861, -0.31082, -0.083751, 0.0038915];
    private static readonly double[] LargeLogSd = [-0.4803, -0.082676, 0.0030302];

    private static readonly ConcurrentDictionary<int, double[]> Coefficients = new();

    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public static ShapiroWilkResult Compute(ReadOnlySpan<double> values)
    {
        var n = values.Length;
        if (n is < MinCount or > MaxCount)
        {
            return ShapiroWilkResult.NotApplicable;
        }

        Span<double> x = n <= 512 ? stackalloc double[n] : new double[n];
        values.CopyTo(x);
        x.Sort();
        var range = x[n - 1] - x[0];
        if (!(range > 0) || !double.IsFinite(range))
        {
            return ShapiroWilkResult.NotApplicable;
        }

        // W as the squared correlation of the antisymmetric coefficients with x / range.
        var a = Coefficients.GetOrAdd(n, Build);
        double mean = 0;
        for (var i = 0; i < n; i++)
        {
            mean += x[i] / range;
        }

        mean /= n;
        double saa = 0, sxx = 0, sax = 0;
        for (var i = 0; i < n; i++)
        {
            var j = n - 1 - i;
            var ai = i < j ? -a[i] : i > j ? a[j] : 0.0;
            var xi = (x[i] / range) - mean;
            saa += ai * ai;
            sxx += xi * xi;
            sax += ai * xi;
        }

        var root = Math.Sqrt(saa * sxx);
        var oneMinusW = (root - sax) * (root + sax) / (saa * sxx);
        var w = 1.0 - oneMinusW;
        return new ShapiroWilkResult(w, PValue(w, oneMinusW, n), DiagnosticMethods.Royston);
    }

    private static double PValue(double w, double oneMinusW, int n)
    {
        if (n == 3)
        {
            // Exact: P = (6 / pi) (asin(sqrt(W)) - asin(sqrt(3/4))), W in [3/4, 1].
            return Math.Clamp(6.0 / Math.PI * (Math.Asin(Math.Sqrt(Math.Min(w, 1.0))) - (Math.PI / 3)), 0.0, 1.0);
        }

        if (!(oneMinusW > 0))
        {
            return 1.0;
        }

        var y = Math.Log(oneMinusW);
        double mean, sd;
        if (n <= 11)
        {
            var gamma = Polynomial(SmallGamma, n);
            if (y >= gamma)
            {
                return 0.0; // beyond the transformation's range: W far too small
            }

            y = -Math.Log(gamma - y);
            mean = Polynomial(SmallMean, n);
            sd = Math.Exp(Polynomial(SmallLogSd, n));
        }
        else
        {
            var ln = Math.Log(n);
            mean = Polynomial(LargeMean, ln);
            sd = Math.Exp(Polynomial(LargeLogSd, ln));
        }

        return Probability.NormalUpper((y - mean) / sd);
    }

    /// <summary>The coefficients a_n, a_(n-1), ... of the upper half, largest first (a[0] = a_n).</summary>
    private static double[] Build(int n)
    {
        var half = n / 2;
        var a = new double[half];
        if (n == 3)
        {
            a[0] = Math.Sqrt(0.5);
            return a;
        }

        // Upper-half normal scores, largest first: m[k] = Phi^-1((n - k - 3/8) / (n + 1/4)).
        var m = new double[half];
        var sum2 = 0.0;
        for (var k = 0; k < half; k++)
        {
            m[k] = -Probability.NormalQuantile((k + 1 - 0.375) / (n + 0.25));
            sum2 += m[k] * m[k];
        }

        sum2 *= 2;
        var norm = Math.Sqrt(sum2);
        var u = 1.0 / Math.Sqrt(n);
        var last = (m[0] / norm) + Polynomial(LastCoefficient, u);
        int first;
        double phi;
        if (n > 5)
        {
            var nextToLast = (m[1] / norm) + Polynomial(NextToLastCoefficient, u);
            phi = (sum2 - (2 * m[0] * m[0]) - (2 * m[1] * m[1])) / (1 - (2 * last * last) - (2 * nextToLast * nextToLast));
            a[1] = nextToLast;
            first = 2;
        }
        else
        {
            phi = (sum2 - (2 * m[0] * m[0])) / (1 - (2 * last * last));
            first = 1;
        }

        a[0] = last;
        var scale = Math.Sqrt(phi);
        for (var k = first; k < half; k++)
        {
            a[k] = m[k] / scale;
        }

        return a;
    }

    private static double Polynomial(double[] c, double x)
    {
        var sum = 0.0;
        for (var k = c.Length - 1; k >= 0; k--)
        {
            sum = (sum * x) + c[k];
        }

        return sum;
    }
}
