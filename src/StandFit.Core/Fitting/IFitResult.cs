using System.Collections.Immutable;

namespace StandFit.Core.Fitting;

/// <summary>
/// What the figures, limits, diagnostics, summary and uses of the curve read from a fit, whatever
/// fitted it: a <see cref="FitResult"/> (linear least squares by QR) or a
/// <see cref="Nonlinear.NonlinearFitResult"/> (Levenberg-Marquardt). Read-only and immutable;
/// every uncertainty and diagnostic is a pure function of it.
/// <para>
/// The "design" of a nonlinear fit is its Jacobian at the solution (the tangent plane): leverage,
/// the Durbin-Watson distribution, Breusch-Pagan and the bands are then the usual linearised
/// (delta-method) figures, exact for a model linear in its parameters.
/// </para>
/// </summary>
public interface IFitResult
{
    /// <summary>The model's name as outputs write it.</summary>
    string ModelName { get; }

    /// <summary>Parameter names, in the order of every per-parameter array.</summary>
    ImmutableArray<string> ParameterNames { get; }

    int ParameterCount { get; }

    /// <summary>Number of points.</summary>
    int Count { get; }

    int InputCount { get; }

    /// <summary>One column per input, in acquisition order.</summary>
    ImmutableArray<ImmutableArray<double>> Inputs { get; }

    /// <summary>The first (or only) input.</summary>
    ImmutableArray<double> Stimulus => Inputs[0];

    /// <summary>The response the model fitted.</summary>
    ImmutableArray<double> Output { get; }

    /// <summary>True when the fit was weighted by the readings' standard uncertainties.</summary>
    bool IsWeighted { get; }

    /// <summary>w_i = 1/u_i^2 of each point; all 1 when unweighted.</summary>
    ImmutableArray<double> Weights { get; }

    ImmutableArray<double> Estimates { get; }

    /// <summary>Covariance of the estimates, p x p row-major.</summary>
    ImmutableArray<double> Covariance { get; }

    /// <summary>Correlation of the estimates, p x p row-major (1 on the diagonal).</summary>
    ImmutableArray<double> Correlation { get; }

    ImmutableArray<double> Fitted { get; }

    /// <summary>Response minus fitted value, per point in acquisition order.</summary>
    ImmutableArray<double> Residuals { get; }

    /// <summary>sqrt(w_i) times the raw residual (the residuals themselves when unweighted).</summary>
    ImmutableArray<double> WeightedResiduals { get; }

    /// <summary>Diagonal of the hat matrix of the (weighted) design, per point.</summary>
    ImmutableArray<double> Leverage { get; }

    double ResidualSumOfSquares { get; }

    double TotalSumOfSquares { get; }

    int DegreesOfFreedom { get; }

    double ResidualVariance { get; }

    double ResidualSd { get; }

    double RSquared { get; }

    double AdjustedRSquared { get; }

    double ConditionNumber { get; }

    /// <summary>True when the constant vector lies in the design's column space (a model with an intercept).</summary>
    bool HasIntercept { get; }

    /// <summary>The smallest value of each input: with <see cref="InputMax"/>, the calibrated range.</summary>
    ImmutableArray<double> InputMin { get; }

    ImmutableArray<double> InputMax { get; }

    double StandardError(int parameter);

    /// <summary>
    /// Row <paramref name="point"/> of the design the diagnostics project on: for a linear fit the
    /// centred and scaled basis at the point, for a nonlinear fit the Jacobian row at the
    /// estimates; times sqrt(w) for a weighted fit. Only its column space matters.
    /// </summary>
    void FillDesignRow(int point, Span<double> row);

    /// <summary>The fitted curve at the point <paramref name="x"/> (one value per input), and in <paramref name="gradient"/> its gradient with respect to the parameters.</summary>
    double ValueAt(ReadOnlySpan<double> x, Span<double> gradient);

    /// <summary>The slope of the fitted curve with respect to input <paramref name="input"/> at <paramref name="x"/>, and in <paramref name="gradient"/> the slope's gradient with respect to the parameters.</summary>
    double SlopeAt(ReadOnlySpan<double> x, int input, Span<double> gradient);
}
