using MathNet.Numerics;

namespace StandFit.Core.Diagnostics;

/// <summary>
/// The tail probabilities the diagnostics need, from MathNet's regularised special functions:
/// the normal distribution (and its logarithm far into the tails), F and chi-square upper tails.
/// </summary>
internal static class Probability
{
    private const double Sqrt2 = 1.4142135623730951;
    private const double HalfLogTwoPi = 0.91893853320467274;

    /// <summary>Phi(z), the standard normal distribution function.</summary>
    public static double NormalCdf(double z) => 0.5 * SpecialFunctions.Erfc(-z / Sqrt2);

    /// <summary>1 - Phi(z), without cancellation for large z.</summary>
    public static double NormalUpper(double z) => 0.5 * SpecialFunctions.Erfc(z / Sqrt2);

    /// <summary>ln Phi(z), accurate in both tails (log1p for z &gt; 0; the asymptotic series below -37, where erfc underflows).</summary>
    public static double LogNormalCdf(double z)
    {
        if (z > 0)
        {
            return LogOnePlus(-NormalUpper(z));
        }

        if (z > -37)
        {
            return Math.Log(NormalCdf(z));
        }

        // Mills ratio: Phi(z) = phi(z) / |z| (1 - 1/z^2 + 3/z^4 - 15/z^6 ...).
        var r = 1.0 / (z * z);
        return (-0.5 * z * z) - HalfLogTwoPi - Math.Log(-z) + LogOnePlus(-r + (3 * r * r) - (15 * r * r * r));
    }

    /// <summary>ln Phi(z) and ln Phi(-z) from one tail probability: the same values as <see cref="LogNormalCdf"/> of z and of -z.</summary>
    public static (double Lower, double Upper) LogNormalCdfBoth(double z)
    {
        // q = Phi(-|z|), the smaller tail; the other is 1 - q, taken as log1p(-q).
        var q = NormalUpper(Math.Abs(z));
        var small = -Math.Abs(z) > -37 ? Math.Log(q) : LogNormalCdf(-Math.Abs(z));
        var large = LogOnePlus(-q);
        return z > 0 ? (large, small) : z < 0 ? (small, large) : (Math.Log(q), Math.Log(q));
    }

    /// <summary>The standard normal quantile Phi^-1(p), 0 &lt; p &lt; 1.</summary>
    public static double NormalQuantile(double p) => -Sqrt2 * SpecialFunctions.ErfcInv(2.0 * p);

    /// <summary>P(F(d1, d2) &gt; f): the regularised incomplete beta I_{d2/(d2 + d1 f)}(d2/2, d1/2).</summary>
    public static double FUpper(double f, double d1, double d2)
    {
        if (double.IsNaN(f))
        {
            return double.NaN;
        }

        if (f <= 0)
        {
            return 1.0;
        }

        if (double.IsPositiveInfinity(f))
        {
            return 0.0;
        }

        var x = d2 / (d2 + (d1 * f));
        return Math.Clamp(SpecialFunctions.BetaRegularized(d2 / 2, d1 / 2, x), 0.0, 1.0);
    }

    /// <summary>P(chi-square(df) &gt; x): the regularised upper incomplete gamma Q(df/2, x/2).</summary>
    public static double ChiSquareUpper(double x, double df)
    {
        if (double.IsNaN(x))
        {
            return double.NaN;
        }

        return x <= 0 ? 1.0 : Math.Clamp(SpecialFunctions.GammaUpperRegularized(df / 2, x / 2), 0.0, 1.0);
    }

    /// <summary>ln(1 + x) without cancellation for small x.</summary>
    public static double LogOnePlus(double x)
    {
        var u = 1.0 + x;
        return u == 1.0 ? x : Math.Log(u) * x / (u - 1.0);
    }
}
