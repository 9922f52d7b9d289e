using System.Globalization;
using StandFit.Core.Fitting.Expressions;

namespace StandFit.Tests.Fitting;

/// <summary>
/// The gradients the compiled program computes by forward-mode automatic differentiation, against
/// the derivatives worked out by hand (the rules of calculus, written as C# beside each model) at
/// several points, and the values against the same model written out with System.Math.
/// </summary>
public sealed class ExpressionDerivativeTests
{
    /// <summary>Relative agreement expected: a few roundings of each side.</summary>
    private const double Tolerance = 1e-13;

    public static TheoryData<string, string[], double[], double[]> Points => new()
    {
        { "exp-decay", ["b1", "b2"], [2.5, 0.7], [0.0, 0.3, 4.0] },
        { "logs", ["b1", "b2", "b3"], [1.7, 0.2, 3.0], [0.5, 2.0, 40.0] },
        { "sqrt", ["b1"], [2.0], [-1.0, 0.0, 3.5] },
        { "trig", ["b1", "b2", "b3"], [0.4, 1.3, 0.2], [-2.0, 0.5, 7.0] },
        { "roszman", ["b1", "b2", "b3", "b4"], [0.2, -6.2e-6, 1204.0, -181.3], [-4868.68, -3375.19, -1050.0] },
        { "powers", ["b1", "b2"], [1.3, 0.6], [0.5, 2.0, 3.7] },
        { "negative-base", ["b1"], [-0.5], [0.7, 2.0, -3.0] },
        { "rational", ["b1", "b2"], [1.5, 2.5], [-1.0, 0.0, 10.0] },
        { "rat43", ["b1", "b2", "b3", "b4"], [699.6, 5.28, 0.76, 1.28], [1.0, 6.0, 15.0] },
        { "thermistor", ["R25", "beta"], [10000.0, 3950.0], [253.15, 298.15, 373.15] },
        { "bennett5", ["b1", "b2", "b3"], [-2523.5, 46.7, 0.932], [7.447, 11.2, 12.5] },
    };

    [Theory]
    [MemberData(nameof(Points))]
    public void The_gradient_matches_the_derivatives_worked_out_by_hand(string model, string[] parameters, double[] b, double[] xs)
    {
        var expression = Compile(model, parameters);
        var gradient = new double[parameters.Length];
        var scratch = new double[expression.GradientScratchLength];
        foreach (var x in xs)
        {
            var (value, expected) = ByHand(model, b, x);
            var computed = expression.EvaluateWithGradient(b, [x], gradient, scratch);
            AssertClose(value, computed, model + " value", x);
            AssertClose(value, expression.Evaluate(b, [x]), model + " value without gradient", x);
            for (var j = 0; j < parameters.Length; j++)
            {
                AssertClose(expected[j], gradient[j], model + " d/d" + parameters[j], x);
            }
        }
    }

    [Fact]
    public void A_power_of_a_stimulus_that_is_zero_has_a_zero_derivative_in_its_exponent()
    {
        // d/db x^b = x^b ln x, whose limit at x = 0 (b > 0) is 0, not 0 * -inf.
        var expression = Compile("x^b", ["b"]);
        var gradient = new double[1];
        var value = expression.EvaluateWithGradient([1.5], [0.0], gradient, new double[expression.GradientScratchLength]);
        Assert.Equal(0.0, value);
        Assert.Equal(0.0, gradient[0]);
    }

    [Fact]
    public void A_parameter_that_drops_out_has_a_zero_derivative()
    {
        // d/db2 (b1*x + 0*b2) = 0.
        var expression = Compile("b1*x + 0*b2", ["b1", "b2"]);
        var gradient = new double[2];
        expression.EvaluateWithGradient([2.0, 5.0], [3.0], gradient, new double[expression.GradientScratchLength]);
        Assert.Equal([3.0, 0.0], gradient);
    }

    [Fact]
    public void Evaluating_with_gradients_allocates_nothing()
    {
        // The per-point path of every fit: the caller lends the scratch space.
        var expression = Compile("rat43", ["b1", "b2", "b3", "b4"]);
        var parameters = new[] { 699.6, 5.28, 0.76, 1.28 };
        var variables = new double[1];
        var gradient = new double[4];
        var scratch = new double[expression.GradientScratchLength];
        expression.EvaluateWithGradient(parameters, variables, gradient, scratch);
        expression.Evaluate(parameters, variables);
        var before = GC.GetAllocatedBytesForCurrentThread();
        var sum = 0.0;
        for (var i = 0; i < 1000; i++)
        {
            variables[0] = i * 0.01;
            sum += expression.EvaluateWithGradient(parameters, variables, gradient, scratch);
            sum += expression.Evaluate(parameters, variables);
        }

        var allocated = GC.GetAllocatedBytesForCurrentThread() - before;
        Assert.True(double.IsFinite(sum));
        Assert.Equal(0, allocated);
    }

