using System.Runtime.CompilerServices;

namespace StandFit.Core.Diagnostics;

/// <summary>
/// Lag-1 autocorrelation r1 of the residuals in a given order, as stats::acf defines it:
/// r1 = sum_t (e_t - mean)(e_(t+1) - mean) / sum_t (e_t - mean)^2, and the Ljung-Box statistic at lag 1,
/// Q = n (n + 2) r1^2 / (n - 1), with its chi-square(1) p-value (stats::Box.test, type "Ljung-Box").
/// </summary>
public sealed record AutocorrelationResult(double Lag1, double LjungBoxQ, double P, string Method)
{
    public bool IsApplicable => Method != DiagnosticMethods.NotApplicable;

    public static AutocorrelationResult NotApplicable { get; } = new(double.NaN, double.NaN, double.NaN, DiagnosticMethods.NotApplicable);
}

public static class Autocorrelation
{
    /// <summary>The lag-1 autocorrelation of <paramref name="values"/> taken in <paramref name="order"/> (null: index order).</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public static AutocorrelationResult Lag1(ReadOnlySpan<double> values, int[]? order = null)
    {
        var n = values.Length;
        if (n < 3)
        {
            return AutocorrelationResult.NotApplicable;
        }

        var mean = 0.0;
        foreach (var v in values)
        {
            mean += v;
        }

        mean /= n;
        double sum = 0, lagged = 0;
        var previous = 0.0;
        for (var t = 0; t < n; t++)
        {
            var c = values[order is null ? t : order[t]] - mean;
            sum += c * c;
            if (t > 0)
            {
                lagged += c * previous;
            }

            previous = c;
        }

        if (!(sum > 0))
        {
            return AutocorrelationResult.NotApplicable;
        }

        var r = lagged / sum;
        var q = n * (n + 2.0) * r * r / (n - 1.0);
        return new AutocorrelationResult(r, q, Probability.ChiSquareUpper(q, 1), DiagnosticMethods.ChiSquare);
    }
}
