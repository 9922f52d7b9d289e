using System.Collections.Immutable;
using System.Runtime.InteropServices;
using StandFit.Core.Fitting.Expressions;

namespace StandFit.Core.Fitting.Nonlinear;

/// <summary>
/// The outcome of one Levenberg-Marquardt fit, computed once and immutable. A fit that did not
/// converge says so in <see cref="Status"/> and <see cref="Converged"/>, and its estimates are the
/// last accepted point of the search, not a solution. Estimates, covariance and residuals are in
/// the units of the data as given (the stimulus columns and the response).
/// </summary>
public sealed class NonlinearFitResult : IFitResult
{
    internal NonlinearFitResult(
        ModelExpression model,
        ImmutableArray<ImmutableArray<double>> inputs,
        ImmutableArray<double> start,
        ImmutableArray<double> output,
        ImmutableArray<double> estimates,
        ImmutableArray<double> covariance,
        ImmutableArray<double> fitted,
        ImmutableArray<double> residuals,
        ImmutableArray<bool> atBound,
        ImmutableArray<double> jacobian,
        ImmutableArray<double> leverage,
        bool hasIntercept,
        double residualSumOfSquares,
        double totalSumOfSquares,
        double conditionNumber,
        int iterations,
        int evaluations,
        NonlinearFitStatus status,
        string statusReason)
    {
        Model = model;
        Inputs = inputs;
        Jacobian = jacobian;
        Leverage = leverage;
        HasIntercept = hasIntercept;
        var weights = new double[output.Length];
        Array.Fill(weights, 1.0);
        Weights = ImmutableCollectionsMarshal.AsImmutableArray(weights);
        var inputMin = new double[inputs.Length];
        var inputMax = new double[inputs.Length];
        for (var k = 0; k < inputs.Length; k++)
        {
            var column = inputs[k].AsSpan();
            inputMin[k] = column.IsEmpty ? double.NaN : double.PositiveInfinity;
            inputMax[k] = column.IsEmpty ? double.NaN : double.NegativeInfinity;
            foreach (var value in column)
            {
                // The inputs are finite (the fit refuses anything else).
                inputMin[k] = Math.Min(inputMin[k], value);
                inputMax[k] = Math.Max(inputMax[k], value);
            }
        }

        InputMin = ImmutableCollectionsMarshal.AsImmutableArray(inputMin);
        InputMax = ImmutableCollectionsMarshal.AsImmutableArray(inputMax);
        Start = start;
        Output = output;
        Estimates = estimates;
        Covariance = covariance;
        Fitted = fitted;
        Residuals = residuals;
        AtBound = atBound;
        ResidualSumOfSquares = residualSumOfSquares;
        TotalSumOfSquares = totalSumOfSquares;
        ConditionNumber = conditionNumber;
        Iterations = iterations;
        Evaluations = evaluations;
        Status = status;
        StatusReason = statusReason;
        DegreesOfFreedom = output.Length - model.ParameterCount;
        ResidualVariance = residualSumOfSquares / DegreesOfFreedom;
        ResidualSd = Math.Sqrt(ResidualVariance);
        RSquared = totalSumOfSquares > 0 ? 1.0 - (residualSumOfSquares / totalSumOfSquares) : double.NaN;
        AdjustedRSquared = 1.0 - ((1.0 - RSquared) * (output.Length - 1) / DegreesOfFreedom);
        var p = model.ParameterCount;
        var standardErrors = new double[p];
        for (var j = 0; j < p; j++)
        {
            standardErrors[j] = Math.Sqrt(covariance[(j * p) + j]);
        }

        StandardErrors = ImmutableCollectionsMarshal.AsImmutableArray(standardErrors);
        Correlation = FitResult.CorrelationOf(covariance, p);
    }

    /// <summary>The model that was fitted.</summary>
    public ModelExpression Model { get; }

    /// <summary><c>expression(...)</c>: see <see cref="ExpressionModel.NameOf"/>.</summary>
    public string ModelName => ExpressionModel.NameOf(Model);

    /// <summary>Number of inputs (the expression's variables).</summary>
    public int InputCount => Inputs.Length;

    /// <summary>One column per variable of the model, as given to the fit.</summary>
    public ImmutableArray<ImmutableArray<double>> Inputs { get; }

    /// <summary>The first (or only) input.</summary>
    public ImmutableArray<double> Stimulus => Inputs[0];

    /// <summary>The smallest value of each input: with <see cref="InputMax"/>, the calibrated range.</summary>
    public ImmutableArray<double> InputMin { get; }

    public ImmutableArray<double> InputMax { get; }

    /// <summary>False: the Levenberg-Marquardt fit is unweighted.</summary>
    public bool IsWeighted => false;

    /// <summary>All 1 (an unweighted fit).</summary>
    public ImmutableArray<double> Weights { get; }

    /// <summary>The residuals (an unweighted fit).</summary>
    public ImmutableArray<double> WeightedResiduals => Residuals;

    /// <summary>The Jacobian d model_i / d b_j at the estimates, n x p row-major: the tangent-plane design.</summary>
    public ImmutableArray<double> Jacobian { get; }

    /// <summary>
    /// The tangent-plane leverage of each point, the diagonal of J (J'J)^-1 J' with J the Jacobian at
    /// the estimates (exact for a model linear in its parameters); NaN throughout when J is singular.
    /// </summary>
    public ImmutableArray<double> Leverage { get; }

