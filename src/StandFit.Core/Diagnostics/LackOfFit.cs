using System.Runtime.CompilerServices;
using StandFit.Core.Fitting;

namespace StandFit.Core.Diagnostics;

/// <summary>
/// The lack-of-fit F test against pure error from replicated set points:
/// F = ((RSS - SSpe) / (c - p)) / (SSpe / (n - c)), c set points, p parameters, SSpe the sum of
/// squares of the outputs about their set-point means; p-value from F(c - p, n - c). The same F as
/// anova(lm(y ~ model), lm(y ~ factor(set point))). Not applicable unless p &lt; c &lt; n.
/// </summary>
public sealed record LackOfFitResult(double F, int LackDf, int PureErrorDf, double P, double LackSumOfSquares, double PureErrorSumOfSquares, string Method)
{
    public bool IsApplicable => Method != DiagnosticMethods.NotApplicable;

    public static LackOfFitResult NotApplicable { get; } = new(double.NaN, 0, 0, double.NaN, double.NaN, double.NaN, DiagnosticMethods.NotApplicable);
}

public static class LackOfFit
{
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public static LackOfFitResult Compute(IFitResult fit, SetPointGrouping groups)
    {
        var n = fit.Count;
        var p = fit.ParameterCount;
        var c = groups.Count;

        // Set points are told apart by the first input alone, and pure error is taken unweighted:
        // a model of several inputs or a weighted fit has no lack-of-fit test here.
        if (c <= p || n <= c || fit.InputCount > 1 || fit.IsWeighted)
        {
            return LackOfFitResult.NotApplicable;
        }

        Span<double> sums = c <= 512 ? stackalloc double[c] : new double[c];
        var counts = groups.Sizes();
        for (var i = 0; i < n; i++)
        {
            sums[groups.GroupOf[i]] += fit.Output[i];
        }

        var pure = 0.0;
        for (var i = 0; i < n; i++)
        {
            var g = groups.GroupOf[i];
            var d = fit.Output[i] - (sums[g] / counts[g]);
            pure += d * d;
        }

        var lackDf = c - p;
        var pureDf = n - c;
        var lack = fit.ResidualSumOfSquares - pure;
        if (!(pure > 0))
        {
            return LackOfFitResult.NotApplicable;
        }

        var f = lack / lackDf / (pure / pureDf);
        return new LackOfFitResult(f, lackDf, pureDf, Probability.FUpper(f, lackDf, pureDf), lack, pure, DiagnosticMethods.F);
    }
}
