using System.Collections.Immutable;

namespace StandFit.Core.Fitting.Nonlinear;

/// <summary>
/// Settings of one Levenberg-Marquardt fit. The defaults reach the NIST StRD certified values
/// (docs/accuracy.md); tolerances are relative and dimensionless.
/// </summary>
public sealed record LevenbergMarquardtOptions
{
    public static LevenbergMarquardtOptions Default { get; } = new();

    /// <summary>Most iterations (each evaluates the Jacobian once); 1 or more. Reaching it ends the fit as max-iterations.</summary>
    public int MaxIterations { get; init; } = 1000;

    /// <summary>converged-rss when both the actual and the predicted relative reduction of the RSS by a step are at most this; 0 or more.</summary>
    public double RssTolerance { get; init; } = 1e-15;

    /// <summary>converged-step when the trust region radius is at most this times the scaled norm of the parameters; 0 or more.</summary>
    public double StepTolerance { get; init; } = 1e-12;

    /// <summary>converged-gradient when the largest cosine between the residual vector and a Jacobian column is at most this; 0 or more.</summary>
    public double GradientTolerance { get; init; } = 1e-13;

    /// <summary>The first trust region radius is this times the scaled norm of the start vector (or this, if that norm is 0); positive.</summary>
    public double InitialStepFactor { get; init; } = 100;

    /// <summary>
    /// Lower bound of each parameter (use negative infinity for none), or the default (empty) array
    /// for no bounds at all. Bounds are kept by projection: see <see cref="LevenbergMarquardt"/>.
    /// </summary>
    public ImmutableArray<double> LowerBounds { get; init; }

    /// <summary>Upper bound of each parameter (positive infinity for none), or the default array for none.</summary>
    public ImmutableArray<double> UpperBounds { get; init; }
}
