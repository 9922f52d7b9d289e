using System.Runtime.CompilerServices;
using StandFit.Core.Fitting;

namespace StandFit.Core.Diagnostics;

/// <summary>
/// The curvature test: the partial F of the next polynomial power, F = (RSS_k - RSS_(k+1)) /
/// (RSS_(k+1) / (n - p - 1)) on 1 and n - p - 1 degrees of freedom, the same F as
/// anova(lm(y ~ poly(x, k, raw = TRUE)), lm(y ~ poly(x, k + 1, raw = TRUE))).
/// <see cref="NextPower"/> is k + 1.
/// </summary>
public sealed record CurvatureResult(double F, int NextPower, int Df, double P, string Method)
{
    public bool IsApplicable => Method != DiagnosticMethods.NotApplicable;

    public static CurvatureResult NotApplicable { get; } = new(double.NaN, 0, 0, double.NaN, DiagnosticMethods.NotApplicable);
}

/// <summary>
/// The larger model is not refitted: with r = M z^(k+1) the part of the next power (on the fit's
/// scaled stimulus z) the design does not explain, its least-squares coefficient on the residuals
/// is r'e / r'r and the new residuals are e - r (r'e / r'r), so RSS_(k+1) is their sum of squares.
/// Only polynomial models have a next power; a next power the set points cannot separate from the
/// design (|r| below 1e-9 of |z^(k+1)|) makes the test not applicable.
/// </summary>
public static class Curvature
{
    public static CurvatureResult Compute(FitResult fit) => fit.Model is Polynomial ? Compute(fit, DesignBasis.Of(fit)) : CurvatureResult.NotApplicable;

    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    internal static CurvatureResult Compute(FitResult fit, DesignBasis design)
    {
        if (fit.Model is not Polynomial polynomial)
        {
            return CurvatureResult.NotApplicable;
        }

        var n = fit.Count;
        var df = n - fit.ParameterCount - 1;
        if (df < 1)
        {
            return CurvatureResult.NotApplicable;
        }

        var power = polynomial.Degree + 1;
        Span<double> r = n <= 512 ? stackalloc double[n] : new double[n];
        var length = 0.0;
        for (var i = 0; i < n; i++)
        {
            var z = (fit.Stimulus[i] - fit.Scaling[0].Centre) / fit.Scaling[0].HalfRange;
            var v = fit.IsWeighted ? Math.Sqrt(fit.Weights[i]) : 1.0;
            for (var k = 0; k < power; k++)
            {
                v *= z;
            }

            r[i] = v;
            length += v * v;
        }

        design.RemoveProjection(r);
        double rr = 0, re = 0;
        for (var i = 0; i < n; i++)
        {
            rr += r[i] * r[i];
            re += r[i] * fit.WeightedResiduals[i];
        }

        if (!(rr > 1e-18 * length))
        {
            return CurvatureResult.NotApplicable;
        }

        var coefficient = re / rr;
        var rss = 0.0;
        for (var i = 0; i < n; i++)
        {
            var e = fit.WeightedResiduals[i] - (coefficient * r[i]);
            rss += e * e;
        }

        if (!(rss > 0))
        {
            return new CurvatureResult(double.PositiveInfinity, power, df, 0.0, DiagnosticMethods.F);
        }

        var f = (fit.ResidualSumOfSquares - rss) / (rss / df);
        return new CurvatureResult(f, power, df, Probability.FUpper(f, 1, df), DiagnosticMethods.F);
    }
}