    /// <summary>True when the constant vector lies in the column space of the Jacobian (the model can shift the whole curve).</summary>
    public bool HasIntercept { get; }

    /// <summary>Correlation matrix of the estimates, p x p row-major (1 on the diagonal; NaN where the covariance is).</summary>
    public ImmutableArray<double> Correlation { get; }

    /// <summary>R^2 adjusted for the number of parameters, 1 - (1 - R^2)(n - 1)/df.</summary>
    public double AdjustedRSquared { get; }

    /// <summary>Parameter names, in the order of every per-parameter array.</summary>
    public ImmutableArray<string> ParameterNames => Model.ParameterNames;

    /// <summary>Number of parameters.</summary>
    public int ParameterCount => Model.ParameterCount;

    /// <summary>Number of points.</summary>
    public int Count => Output.Length;

    /// <summary>The start vector the search began from.</summary>
    public ImmutableArray<double> Start { get; }

    /// <summary>The response the model was fitted to, per point.</summary>
    public ImmutableArray<double> Output { get; }

    /// <summary>Parameter estimates (the last accepted point when the fit did not converge).</summary>
    public ImmutableArray<double> Estimates { get; }

    /// <summary>
    /// Covariance of the estimates, p x p row-major: s^2 (J'J)^-1 with J the Jacobian at the
    /// estimates, from the pivoted QR of J with unit-norm columns (through R^-1, never J'J itself).
    /// NaN throughout when the Jacobian there is singular or not finite.
    /// </summary>
    public ImmutableArray<double> Covariance { get; }

    /// <summary>Standard error of each estimate: the square root of the covariance diagonal.</summary>
    public ImmutableArray<double> StandardErrors { get; }

    /// <summary>The model's value at each point.</summary>
    public ImmutableArray<double> Fitted { get; }

    /// <summary>Output minus fitted value, per point.</summary>
    public ImmutableArray<double> Residuals { get; }

    /// <summary>
    /// Per parameter: true when the estimate sits on one of its bounds. The covariance ignores the
    /// bounds, so the standard error of such a parameter does not describe a constrained estimate.
    /// </summary>
    public ImmutableArray<bool> AtBound { get; }

    /// <summary>Sum of the squared residuals, in output units squared.</summary>
    public double ResidualSumOfSquares { get; }

    /// <summary>Sum of squares of the output about its mean.</summary>
    public double TotalSumOfSquares { get; }

    /// <summary>Points minus parameters.</summary>
    public int DegreesOfFreedom { get; }

    /// <summary>RSS / df.</summary>
    public double ResidualVariance { get; }

    /// <summary>Residual standard deviation sqrt(RSS / df), in output units.</summary>
    public double ResidualSd { get; }

    /// <summary>The centred R^2: 1 - RSS / TSS about the mean (NaN when the output is constant).</summary>
    public double RSquared { get; }

    /// <summary>
    /// 2-norm condition number of the Jacobian at the estimates after scaling its columns to unit
    /// norm (infinite when singular): about 10^k means the estimates can lose k digits.
    /// </summary>
    public double ConditionNumber { get; }

    /// <summary>Iterations of the search (one Jacobian evaluation each).</summary>
    public int Iterations { get; }

    /// <summary>Evaluations of the model at all points: the start and every trial step.</summary>
    public int Evaluations { get; }

    /// <summary>How the fit ended; see <see cref="Converged"/>.</summary>
    public NonlinearFitStatus Status { get; }

    /// <summary>The status as text: converged-rss, converged-step, converged-gradient, max-iterations, non-finite, singular-jacobian.</summary>
    public string StatusCode => Status.Code();

    /// <summary>A sentence saying how the fit ended and, when it did not converge, what to check.</summary>
    public string StatusReason { get; }

    /// <summary>True only for the converged statuses: then the estimates are a solution.</summary>
    public bool Converged => Status.IsConverged();

    /// <summary>Index of a parameter by name, or -1.</summary>
    public int IndexOf(string parameter) => Model.IndexOf(parameter);

    public double StandardError(int parameter) => StandardErrors[parameter];

    /// <summary>Row <paramref name="point"/> of the Jacobian at the estimates.</summary>
    public void FillDesignRow(int point, Span<double> row) => Jacobian.AsSpan(point * ParameterCount, ParameterCount).CopyTo(row);

    /// <summary>The fitted curve at <paramref name="x"/> and its exact gradient with respect to the parameters.</summary>
    public double ValueAt(ReadOnlySpan<double> x, Span<double> gradient) => Evaluate(Model, x, gradient);

    /// <summary>The slope with respect to input <paramref name="input"/> at <paramref name="x"/>, from the symbolic derivative of the expression, and its exact gradient.</summary>
    public double SlopeAt(ReadOnlySpan<double> x, int input, Span<double> gradient) => Evaluate(Model.InputDerivative(input), x, gradient);

    private double Evaluate(ModelExpression expression, ReadOnlySpan<double> x, Span<double> gradient)
    {
        var length = expression.GradientScratchLength;
        Span<double> scratch = length <= 1024 ? stackalloc double[length] : new double[length];
        return expression.EvaluateWithGradient(Estimates.AsSpan(), x, gradient, scratch);
    }
}
