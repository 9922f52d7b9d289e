using System.Runtime.CompilerServices;

namespace StandFit.Core.Diagnostics;

/// <summary>
/// The Anderson-Darling statistic A2 for normality with mean and variance estimated, Stephens'
/// modified A* = A2 (1 + 0.75/n + 2.25/n^2) and its p-value.
/// </summary>
public sealed record AndersonDarlingResult(double A2, double AStar, double P, string Method)
{
    public bool IsApplicable => Method != DiagnosticMethods.NotApplicable;

    public static AndersonDarlingResult NotApplicable { get; } = new(double.NaN, double.NaN, double.NaN, DiagnosticMethods.NotApplicable);
}

/// <summary>
/// A2 = -n - (1/n) sum (2i - 1) [ln p_i + ln(1 - p_(n+1-i))], p_i = Phi((x_(i) - mean) / s), s the
/// sample SD (n - 1); ln(1 - p) is taken as ln Phi(-z), so neither tail cancels. The p-value curve of
/// A* is Stephens' (D'Agostino and Stephens 1986, Goodness-of-Fit Techniques), as trade-reference.md
/// quotes it and nortest::ad.test uses it (with its floor 3.7e-24 at A* &gt;= 10). n &gt;= 8, as
/// nortest requires.
/// </summary>
public static class AndersonDarling
{
    public const int MinCount = 8;

    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public static AndersonDarlingResult Compute(ReadOnlySpan<double> values)
    {
        var n = values.Length;
        if (n < MinCount)
        {
            return AndersonDarlingResult.NotApplicable;
        }

        Span<double> x = n <= 512 ? stackalloc double[n] : new double[n];
        values.CopyTo(x);
        x.Sort();
        var mean = 0.0;
        foreach (var v in x)
        {
            mean += v;
        }

        mean /= n;
        var ss = 0.0;
        foreach (var v in x)
        {
            ss += (v - mean) * (v - mean);
        }

        var sd = Math.Sqrt(ss / (n - 1));
        if (!(sd > 0))
        {
            return AndersonDarlingResult.NotApplicable;
        }

        // ln p_i and ln(1 - p_i) = ln Phi(-z_i) of each point from one tail probability.
        Span<double> logLower = n <= 512 ? stackalloc double[n] : new double[n];
        Span<double> logUpper = n <= 512 ? stackalloc double[n] : new double[n];
        for (var i = 0; i < n; i++)
        {
            (logLower[i], logUpper[i]) = Probability.LogNormalCdfBoth((x[i] - mean) / sd);
        }

        var sum = 0.0;
        for (var i = 0; i < n; i++)
        {
            sum += ((2.0 * (i + 1)) - 1) * (logLower[i] + logUpper[n - 1 - i]);
        }

        var a2 = -n - (sum / n);
        var aStar = a2 * (1 + (0.75 / n) + (2.25 / ((double)n * n)));
        return new AndersonDarlingResult(a2, aStar, PValue(aStar), DiagnosticMethods.Stephens);
    }

    /// <summary>Stephens' p-value curve for the modified statistic A*.</summary>
    public static double PValue(double aStar) => aStar switch
    {
        < 0.2 => 1 - Math.Exp(-13.436 + (101.14 * aStar) - (223.73 * aStar * aStar)),
        < 0.34 => 1 - Math.Exp(-8.318 + (42.796 * aStar) - (59.938 * aStar * aStar)),
        < 0.6 => Math.Exp(0.9177 - (4.279 * aStar) - (1.38 * aStar * aStar)),
        < 10 => Math.Exp(1.2937 - (5.709 * aStar) + (0.0186 * aStar * aStar)),
        _ => 3.7e-24,
    };
}
