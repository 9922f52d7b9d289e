using System.Collections.Immutable;
using StandFit.Core.Fitting;

namespace StandFit.Core.Uncertainty;

/// <summary>Student-t intervals for every parameter of a fit: estimate +/- t(1 - alpha/2, df) SE.</summary>
public static class TIntervals
{
    public static ImmutableArray<ParameterEstimate> Compute(IFitResult fit, ConfidenceLevel level)
    {
        var df = fit.DegreesOfFreedom;
        var critical = StudentT.TwoSidedCritical(level, df);
        var builder = ImmutableArray.CreateBuilder<ParameterEstimate>(fit.ParameterCount);
        for (var j = 0; j < fit.ParameterCount; j++)
        {
            var estimate = fit.Estimates[j];
            var se = fit.StandardError(j);
            var t = se > 0 ? estimate / se : (estimate == 0 ? 0 : double.PositiveInfinity * Math.Sign(estimate));
            var p = se > 0 ? StudentT.TwoSidedPValue(t, df) : (estimate == 0 ? 1.0 : 0.0);
            builder.Add(new ParameterEstimate(fit.ParameterNames[j], estimate, se, estimate - (critical * se), estimate + (critical * se), t, p));
        }

        return builder.MoveToImmutable();
    }
}