    private static ModelExpression Compile(string model, string[] parameters)
    {
        var text = model switch
        {
            "exp-decay" => "b1*exp(-b2*x)",
            "logs" => "ln(b1*x) + log10(b2 + x) + log(b3)*x",
            "sqrt" => "sqrt(b1 + x^2)",
            "trig" => "sin(b1*x) + cos(b2*x)*tan(b3*x)",
            "roszman" => "b1 - b2*x - arctan[b3/(x-b4)]/pi",
            "powers" => "b1^2 + x^b2 + b1^b2 + (b1*x)^(-0.5) + (x - b1)^3 + b1^-1",
            "negative-base" => "(b1 - x)^3 + (b1*x)^2",
            "rational" => "(b1 + x)/(b2 + x*x) + x/b2 + b1/3",
            "rat43" => "b1 / ((1+exp[b2-b3*x])**(1/b4))",
            "thermistor" => "R25*exp(beta*(1/x - 1/298.15))",
            "bennett5" => "b1 * (b2+x)**(-1/b3)",
            _ => model,
        };
        var result = ExpressionParser.Parse(text, ["x"], parameters);
        Assert.True(result.IsSuccess, text + ": " + result.Error?.Message);
        return result.Expression;
    }

    /// <summary>Each model and its partial derivatives, written out by hand.</summary>
    private static (double Value, double[] Gradient) ByHand(string model, double[] b, double x)
    {
        switch (model)
        {
            case "exp-decay":
                {
                    var e = Math.Exp(-b[1] * x);
                    return (b[0] * e, [e, -b[0] * x * e]);
                }

            case "logs":
                return (Math.Log(b[0] * x) + Math.Log10(b[1] + x) + (Math.Log(b[2]) * x),
                    [1 / b[0], 1 / ((b[1] + x) * Math.Log(10)), x / b[2]]);
            case "sqrt":
                {
                    var r = Math.Sqrt(b[0] + (x * x));
                    return (r, [0.5 / r]);
                }

            case "trig":
                {
                    var t = Math.Tan(b[2] * x);
                    var c = Math.Cos(b[1] * x);
                    return (Math.Sin(b[0] * x) + (c * t),
                        [x * Math.Cos(b[0] * x), -x * Math.Sin(b[1] * x) * t, c * x * (1 + (t * t))]);
                }

            case "roszman":
                {
                    // d/du atan(u) = 1 / (1 + u^2), u = b3 / (x - b4).
                    var d = x - b[3];
                    var u = b[2] / d;
                    var k = 1 / (1 + (u * u)) / Math.PI;
                    return (b[0] - (b[1] * x) - (Math.Atan(u) / Math.PI), [1, -x, -k / d, -k * b[2] / (d * d)]);
                }

            case "powers":
                {
                    var value = (b[0] * b[0]) + Math.Pow(x, b[1]) + Math.Pow(b[0], b[1]) + Math.Pow(b[0] * x, -0.5) + Math.Pow(x - b[0], 3) + (1 / b[0]);
                    var d1 = (2 * b[0]) + (b[1] * Math.Pow(b[0], b[1] - 1)) + (-0.5 * Math.Pow(b[0] * x, -1.5) * x) - (3 * (x - b[0]) * (x - b[0])) - (1 / (b[0] * b[0]));
                    var d2 = (Math.Pow(x, b[1]) * Math.Log(x)) + (Math.Pow(b[0], b[1]) * Math.Log(b[0]));
                    return (value, [d1, d2]);
                }

            case "negative-base":
                return (Math.Pow(b[0] - x, 3) + (b[0] * x * b[0] * x), [(3 * (b[0] - x) * (b[0] - x)) + (2 * b[0] * x * x)]);
            case "rational":
                {
                    var den = b[1] + (x * x);
                    return (((b[0] + x) / den) + (x / b[1]) + (b[0] / 3), [(1 / den) + (1.0 / 3), (-(b[0] + x) / (den * den)) - (x / (b[1] * b[1]))]);
                }

            case "rat43":
                {
                    // f = b1 u^(-1/b4), u = 1 + exp(b2 - b3 x).
                    var e = Math.Exp(b[1] - (b[2] * x));
                    var u = 1 + e;
                    var f = b[0] * Math.Pow(u, -1 / b[3]);
                    var dU = -f / (b[3] * u);
                    return (f, [f / b[0], dU * e, dU * -x * e, f * Math.Log(u) / (b[3] * b[3])]);
                }

            case "thermistor":
                {
                    var k = (1 / x) - (1 / 298.15);
                    var r = b[0] * Math.Exp(b[1] * k);
                    return (r, [r / b[0], r * k]);
                }

            case "bennett5":
                {
                    // f = b1 (b2 + x)^(-1/b3).
                    var s = b[1] + x;
                    var f = b[0] * Math.Pow(s, -1 / b[2]);
                    return (f, [f / b[0], -f / (b[2] * s), f * Math.Log(s) / (b[2] * b[2])]);
                }

            default:
                throw new ArgumentOutOfRangeException(nameof(model), model, "No hand-written derivative.");
        }
    }

    private static void AssertClose(double expected, double actual, string what, double x)
    {
        var error = expected == actual ? 0.0 : Math.Abs(actual - expected) / Math.Max(Math.Abs(expected), 1e-300);
        Assert.True(
            error <= Tolerance,
            string.Create(CultureInfo.InvariantCulture, $"{what} at x = {x:R}: expected {expected:R}, got {actual:R} (relative error {error:E2})"));
    }
}
