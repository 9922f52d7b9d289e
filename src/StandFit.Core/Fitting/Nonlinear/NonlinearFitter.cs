using StandFit.Core.Problems;

namespace StandFit.Core.Fitting.Nonlinear;

/// <summary>What fitting an expression model to one unit gave: the search (when it ran) and, unless it is a solution, the problem that rejects the unit.</summary>
public sealed record NonlinearFitOutcome(NonlinearFitResult? Search, Problem? Problem);

/// <summary>
/// Fits a recipe's <see cref="ExpressionModel"/> to one unit's data by Levenberg-Marquardt and
/// decides whether the result is a solution that may be reported. Anything else rejects the unit
/// with a fit.* problem whose sentence gives the status, the iterations and the stop reason:
/// <list type="bullet">
/// <item>max-iterations: <c>fit.not_converged</c>;</item>
/// <item>non-finite (the model, its derivatives or the residuals at the point reached), or any
/// estimate, standard error or residual of a converged fit that is not finite: <c>fit.non_finite</c>;</item>
/// <item>singular-jacobian (the data cannot separate the parameters): <c>fit.rank_deficient</c>;</item>
/// <item>a converged estimate on one of the recipe's bounds: <c>fit.at_bound</c>.</item>
/// </list>
/// NaN is never presented as a result.
/// </summary>
public static class NonlinearFitter
{
    public static NonlinearFitOutcome Fit(ExpressionModel model, FitData data)
    {
        ArgumentNullException.ThrowIfNull(model);
        ArgumentNullException.ThrowIfNull(data);
        if (data.IsWeighted)
        {
            throw new ArgumentException("Expression models are fitted unweighted; the recipe binder refuses weights for them.", nameof(data));
        }

        var where = SourceLocation.WholeFile(data.SourceName);
        var fitted = LevenbergMarquardt.Fit(model.Expression, data.Inputs, data.Output, model.Start, model.Options, data.SourceName);
        if (!fitted.IsSuccess)
        {
            return new NonlinearFitOutcome(null, fitted.Problems[0]);
        }

        var fit = fitted.Value;
        var status = fit.StatusCode;
        switch (fit.Status)
        {
            case NonlinearFitStatus.MaxIterations:
                return Rejected(fit, ReasonCodes.FitNotConverged, Messages.NonlinearFitRejected(status, fit.Iterations, fit.StatusReason), where);
            case NonlinearFitStatus.NonFinite:
                return Rejected(fit, ReasonCodes.FitNonFinite, Messages.NonlinearFitRejected(status, fit.Iterations, fit.StatusReason), where);
            case NonlinearFitStatus.SingularJacobian:
                return Rejected(fit, ReasonCodes.FitRankDeficient, Messages.NonlinearFitRejected(status, fit.Iterations, fit.StatusReason), where);
        }

        if (!AllFinite(fit))
        {
            return Rejected(fit, ReasonCodes.FitNonFinite, Messages.NonlinearNotFiniteResult(status, fit.Iterations), where);
        }

        for (var j = 0; j < fit.ParameterCount; j++)
        {
            if (fit.AtBound[j])
            {
                var declared = model.Parameters[j];
                var lower = declared.Min is { } min && fit.Estimates[j] <= min;
                return Rejected(fit, ReasonCodes.FitAtBound, Messages.NonlinearAtBound(declared.Name, lower ? "lower" : "upper", lower ? declared.Min!.Value : declared.Max!.Value, fit.Iterations), where);
            }
        }

        return new NonlinearFitOutcome(fit, null);
    }

    private static NonlinearFitOutcome Rejected(NonlinearFitResult fit, ReasonCode code, string message, SourceLocation where) =>
        new(fit, new Problem(code.Code, message, where));

    private static bool AllFinite(NonlinearFitResult fit) =>
        AllFinite(fit.Estimates) && AllFinite(fit.Covariance) && AllFinite(fit.Residuals) && AllFinite(fit.Fitted) && AllFinite(fit.Leverage)
        && double.IsFinite(fit.ResidualSd) && double.IsFinite(fit.ConditionNumber);

    private static bool AllFinite(System.Collections.Immutable.ImmutableArray<double> values)
    {
        foreach (var v in values)
        {
            if (!double.IsFinite(v))
            {
                return false;
            }
        }

        return true;
    }
}
