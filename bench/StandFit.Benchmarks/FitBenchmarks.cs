using BenchmarkDotNet.Attributes;
using StandFit.Core.Fitting;
using StandFit.Core.Fitting.Expressions;
using StandFit.Core.Fitting.Nonlinear;
using StandFit.Core.Uncertainty.Resampling;

namespace StandFit.Benchmarks;

/// <summary>
/// One fit of a 41-point sweep per model, from the data to the immutable result (estimates,
/// covariance, residuals, leverage, condition number): a straight line and a quadratic (QR with
/// refinement), Steinhart-Hart (1/T on ln R and ln(R)^3, the same QR path) and a three-parameter
/// exponential rise written as an expression (Levenberg-Marquardt from the recipe's start, exact
/// Jacobian, refinement, covariance). Setup builds the data once; each operation is one fit.
/// </summary>
[MemoryDiagnoser]
public class FitBenchmarks
{
    private const int Points = 41;

    private LinearModel? _linear;
    private FitData _data = null!;
    private ExpressionModel? _expression;

    [Params("straight-line", "quadratic", "steinhart-hart", "exponential-rise")]
    public string Model { get; set; } = "straight-line";

    [GlobalSetup]
    public void Setup()
    {
        var rng = new Xoshiro256StarStar(20261204);
        var x = new double[Points];
        var y = new double[Points];
        for (var i = 0; i < Points; i++)
        {
            var noise = Simulation.Gaussian(ref rng);
            switch (Model)
            {
                case "straight-line":
                case "quadratic":
                    x[i] = 250.0 * i / (Points - 1);
                    y[i] = 0.01 + (0.2 * x[i]) + (Model == "quadratic" ? 2e-6 * x[i] * x[i] : 0) + (0.005 * noise);
                    break;
                case "steinhart-hart":
                    // A 10 kohm NTC from -20 to 80 degC: R by the Beta equation, T the reference reading in kelvin.
                    var t = 253.15 + (100.0 * i / (Points - 1));
                    x[i] = 10000 * Math.Exp(3950 * ((1 / t) - (1 / 298.15)));
                    y[i] = t + (0.01 * noise);
                    break;
                default:
                    x[i] = 100.0 * i / (Points - 1);
                    y[i] = 0.5 + (4.0 * (1 - Math.Exp(-x[i] / 30))) + (0.002 * noise);
                    break;
            }
        }

        _data = new FitData([.. x], [.. y]);
        switch (Model)
        {
            case "straight-line":
                _linear = Polynomial.StraightLine;
                break;
            case "quadratic":
                _linear = Polynomial.OfDegree(2);
                break;
            case "steinhart-hart":
                _linear = new SteinhartHart(TemperatureScale.Kelvin);
                break;
            default:
                var parsed = ExpressionParser.Parse("y0 + span*(1 - exp(-x/tau))", ["x"], ["y0", "span", "tau"]);
                _expression = new ExpressionModel(parsed.Expression, [new("y0", 0), new("span", 3), new("tau", 20)]);
                break;
        }

        if (Fit() is null)
        {
            throw new InvalidOperationException("The benchmark sweep could not be fitted.");
        }
    }

    [Benchmark]
    public IFitResult? Fit() => _expression is { } expression
        ? NonlinearFitter.Fit(expression, _data).Search
        : LeastSquaresFitter.Fit(_linear!, _data).Value;
}
