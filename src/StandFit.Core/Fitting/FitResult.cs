using System.Collections.Immutable;

namespace StandFit.Core.Fitting;

/// <summary>
/// The outcome of one least-squares fit, computed once and immutable. Estimates and covariance are
/// on the natural scale (the stimulus and output as the sweep file holds them). Uncertainty and
/// diagnostics are pure functions of this object.
/// </summary>
public sealed class FitResult
{
    internal FitResult(
        LinearModel model,
        ImmutableArray<double> stimulus,
        ImmutableArray<double> output,
        ImmutableArray<double> estimates,
        ImmutableArray<double> covariance,
        ImmutableArray<double> fitted,
        ImmutableArray<double> residuals,
        ImmutableArray<double> leverage,
        double residualSumOfSquares,
        double totalSumOfSquares,
        double conditionNumber,
        StimulusScaling scaling)
    {
        Model = model;
        Stimulus = stimulus;
        Output = output;
        Estimates = estimates;
        Covariance = covariance;
        Fitted = fitted;
        Residuals = residuals;
        Leverage = leverage;
        ResidualSumOfSquares = residualSumOfSquares;
        TotalSumOfSquares = totalSumOfSquares;
        ConditionNumber = conditionNumber;
        Scaling = scaling;
        DegreesOfFreedom = stimulus.Length - model.ParameterCount;
        ResidualVariance = residualSumOfSquares / DegreesOfFreedom;
        ResidualSd = Math.Sqrt(ResidualVariance);
        RSquared = totalSumOfSquares > 0 ? 1.0 - (residualSumOfSquares / totalSumOfSquares) : 1.0;
        var k0 = model.HasIntercept ? 1 : 0;
        AdjustedRSquared = 1.0 - ((1.0 - RSquared) * (stimulus.Length - k0) / DegreesOfFreedom);
    }

    public LinearModel Model { get; }

    /// <summary>Number of points.</summary>
    public int Count => Stimulus.Length;

    public int ParameterCount => Model.ParameterCount;

    public ImmutableArray<double> Stimulus { get; }

    public ImmutableArray<double> Output { get; }

    /// <summary>Parameter estimates in <see cref="LinearModel.ParameterNames"/> order.</summary>
    public ImmutableArray<double> Estimates { get; }

    /// <summary>Covariance matrix of the estimates, p x p row-major, s^2 (X'X)^-1 (from the QR factors).</summary>
    public ImmutableArray<double> Covariance { get; }

    public ImmutableArray<double> Fitted { get; }

    /// <summary>Output minus fitted value, per point in acquisition order.</summary>
    public ImmutableArray<double> Residuals { get; }

    /// <summary>Diagonal of the hat matrix, per point.</summary>
    public ImmutableArray<double> Leverage { get; }

    public double ResidualSumOfSquares { get; }

    /// <summary>Sum of squares about the mean (about zero for a model without a constant term).</summary>
    public double TotalSumOfSquares { get; }

    public int DegreesOfFreedom { get; }

    public double ResidualVariance { get; }

    /// <summary>Residual standard deviation sqrt(RSS / df), in output units.</summary>
    public double ResidualSd { get; }

    /// <summary>1 - RSS/TSS; the uncentred form for a model without a constant term.</summary>
    public double RSquared { get; }

    public double AdjustedRSquared { get; }

    /// <summary>2-norm condition number of the centred, scaled and column-equilibrated design matrix the fit solved.</summary>
    public double ConditionNumber { get; }

    /// <summary>The centring and scaling the fit used.</summary>
    public StimulusScaling Scaling { get; }

    public double StandardError(int parameter) => Math.Sqrt(Covariance[(parameter * ParameterCount) + parameter]);

    /// <summary>Index of a parameter by name, or -1.</summary>
    public int IndexOf(string parameter) => Model.ParameterNames.IndexOf(parameter);
}
