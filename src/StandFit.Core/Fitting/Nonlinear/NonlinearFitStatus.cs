namespace StandFit.Core.Fitting.Nonlinear;

/// <summary>How a Levenberg-Marquardt fit ended. Only the three converged statuses are solutions.</summary>
public enum NonlinearFitStatus
{
    /// <summary>converged-rss: the actual and predicted relative reductions of the residual sum of squares both fell below the tolerance.</summary>
    ConvergedRss,

    /// <summary>converged-step: the trust region (the bound on the scaled step) fell below the tolerance relative to the scaled parameter vector.</summary>
    ConvergedStep,

    /// <summary>converged-gradient: the residual vector is orthogonal to every column of the Jacobian to within the tolerance (as a cosine).</summary>
    ConvergedGradient,

    /// <summary>max-iterations: the iteration limit was reached first; the estimates are not a solution.</summary>
    MaxIterations,

    /// <summary>non-finite: the model or its gradient was NaN or infinite at the start or at an accepted point.</summary>
    NonFinite,

    /// <summary>singular-jacobian: the search stopped where the Jacobian is rank-deficient; the parameters cannot be separated and have no standard errors.</summary>
    SingularJacobian,
}

/// <summary>The stable text codes of <see cref="NonlinearFitStatus"/>.</summary>
public static class NonlinearFitStatusCodes
{
    /// <summary>The status as outputs write it: converged-rss, converged-step, converged-gradient, max-iterations, non-finite, singular-jacobian.</summary>
    public static string Code(this NonlinearFitStatus status) => status switch
    {
        NonlinearFitStatus.ConvergedRss => "converged-rss",
        NonlinearFitStatus.ConvergedStep => "converged-step",
        NonlinearFitStatus.ConvergedGradient => "converged-gradient",
        NonlinearFitStatus.MaxIterations => "max-iterations",
        NonlinearFitStatus.NonFinite => "non-finite",
        NonlinearFitStatus.SingularJacobian => "singular-jacobian",
        _ => throw new ArgumentOutOfRangeException(nameof(status), status, "Unknown status."),
    };

    /// <summary>True for the three converged statuses.</summary>
    public static bool IsConverged(this NonlinearFitStatus status) =>
        status is NonlinearFitStatus.ConvergedRss or NonlinearFitStatus.ConvergedStep or NonlinearFitStatus.ConvergedGradient;
}
