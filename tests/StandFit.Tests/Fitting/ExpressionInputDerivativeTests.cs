using StandFit.Core.Fitting.Expressions;

namespace StandFit.Tests.Fitting;

/// <summary>
/// The symbolic derivative of a model expression with respect to its stimulus (the slope of the
/// curve) and the exact gradient of that slope with respect to the parameters, against the
/// derivatives worked out by hand (written as C# beside each model) at several points.
/// </summary>
public sealed class ExpressionInputDerivativeTests
{
    private const double Tolerance = 1e-12;

    public static TheoryData<string, string[], double[], double[]> Models => new()
    {
        { "y0 + span*(1 - exp(-x/tau))", ["y0", "span", "tau"], [0.5, 4.0, 30.0], [0.0, 12.5, 100.0] },
        { "R25*exp(beta*(1/x - 1/298.15))", ["R25", "beta"], [10000.0, 3950.0], [253.15, 298.15, 373.15] },
        { "a*b^x", ["a", "b"], [2.0, 1.5], [-1.0, 0.0, 3.0] },
        { "c*sqrt(x) + d*log10(x) + e*atan(x/f)", ["c", "d", "e", "f"], [1.2, -0.3, 0.7, 4.0], [0.5, 2.0, 9.0] },
        { "(b1 + b2*x)/(1 + b3*x^2)", ["b1", "b2", "b3"], [1.0, 2.0, 0.25], [-2.0, 0.0, 1.5] },
        { "g*sin(w*x) - h*cos(x)^3 + k*tan(x/4)", ["g", "w", "h", "k"], [0.8, 1.7, 0.4, 0.2], [-1.0, 0.3, 2.0] },
    };

    [Theory]
    [MemberData(nameof(Models))]
    public void The_slope_and_its_gradient_match_the_derivatives_worked_out_by_hand(string text, string[] parameters, double[] b, double[] xs)
    {
        var parsed = ExpressionParser.Parse(text, ["x"], parameters);
        Assert.True(parsed.IsSuccess, parsed.Error?.Message);
        var slope = parsed.Expression.InputDerivative(0);
        var gradient = new double[parameters.Length];
        var scratch = new double[slope.GradientScratchLength];
        foreach (var x in xs)
        {
            var (value, expected) = ByHand(text, b, x);
            var computed = slope.EvaluateWithGradient(b, [x], gradient, scratch);
            AssertClose(value, computed, text + " slope", x);
            for (var j = 0; j < parameters.Length; j++)
            {
                AssertClose(expected[j], gradient[j], text + " d(slope)/d" + parameters[j], x);
            }
        }
    }

    [Fact]
    public void The_slope_with_respect_to_one_input_of_two_holds_the_other_fixed()
    {
        // f = k0 + k1 x1 + c x1 (x2 - 25): df/dx1 = k1 + c (x2 - 25), df/dx2 = c x1 (by hand).
        var parsed = ExpressionParser.Parse("k0 + k1*x1 + c*x1*(x2 - 25)", ["x1", "x2"], ["k0", "k1", "c"]);
        var b = new[] { 0.1, 0.2, 0.003 };
        var gradient = new double[3];
        var byX1 = parsed.Expression.InputDerivative(0);
        var byX2 = parsed.Expression.InputDerivative(1);
        var value = byX1.EvaluateWithGradient(b, [100.0, 40.0], gradient, new double[byX1.GradientScratchLength]);
        AssertClose(0.2 + (0.003 * 15.0), value, "df/dx1", 100);
        Assert.Equal([0.0, 1.0, 15.0], gradient);
        value = byX2.EvaluateWithGradient(b, [100.0, 40.0], gradient, new double[byX2.GradientScratchLength]);
        AssertClose(0.3, value, "df/dx2", 100);
        Assert.Equal([0.0, 0.0, 100.0], gradient);
    }

    [Fact]
    public void A_model_without_the_stimulus_has_a_slope_of_zero_everywhere()
    {
        var parsed = ExpressionParser.Parse("a + b", ["x"], ["a", "b"]);
        var slope = parsed.Expression.InputDerivative(0);
        var gradient = new double[2];

        Assert.Equal(0.0, slope.EvaluateWithGradient([1.0, 2.0], [3.0], gradient, new double[slope.GradientScratchLength]));
        Assert.Equal([0.0, 0.0], gradient);
    }

    [Fact]
    public void The_derivative_is_built_once_and_shared()
    {
        var parsed = ExpressionParser.Parse("a*exp(-x/b)", ["x"], ["a", "b"]);

        Assert.Same(parsed.Expression.InputDerivative(0), parsed.Expression.InputDerivative(0));
    }

