using System.Collections.Immutable;
using StandFit.Core.Fitting;

namespace StandFit.Core.Uncertainty;

/// <summary>
/// The model's derived quantities (the trade's own coefficients, such as R0, A and B of
/// Callendar-Van Dusen) with standard errors by the delta method, se = sqrt(J C J'), J the
/// Jacobian of the quantities with respect to the parameters and C the parameters' covariance;
/// intervals are estimate +/- t(1 - alpha/2, df) se, as for the parameters.
/// </summary>
public static class DerivedEstimates
{
    public static ImmutableArray<ParameterEstimate> Compute(FitResult fit, ConfidenceLevel level)
    {
        var names = fit.Model.DerivedNames;
        if (names.IsEmpty)
        {
            return [];
        }

        var p = fit.ParameterCount;
        var d = names.Length;
        var values = new double[d];
        var jacobian = new double[d * p];
        fit.Model.Derive(fit.Estimates.AsSpan(), values, jacobian);
        var critical = StudentT.TwoSidedCritical(level, fit.DegreesOfFreedom);
        var builder = ImmutableArray.CreateBuilder<ParameterEstimate>(d);
        for (var q = 0; q < d; q++)
        {
            var variance = 0.0;
            for (var i = 0; i < p; i++)
            {
                for (var j = 0; j < p; j++)
                {
                    variance += jacobian[(q * p) + i] * fit.Covariance[(i * p) + j] * jacobian[(q * p) + j];
                }
            }

            var se = Math.Sqrt(Math.Max(variance, 0.0));
            var estimate = values[q];
            var t = se > 0 ? estimate / se : (estimate == 0 ? 0 : double.PositiveInfinity * Math.Sign(estimate));
            var pValue = se > 0 ? StudentT.TwoSidedPValue(t, fit.DegreesOfFreedom) : (estimate == 0 ? 1.0 : 0.0);
            builder.Add(new ParameterEstimate(names[q], estimate, se, estimate - (critical * se), estimate + (critical * se), t, pValue));
        }

        return builder.MoveToImmutable();
    }
}
