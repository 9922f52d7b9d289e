using System.Collections.Immutable;

namespace StandFit.Core.Fitting;

/// <summary>
/// The outcome of one least-squares fit, computed once and immutable. Estimates and covariance are
/// on the natural scale (the inputs and output as the sweep file holds them; the response is the
/// model's transform of the output where it has one, such as 1/T for Steinhart-Hart). Uncertainty,
/// diagnostics and uses of the curve are pure functions of this object.
/// <para>
/// A weighted fit (w_i = 1/u_i^2) minimises sum w_i r_i^2. Its covariance is s^2 (X'WX)^-1 with
/// s^2 = sum w_i r_i^2 / df: the uncertainties give the relative weights and the scatter about the
/// curve sets the scale, as R's lm(weights = ...) does.
/// </para>
/// </summary>
public sealed class FitResult : IFitResult
{
    internal FitResult(
        LinearModel model,
        FitData data,
        ImmutableArray<double> response,
        ImmutableArray<double> weights,
        ImmutableArray<double> estimates,
        ImmutableArray<double> covariance,
        ImmutableArray<double> fitted,
        ImmutableArray<double> residuals,
        ImmutableArray<double> weightedResiduals,
        ImmutableArray<double> leverage,
        double residualSumOfSquares,
        double totalSumOfSquares,
        double conditionNumber,
        DesignScaling scaling,
        ImmutableArray<double> inputMin,
        ImmutableArray<double> inputMax)
    {
        Model = model;
        Inputs = data.Inputs;
        Output = response;
        IsWeighted = data.IsWeighted;
        Uncertainties = data.Uncertainties;
        Weights = weights;
        Estimates = estimates;
        Covariance = covariance;
        Fitted = fitted;
        Residuals = residuals;
        WeightedResiduals = weightedResiduals;
        Leverage = leverage;
        ResidualSumOfSquares = residualSumOfSquares;
        TotalSumOfSquares = totalSumOfSquares;
        ConditionNumber = conditionNumber;
        Scaling = scaling;
        InputMin = inputMin;
        InputMax = inputMax;
        DegreesOfFreedom = Count - model.ParameterCount;
        ResidualVariance = residualSumOfSquares / DegreesOfFreedom;
        ResidualSd = Math.Sqrt(ResidualVariance);
        RSquared = totalSumOfSquares > 0 ? 1.0 - (residualSumOfSquares / totalSumOfSquares) : 1.0;
        var k0 = model.HasIntercept ? 1 : 0;
        AdjustedRSquared = 1.0 - ((1.0 - RSquared) * (Count - k0) / DegreesOfFreedom);
        Correlation = CorrelationOf(covariance, model.ParameterCount);
    }

    public LinearModel Model { get; }

    public string ModelName => Model.Name;

    public ImmutableArray<string> ParameterNames => Model.ParameterNames;

    /// <summary>True when the model has a constant term.</summary>
    public bool HasIntercept => Model.HasIntercept;

    /// <summary>Number of points.</summary>
    public int Count => Output.Length;

    public int ParameterCount => Model.ParameterCount;

    public int InputCount => Inputs.Length;

    /// <summary>One column per input, in acquisition order.</summary>
    public ImmutableArray<ImmutableArray<double>> Inputs { get; }

    /// <summary>The first (or only) input.</summary>
    public ImmutableArray<double> Stimulus => Inputs[0];

    /// <summary>The response the model fitted: the output column, or the model's transform of it.</summary>
    public ImmutableArray<double> Output { get; }

    /// <summary>True when the fit was weighted by the readings' standard uncertainties.</summary>
    public bool IsWeighted { get; }

    /// <summary>The standard uncertainty of each reading of a weighted fit (default when unweighted).</summary>
    public ImmutableArray<double> Uncertainties { get; }

    /// <summary>w_i = 1/u_i^2 of each point; all 1 when unweighted.</summary>
    public ImmutableArray<double> Weights { get; }

    /// <summary>Parameter estimates in <see cref="ParameterNames"/> order.</summary>
    public ImmutableArray<double> Estimates { get; }

    /// <summary>Covariance matrix of the estimates, p x p row-major, s^2 (X'WX)^-1 (from the QR factors).</summary>
    public ImmutableArray<double> Covariance { get; }

    /// <summary>Correlation matrix of the estimates, p x p row-major (1 on the diagonal).</summary>
    public ImmutableArray<double> Correlation { get; }

