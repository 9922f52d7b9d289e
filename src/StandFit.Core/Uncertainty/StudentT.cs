using System.Collections.Concurrent;
using MathNet.Numerics;

namespace StandFit.Core.Uncertainty;

/// <summary>
/// Student-t tail probabilities and critical values. Tails come from the regularised incomplete beta
/// function, P(|T| &gt; t) = I_{df/(df+t^2)}(df/2, 1/2), which stays accurate far into the tails;
/// critical values invert it by bisection to full double precision and are cached per (df, level).
/// </summary>
public static class StudentT
{
    private static readonly ConcurrentDictionary<(int, double), double> Critical = new();

    /// <summary>Two-sided p-value of a t statistic on <paramref name="df"/> degrees of freedom (df &gt;= 1).</summary>
    public static double TwoSidedPValue(double t, int df)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(df, 1);
        if (double.IsNaN(t))
        {
            return double.NaN;
        }

        if (double.IsInfinity(t))
        {
            return 0.0;
        }

        var x = df / (df + (t * t));
        return Math.Clamp(SpecialFunctions.BetaRegularized(df / 2.0, 0.5, x), 0.0, 1.0);
    }

    /// <summary>The t value with two-sided tail probability 1 - level: 2.228 for 95 % on 10 df.</summary>
    public static double TwoSidedCritical(ConfidenceLevel level, int df)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(df, 1);
        return Critical.GetOrAdd((df, level.Value), static key => Solve(key.Item2, key.Item1));
    }

    /// <summary>The normal two-sided critical value (the t value for infinite df): 1.960 for 95 %.</summary>
    public static double NormalTwoSidedCritical(ConfidenceLevel level) =>
        MathNet.Numerics.Distributions.Normal.InvCDF(0, 1, 1 - (level.Alpha / 2));

    private static double Solve(double level, int df)
    {
        // Find x in (0, 1) with I_x(df/2, 1/2) = alpha; I is increasing in x and t = sqrt(df (1 - x) / x).
        var alpha = 1.0 - level;
        double lo = 0.0, hi = 1.0;
        for (var i = 0; i < 200 && hi - lo > 0; i++)
        {
            var mid = 0.5 * (lo + hi);
            if (mid == lo || mid == hi)
            {
                break;
            }

            if (SpecialFunctions.BetaRegularized(df / 2.0, 0.5, mid) < alpha)
            {
                lo = mid;
            }
            else
            {
                hi = mid;
            }
        }

        var xRoot = 0.5 * (lo + hi);
        return Math.Sqrt(df * (1 - xRoot) / xRoot);
    }
}