    /// <summary>The slope and its gradient with respect to the parameters, differentiated by hand.</summary>
    private static (double Value, double[] Gradient) ByHand(string text, double[] b, double x)
    {
        switch (text)
        {
            case "y0 + span*(1 - exp(-x/tau))":
                {
                    // s = span e / tau, e = exp(-x/tau); ds/dspan = e/tau; ds/dtau = span e (x - tau) / tau^3.
                    var (span, tau) = (b[1], b[2]);
                    var e = Math.Exp(-x / tau);
                    return (span * e / tau, [0.0, e / tau, span * e * (x - tau) / (tau * tau * tau)]);
                }

            case "R25*exp(beta*(1/x - 1/298.15))":
                {
                    // s = -R25 beta E / x^2, E = exp(beta (1/x - 1/T0)); ds/dR25 = -beta E / x^2;
                    // ds/dbeta = -R25 E (1 + beta (1/x - 1/T0)) / x^2.
                    var (r25, beta) = (b[0], b[1]);
                    var u = (1 / x) - (1 / 298.15);
                    var e = Math.Exp(beta * u);
                    return (-r25 * beta * e / (x * x), [-beta * e / (x * x), -r25 * e * (1 + (beta * u)) / (x * x)]);
                }

            case "a*b^x":
                {
                    // s = a b^x ln b; ds/da = b^x ln b; ds/db = a x b^(x-1) ln b + a b^(x-1).
                    var (a, bb) = (b[0], b[1]);
                    var p = Math.Pow(bb, x);
                    return (a * p * Math.Log(bb), [p * Math.Log(bb), (a * x * Math.Pow(bb, x - 1) * Math.Log(bb)) + (a * Math.Pow(bb, x - 1))]);
                }

            case "c*sqrt(x) + d*log10(x) + e*atan(x/f)":
                {
                    // s = c/(2 sqrt x) + d/(x ln 10) + e/(f (1 + (x/f)^2)); ds/df = -e (f^2 - x^2) / (f^2 + x^2)^2.
                    var (c, d, e, f) = (b[0], b[1], b[2], b[3]);
                    var q = 1 + ((x / f) * (x / f));
                    var s = (c / (2 * Math.Sqrt(x))) + (d / (x * Math.Log(10))) + (e / (f * q));
                    var ff = (f * f) + (x * x);
                    return (s, [1 / (2 * Math.Sqrt(x)), 1 / (x * Math.Log(10)), 1 / (f * q), -e * ((f * f) - (x * x)) / (ff * ff)]);
                }

            case "(b1 + b2*x)/(1 + b3*x^2)":
                {
                    // s = (b2 (1 + b3 x^2) - 2 b3 x (b1 + b2 x)) / D^2, D = 1 + b3 x^2;
                    // ds/db1 = -2 b3 x / D^2; ds/db2 = (1 - b3 x^2) / D^2;
                    // ds/db3 = (b2 x^2 - 2 x (b1 + b2 x)) / D^2 - 2 x^2 (b2 D - 2 b3 x (b1 + b2 x)) / D^3.
                    var (b1, b2, b3) = (b[0], b[1], b[2]);
                    var d = 1 + (b3 * x * x);
                    var n = b1 + (b2 * x);
                    var top = (b2 * d) - (2 * b3 * x * n);
                    var s = top / (d * d);
                    var dB3 = (((b2 * x * x) - (2 * x * n)) / (d * d)) - (2 * x * x * top / (d * d * d));
                    return (s, [-2 * b3 * x / (d * d), (1 - (b3 * x * x)) / (d * d), dB3]);
                }

            default:
                {
                    // s = g w cos(w x) + 3 h cos(x)^2 sin(x) + k (1 + tan(x/4)^2) / 4;
                    // ds/dg = w cos(w x); ds/dw = g cos(w x) - g w x sin(w x); ds/dh = 3 cos^2 sin; ds/dk = (1 + tan^2)/4.
                    var (g, w, h, k) = (b[0], b[1], b[2], b[3]);
                    var t = Math.Tan(x / 4);
                    var s = (g * w * Math.Cos(w * x)) + (3 * h * Math.Cos(x) * Math.Cos(x) * Math.Sin(x)) + (k * (1 + (t * t)) / 4);
                    return (s, [w * Math.Cos(w * x), (g * Math.Cos(w * x)) - (g * w * x * Math.Sin(w * x)), 3 * Math.Cos(x) * Math.Cos(x) * Math.Sin(x), (1 + (t * t)) / 4]);
                }
        }
    }

    private static void AssertClose(double expected, double actual, string what, double x)
    {
        var scale = Math.Max(Math.Abs(expected), 1e-300);
        Assert.True(Math.Abs(expected - actual) <= (Tolerance * scale) + 1e-300, FormattableString.Invariant($"{what} at x = {x}: expected {expected:R}, got {actual:R}"));
    }
}
