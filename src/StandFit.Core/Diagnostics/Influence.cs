using System.Collections.Immutable;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using StandFit.Core.Fitting;
using StandFit.Core.Uncertainty;

namespace StandFit.Core.Diagnostics;

/// <summary>
/// Per-point diagnostics of a fit, in acquisition order, as R's stats package defines them:
/// leverage h_i (hatvalues), internally studentised residuals e_i / (s sqrt(1 - h_i)) (rstandard),
/// externally studentised residuals e_i / (s_(i) sqrt(1 - h_i)) with
/// s_(i)^2 = (RSS - e_i^2 / (1 - h_i)) / (df - 1) (rstudent), and Cook's distance
/// e_i^2 h_i / (p s^2 (1 - h_i)^2) (cooks.distance). A point with h_i = 1 (it alone fixes a
/// parameter) has NaN for all but its leverage.
/// </summary>
public sealed record PointDiagnostics(ImmutableArray<double> Leverage, ImmutableArray<double> Standardized, ImmutableArray<double> Studentized, ImmutableArray<double> CooksDistance)
{
    /// <summary>The largest finite value, or NaN.</summary>
    public static double MaxFinite(ImmutableArray<double> values)
    {
        var max = double.NaN;
        foreach (var v in values)
        {
            if (double.IsFinite(v) && !(v <= max))
            {
                max = v;
            }
        }

        return max;
    }
}

/// <summary>
/// The Bonferroni outlier test: the largest |rstudent| (at point <see cref="Index"/>, 0-based in
/// acquisition order) against Student t on df - 1 = n - p - 1 degrees of freedom, two-sided, with
/// the Bonferroni-adjusted p = min(1, n * p) (as car::outlierTest reports it).
/// </summary>
public sealed record OutlierTestResult(int Index, double MaxAbsStudentized, int Df, double UnadjustedP, double P, string Method)
{
    public bool IsApplicable => Method != DiagnosticMethods.NotApplicable;

    public static OutlierTestResult NotApplicable { get; } = new(-1, double.NaN, 0, double.NaN, double.NaN, DiagnosticMethods.NotApplicable);
}

public static class Influence
{
    /// <summary>Leverage below 1 by less than this is taken as 1.</summary>
    private const double LeverageOne = 1e-10;

    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public static PointDiagnostics Points(IFitResult fit)
    {
        var n = fit.Count;
        var p = fit.ParameterCount;
        var df = fit.DegreesOfFreedom;
        var rss = fit.ResidualSumOfSquares;
        var s2 = fit.ResidualVariance;
        var standardized = new double[n];
        var studentized = new double[n];
        var cooks = new double[n];
        for (var i = 0; i < n; i++)
        {
            var h = fit.Leverage[i];
            var e = fit.WeightedResiduals[i];
            var oneMinusH = 1.0 - h;
            if (!(oneMinusH > LeverageOne) || !(s2 > 0))
            {
                standardized[i] = studentized[i] = cooks[i] = double.NaN;
                continue;
            }

            standardized[i] = e / Math.Sqrt(s2 * oneMinusH);
            var deleted = df > 1 ? (rss - (e * e / oneMinusH)) / (df - 1) : double.NaN;
            studentized[i] = deleted > 0 ? e / Math.Sqrt(deleted * oneMinusH) : double.NaN;
            cooks[i] = e * e * h / (p * s2 * oneMinusH * oneMinusH);
        }

        // The arrays are this result's own: wrapped, not copied.
        return new PointDiagnostics(fit.Leverage, ImmutableCollectionsMarshal.AsImmutableArray(standardized), ImmutableCollectionsMarshal.AsImmutableArray(studentized), ImmutableCollectionsMarshal.AsImmutableArray(cooks));
    }

    public static OutlierTestResult OutlierTest(IFitResult fit, PointDiagnostics points)
    {
        var df = fit.DegreesOfFreedom - 1;
        if (df < 1)
        {
            return OutlierTestResult.NotApplicable;
        }

        var index = -1;
        var largest = double.NaN;
        for (var i = 0; i < points.Studentized.Length; i++)
        {
            var r = Math.Abs(points.Studentized[i]);
            if (double.IsFinite(r) && !(r <= largest))
            {
                largest = r;
                index = i;
            }
        }

        if (index < 0)
        {
            return OutlierTestResult.NotApplicable;
        }

        var p = StudentT.TwoSidedPValue(largest, df);
        return new OutlierTestResult(index, largest, df, p, Math.Min(1.0, fit.Count * p), DiagnosticMethods.Bonferroni);
    }
}