    public ImmutableArray<double> Fitted { get; }

    /// <summary>Response minus fitted value, per point in acquisition order (raw, in response units).</summary>
    public ImmutableArray<double> Residuals { get; }

    /// <summary>sqrt(w_i) times the raw residual: equal to <see cref="Residuals"/> when unweighted.</summary>
    public ImmutableArray<double> WeightedResiduals { get; }

    /// <summary>Diagonal of the hat matrix of the (weighted) design, per point.</summary>
    public ImmutableArray<double> Leverage { get; }

    /// <summary>sum w_i r_i^2.</summary>
    public double ResidualSumOfSquares { get; }

    /// <summary>Weighted sum of squares about the weighted mean (about zero for a model without a constant term).</summary>
    public double TotalSumOfSquares { get; }

    public int DegreesOfFreedom { get; }

    public double ResidualVariance { get; }

    /// <summary>Residual standard deviation sqrt(RSS / df), in response units (a scale factor on the uncertainties when weighted).</summary>
    public double ResidualSd { get; }

    /// <summary>1 - RSS/TSS; the uncentred form for a model without a constant term.</summary>
    public double RSquared { get; }

    public double AdjustedRSquared { get; }

    /// <summary>2-norm condition number of the centred, scaled and column-equilibrated design matrix the fit solved.</summary>
    public double ConditionNumber { get; }

    /// <summary>The centring and scaling of each input the fit used.</summary>
    public DesignScaling Scaling { get; }

    /// <summary>The smallest value of each input: with <see cref="InputMax"/>, the calibrated range.</summary>
    public ImmutableArray<double> InputMin { get; }

    public ImmutableArray<double> InputMax { get; }

    public double StandardError(int parameter) => Math.Sqrt(Covariance[(parameter * ParameterCount) + parameter]);

    /// <summary>Index of a parameter by name, or -1.</summary>
    public int IndexOf(string parameter) => Model.ParameterNames.IndexOf(parameter);

    /// <summary>The inputs of point <paramref name="point"/>.</summary>
    public void Point(int point, Span<double> x)
    {
        for (var k = 0; k < Inputs.Length; k++)
        {
            x[k] = Inputs[k][point];
        }
    }

    /// <summary>
    /// Row <paramref name="point"/> of the design the solve used: the model's centred and scaled
    /// basis at the point, times sqrt(w) for a weighted fit (the whitened row that goes with
    /// <see cref="WeightedResiduals"/>).
    /// </summary>
    public void FillDesignRow(int point, Span<double> row)
    {
        Span<double> x = stackalloc double[Inputs.Length];
        Point(point, x);
        Model.FillScaledBasis(x, Scaling, row);
        if (IsWeighted)
        {
            var scale = Math.Sqrt(Weights[point]);
            foreach (ref var v in row)
            {
                v *= scale;
            }
        }
    }

    /// <summary>The fitted curve at <paramref name="x"/>; its gradient with respect to the parameters is the basis there.</summary>
    public double ValueAt(ReadOnlySpan<double> x, Span<double> gradient)
    {
        Model.FillBasis(x, gradient);
        return Model.Evaluate(Estimates.AsSpan(), x);
    }

    /// <summary>The slope d y / d x_input at <paramref name="x"/>; its gradient with respect to the parameters is the basis's derivative there.</summary>
    public double SlopeAt(ReadOnlySpan<double> x, int input, Span<double> gradient)
    {
        Model.FillBasisDerivative(x, input, gradient);
        return Dot(gradient, Estimates.AsSpan());
    }

    private static double Dot(ReadOnlySpan<double> a, ReadOnlySpan<double> b)
    {
        var sum = 0.0;
        for (var j = 0; j < a.Length; j++)
        {
            sum += a[j] * b[j];
        }

        return sum;
    }

    internal static ImmutableArray<double> CorrelationOf(ImmutableArray<double> covariance, int p)
    {
        var correlation = new double[p * p];
        for (var i = 0; i < p; i++)
        {
            for (var j = 0; j < p; j++)
            {
                var scale = Math.Sqrt(covariance[(i * p) + i] * covariance[(j * p) + j]);
                correlation[(i * p) + j] = i == j ? 1.0 : (scale > 0 ? covariance[(i * p) + j] / scale : 0.0);
            }
        }

        return System.Runtime.InteropServices.ImmutableCollectionsMarshal.AsImmutableArray(correlation);
    }
}
