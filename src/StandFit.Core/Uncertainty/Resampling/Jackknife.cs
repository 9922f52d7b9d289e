using System.Collections.Immutable;

namespace StandFit.Core.Uncertainty.Resampling;

/// <summary>
/// The jackknife of one figure (Efron and Tibshirani 1993, chapter 11; for groups, the delete-d
/// jackknife with disjoint groups of chapter 11.7): from the estimate on all data and the estimates
/// with each point (or group) left out.
/// </summary>
/// <param name="Estimate">theta_hat, the estimate on all the data.</param>
/// <param name="Mean">theta_dot, the mean of the leave-out estimates.</param>
/// <param name="BiasCorrected">g theta_hat - (g - 1) theta_dot.</param>
/// <param name="Bias">(g - 1)(theta_dot - theta_hat).</param>
/// <param name="StandardError">sqrt((g - 1)/g sum (theta_(i) - theta_dot)^2).</param>
/// <param name="Influence">Empirical influence values (g - 1)(theta_dot - theta_(i)), one per leave-out (the <c>empinf(type = "jack")</c> of R's boot package).</param>
/// <param name="Deletions">g: the number of leave-outs (points or groups).</param>
public sealed record JackknifeSummary(double Estimate, double Mean, double BiasCorrected, double Bias, double StandardError, ImmutableArray<double> Influence, int Deletions)
{
    /// <summary>The BCa acceleration sum(L^3) / (6 (sum L^2)^(3/2)) from the influence values L (Efron and Tibshirani 1993, eq. 14.15).</summary>
    public double Acceleration => Jackknife.Acceleration(Influence.AsSpan());
}

public static class Jackknife
{
    /// <summary>Summarises the leave-out estimates <paramref name="leaveOut"/> (at least two) of a figure whose full-data estimate is <paramref name="estimate"/>.</summary>
    public static JackknifeSummary Summarise(double estimate, ReadOnlySpan<double> leaveOut)
    {
        var g = leaveOut.Length;
        ArgumentOutOfRangeException.ThrowIfLessThan(g, 2, nameof(leaveOut));
        var mean = 0.0;
        foreach (var v in leaveOut)
        {
            mean += v;
        }

        mean /= g;
        var sum2 = 0.0;
        var influence = new double[g];
        for (var i = 0; i < g; i++)
        {
            var d = leaveOut[i] - mean;
            sum2 += d * d;
            influence[i] = (g - 1) * (mean - leaveOut[i]);
        }

        var se = Math.Sqrt((g - 1) * sum2 / g);
        var bias = (g - 1) * (mean - estimate);
        var corrected = (g * estimate) - ((g - 1) * mean);
        return new JackknifeSummary(estimate, mean, corrected, bias, se, [.. influence], g);
    }

    /// <summary>sum(L^3) / (6 (sum L^2)^(3/2)); 0 when every L is 0.</summary>
    public static double Acceleration(ReadOnlySpan<double> influence)
    {
        double s2 = 0, s3 = 0;
        foreach (var l in influence)
        {
            s2 += l * l;
            s3 += l * l * l;
        }

        return s2 > 0 ? s3 / (6 * Math.Pow(s2, 1.5)) : 0.0;
    }
}
