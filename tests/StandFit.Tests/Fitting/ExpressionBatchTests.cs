using StandFit.Core.Fitting.Expressions;
using StandFit.Core.Uncertainty.Resampling;

namespace StandFit.Tests.Fitting;

/// <summary>
/// The batch evaluator (the program run once over many points, as the nonlinear resampler uses it)
/// gives exactly the value and gradient of the point-by-point evaluator, bit for bit, for every
/// operation of the language and every pattern of which operands depend on the parameters. The
/// reference is <see cref="ModelExpression.EvaluateWithGradient"/>, itself checked against
/// hand-worked derivatives in ExpressionDerivativeTests.
/// </summary>
public sealed class ExpressionBatchTests
{
    public static TheoryData<string> Expressions => new()
    {
        // +, -, *, / with the left, the right, both or neither operand depending on the parameters.
        "a + x", "x + a", "a + b*x", "x - a", "a - x", "a*x - b", "x*x - a*b",
        "a*x", "x*a", "a*b*x", "x/a", "a/x", "a/b + x/(a*b)", "x/2 + a",
        // Powers: a constant integer (0, 1, 2, -1, 3), a constant non-integer, and a^b with either or both moving.
        "a*x^0 + b", "a*x^1", "(a*x)^2", "(a + x)^(-1)", "(a*x + b)^3", "(a*x)^2.5",
        "x^a", "a^x", "a^b + x", "(a*x)^b",
        // Every function, on an argument that moves and on one that does not.
        "-a*x", "exp(-x/a)", "ln(a*x)", "log10(a + x)", "sqrt(a*x + b)", "sin(a*x)", "cos(b - x)", "tan(a*x/10)", "atan(a*x - b)",
        "a*exp(-x/50) + b", "a*ln(x) + b*sqrt(x)",
        // The rise of the benchmark, and a model without x.
        "y0 + span*(1 - exp(-x/tau))", "a*b",
    };

    [Theory]
    [MemberData(nameof(Expressions))]
    public void The_batch_evaluator_gives_the_point_by_point_value_and_gradient_bit_for_bit(string text)
    {
        var parsed = ExpressionParser.Parse(text, ["x"]);
        Assert.True(parsed.IsSuccess, parsed.Error?.Message);
        var model = parsed.Expression;
        var p = model.ParameterCount;
        var rng = new Xoshiro256StarStar(20261205);
        const int n = 17;
        var x = new double[n];
        for (var i = 0; i < n; i++)
        {
            x[i] = 0.5 + (9.5 * rng.NextDouble());
        }

        // Every point, a subset in another order, and one point.
        foreach (var rows in new[] { Enumerable.Range(0, n).ToArray(), new[] { 16, 3, 3, 9, 0, 11 }, new[] { 5 } })
        {
            var parameters = new double[p];
            for (var j = 0; j < p; j++)
            {
                parameters[j] = 0.5 + (2 * rng.NextDouble());
            }

            var m = rows.Length;
            var values = new double[m];
            var jacobian = new double[p * m];
            var scratch = new double[model.BatchScratchLength(m)];
            Array.Fill(scratch, double.NaN); // nothing may be read before it is written
            model.EvaluateWithGradientBatch(parameters, x, rows, values, jacobian, scratch);

            var gradient = new double[p];
            var single = new double[model.GradientScratchLength];
            for (var r = 0; r < m; r++)
            {
                var value = model.EvaluateWithGradient(parameters, x.AsSpan(rows[r], 1), gradient, single);
                Assert.Equal(BitConverter.DoubleToInt64Bits(value), BitConverter.DoubleToInt64Bits(values[r]));
                for (var j = 0; j < p; j++)
                {
                    Assert.True(BitConverter.DoubleToInt64Bits(gradient[j]) == BitConverter.DoubleToInt64Bits(jacobian[(j * m) + r]), $"{text}: point {rows[r]}, d/d{model.ParameterNames[j]}: {gradient[j]:R} point by point, {jacobian[(j * m) + r]:R} in the batch");
                }
            }
        }
    }

    [Theory]
    [MemberData(nameof(Expressions))]
    public void The_value_only_batch_evaluator_gives_the_point_by_point_value_bit_for_bit(string text)
    {
        // The inverse_at scan of a refitted expression (NonlinearInverse) relies on it.
        var model = ExpressionParser.Parse(text, ["x"]).Expression;
        var p = model.ParameterCount;
        var rng = new Xoshiro256StarStar(20261206);
        const int n = 23;
        var x = new double[n];
        for (var i = 0; i < n; i++)
        {
            x[i] = 0.5 + (9.5 * rng.NextDouble());
        }

        var parameters = new double[p];
        for (var j = 0; j < p; j++)
        {
            parameters[j] = 0.5 + (2 * rng.NextDouble());
        }

        int[] rows = [.. Enumerable.Range(0, n).Reverse()];
        var values = new double[n];
        var scratch = new double[model.ValueBatchScratchLength(n)];
        Array.Fill(scratch, double.NaN);
        model.EvaluateBatch(parameters, x, rows, values, scratch);
        var gradient = new double[p];
        var single = new double[model.GradientScratchLength];
        for (var r = 0; r < n; r++)
        {
            var value = model.EvaluateWithGradient(parameters, x.AsSpan(rows[r], 1), gradient, single);
            Assert.True(BitConverter.DoubleToInt64Bits(value) == BitConverter.DoubleToInt64Bits(values[r]), $"{text}: point {rows[r]}: {value:R} point by point, {values[r]:R} in the batch");
        }
    }

    [Fact]
    public void A_model_of_two_inputs_reads_each_points_row_in_the_batch()
    {
        var model = ExpressionParser.Parse("k0 + k1*x1 + c*x1*(x2 - 25)", ["x1", "x2"]).Expression;
        double[] variables = [1, 20, 2, 25, 3, 30, 4, 35];
        var values = new double[4];
        var jacobian = new double[3 * 4];
        model.EvaluateWithGradientBatch([0.5, 2, 0.01], variables, [0, 1, 2, 3], values, jacobian, new double[model.BatchScratchLength(4)]);
        // By hand: k0 + k1 x1 + c x1 (x2 - 25), and its gradient (1, x1, x1 (x2 - 25)).
        double[] expectedValues = [0.5 + 2 - 0.05, 0.5 + 4, 0.5 + 6 + 0.15, 0.5 + 8 + 0.4];
        double[] expectedJacobian = [1, 1, 1, 1, 1, 2, 3, 4, -5, 0, 15, 40];
        for (var r = 0; r < 4; r++)
        {
            Assert.Equal(expectedValues[r], values[r], 1e-14);
        }

        for (var k = 0; k < 12; k++)
        {
            Assert.Equal(expectedJacobian[k], jacobian[k], 1e-14);
        }
    }
}
