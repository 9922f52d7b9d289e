using System.Runtime.CompilerServices;

namespace StandFit.Core.Diagnostics;

/// <summary>
/// Sample skewness and excess kurtosis by the moment definitions (the "type 1" estimators, g1 and g2):
/// with central moments m_k = (1/n) sum (x_i - mean)^k, skewness g1 = m3 / m2^(3/2) and excess
/// kurtosis g2 = m4 / m2^2 - 3 (0 for a normal population; the estimators are biased in small samples).
/// </summary>
public sealed record MomentsResult(double Skewness, double ExcessKurtosis)
{
    public bool IsApplicable => double.IsFinite(Skewness);

    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public static MomentsResult Of(ReadOnlySpan<double> values)
    {
        var n = values.Length;
        if (n < 2)
        {
            return new MomentsResult(double.NaN, double.NaN);
        }

        var mean = 0.0;
        foreach (var v in values)
        {
            mean += v;
        }

        mean /= n;
        double m2 = 0, m3 = 0, m4 = 0;
        foreach (var v in values)
        {
            var d = v - mean;
            var d2 = d * d;
            m2 += d2;
            m3 += d2 * d;
            m4 += d2 * d2;
        }

        m2 /= n;
        m3 /= n;
        m4 /= n;
        return m2 > 0 ? new MomentsResult(m3 / Math.Pow(m2, 1.5), (m4 / (m2 * m2)) - 3) : new MomentsResult(double.NaN, double.NaN);
    }
}
