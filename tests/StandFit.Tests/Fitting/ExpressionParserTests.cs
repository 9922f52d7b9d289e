using System.Globalization;
using StandFit.Core.Fitting.Expressions;

namespace StandFit.Tests.Fitting;

/// <summary>
/// The expression language of docs/expressions.md: what it accepts, what the parts mean, and that
/// every refusal names its column. Values are checked against the same arithmetic written out in
/// C# with System.Math; columns are counted in the expression text (1-based).
/// </summary>
public sealed class ExpressionParserTests
{
    private static readonly string[] X = ["x"];

    [Theory]
    // Usual precedence: ^ over unary minus over * / over + -; ^ right-associative, the others left
    // (the convention of Fortran and Python's **, and of NIST's model texts).
    [InlineData("b + 1 + 2*3^2", 19.0)]
    [InlineData("b - 2^2", -4.0)]
    [InlineData("b + -2^2", -4.0)]
    [InlineData("b + 2^3^2", 512.0)]
    [InlineData("b + 2**3**2", 512.0)]
    [InlineData("b + 2^-1", 0.5)]
    [InlineData("b + 8/4/2", 1.0)]
    [InlineData("b + 2-3-4", -5.0)]
    [InlineData("b + (2-3)*4", -4.0)]
    [InlineData("b + [2-3]*4", -4.0)]
    [InlineData("b + 1.5E-3*1e3", 1.5)]
    [InlineData("b + .5 + 5.", 5.5)]
    [InlineData("b + --3", 3.0)]
    [InlineData("b + +3", 3.0)]
    public void Operators_bind_and_associate_as_in_ordinary_arithmetic(string text, double expected) =>
        Assert.Equal(expected, Parse(text).Evaluate([0.0], [0.0]));

    [Theory]
    [InlineData("exp(b*x)")]
    [InlineData("ln(b*x)")]
    [InlineData("log(b*x)")]
    [InlineData("log10(b*x)")]
    [InlineData("sqrt(b*x)")]
    [InlineData("sin(b*x)")]
    [InlineData("cos(b*x)")]
    [InlineData("tan(b*x)")]
    [InlineData("atan(b*x)")]
    [InlineData("arctan(b*x)")]
    [InlineData("b*x*pi")]
    public void Functions_and_pi_mean_what_System_Math_means(string text)
    {
        // log is the natural logarithm, as in NIST's Nelson model log[y] and in C's log().
        const double b = 0.7, x = 1.3;
        var expected = text switch
        {
            "exp(b*x)" => Math.Exp(b * x),
            "ln(b*x)" or "log(b*x)" => Math.Log(b * x),
            "log10(b*x)" => Math.Log10(b * x),
            "sqrt(b*x)" => Math.Sqrt(b * x),
            "sin(b*x)" => Math.Sin(b * x),
            "cos(b*x)" => Math.Cos(b * x),
            "tan(b*x)" => Math.Tan(b * x),
            "b*x*pi" => b * x * Math.PI,
            _ => Math.Atan(b * x),
        };
        Assert.Equal(expected, Parse(text).Evaluate([b], [x]), 15);
    }

    [Fact]
    public void The_beta_thermistor_model_evaluates_as_written_out()
    {
        // R(T) = R25 exp(B (1/T - 1/298.15)), the Beta equation of NTC thermistor datasheets.
        var model = Parse("R25*exp(beta*(1/x - 1/298.15))");
        Assert.Equal(["R25", "beta"], model.ParameterNames.ToArray());
        Assert.Equal(10000 * Math.Exp(3950 * ((1 / 320.0) - (1 / 298.15))), model.Evaluate([10000, 3950], [320.0]), 10);
    }

    [Fact]
    public void Names_that_are_not_variables_become_parameters_in_order_of_first_appearance()
    {
        var model = Parse("b2*x + b1 - b2");
        Assert.Equal(["b2", "b1"], model.ParameterNames.ToArray());
        Assert.Equal(["x"], model.VariableNames.ToArray());
        Assert.Equal((3.0 * 2.0) + 5.0 - 3.0, model.Evaluate([3.0, 5.0], [2.0]));
    }

    [Fact]
    public void A_given_parameter_list_fixes_the_order_of_the_parameter_vector()
    {
        // NIST ENSO names b5 before b4; the certified values are in b1..b9 order.
        var result = ExpressionParser.Parse("b1 + b3*x + b2", X, ["b1", "b2", "b3"]);
        Assert.True(result.IsSuccess, result.Error?.Message);
        Assert.Equal(["b1", "b2", "b3"], result.Expression.ParameterNames.ToArray());
        Assert.Equal(1.0 + (3.0 * 10.0) + 2.0, result.Expression.Evaluate([1.0, 2.0, 3.0], [10.0]));
    }

    [Fact]
    public void A_model_can_have_several_variables()
    {
        // NIST Nelson: log[y] = b1 - b2*x1 * exp[-b3*x2], with x1 time and x2 temperature.
        var result = ExpressionParser.Parse("b1 - b2*x1 * exp[-b3*x2]", ["x1", "x2"]);
        Assert.True(result.IsSuccess, result.Error?.Message);
        Assert.Equal(["x1", "x2"], result.Expression.VariableNames.ToArray());
        Assert.Equal(2.5 - (1e-8 * 16 * Math.Exp(0.05 * 180)), result.Expression.Evaluate([2.5, 1e-8, -0.05], [16, 180]), 14);
    }

    [Fact]
    public void Whitespace_and_line_breaks_separate_tokens_and_mean_nothing_else()
    {
        var model = Parse("b1 *\n  x\t+ 2");
        Assert.Equal((3.0 * 4.0) + 2.0, model.Evaluate([3.0], [4.0]));
    }

    [Fact]
    public void Constant_parts_are_folded_to_one_number()
    {
        // b*(2*pi/12) is three instructions: push b, push the constant pi/6, multiply.
        var model = Parse("b*(2*pi/12)");
        Assert.Equal(3, model.Program.Length);
        Assert.Equal(Math.PI / 6 * 2.0, model.Evaluate([2.0], [0.0]), 15);
    }

    [Fact]
    public void Outside_a_function_s_domain_the_value_is_NaN_or_infinite_and_nothing_throws()
    {
        var model = Parse("ln(b*x) + sqrt(x) + 1/(x - b)");
        Assert.True(double.IsNaN(model.Evaluate([-1.0], [1.0])));
        Assert.True(double.IsInfinity(model.Evaluate([1.0], [1.0])));
    }

    [Theory]
    [InlineData("b1*", 4, "the end of the expression")]
    [InlineData("b1 + 2x", 7, "never implied")]
    [InlineData("b1*(x+1", 4, "never closed")]
    [InlineData("b1*x)", 5, "no opening bracket")]
    [InlineData("b1*(x]", 6, "their own kind")]
    [InlineData("b1*exp x", 4, "is a function")]
    [InlineData("b1*exp", 4, "is a function")]
    [InlineData("b1(x)", 1, "is not a function")]
    [InlineData("b1*abs(x)", 4, "is not a function")]
    [InlineData("b1 $ x", 4, "'$'")]
    [InlineData("b1*1e999", 4, "too large")]
    [InlineData("b1*.", 4, "not a number")]
    [InlineData("b1*ln(0)", 4, "no finite value")]
    [InlineData("b1*(1/0)", 6, "no finite value")]
    [InlineData("b1 * * x", 6, "expected a number")]
    [InlineData("()", 2, "expected a number")]
    [InlineData("b1 x", 4, "never implied")]
    [InlineData("b1*x é", 6, "U+00E9")]
    public void Each_refusal_names_the_column_of_the_problem(string text, int column, string fragment) =>
        AssertRefused(ExpressionParser.Parse(text, X), column, fragment);

    [Fact]
    public void An_empty_expression_is_refused() =>
        AssertRefused(ExpressionParser.Parse("  ", X), 0, "empty");

    [Fact]
    public void An_expression_without_a_parameter_is_refused() =>
        AssertRefused(ExpressionParser.Parse("2*x + pi", X), 0, "no parameter");

    [Fact]
    public void A_name_outside_a_given_parameter_list_is_refused_at_its_column() =>
        AssertRefused(ExpressionParser.Parse("b1*x + c", X, ["b1"]), 8, "neither a parameter (b1) nor a variable (x)");

    [Fact]
    public void A_listed_parameter_the_expression_does_not_use_is_refused() =>
        AssertRefused(ExpressionParser.Parse("b1*x", X, ["b1", "b2"]), 0, "'b2' is listed");

    [Theory]
    [InlineData("exp", "the expression language uses it")]
    [InlineData("pi", "the expression language uses it")]
    [InlineData("2x", "not a valid variable name")]
    [InlineData("x-1", "not a valid variable name")]
    [InlineData("", "not a valid variable name")]
    public void A_variable_name_that_is_reserved_or_malformed_is_refused(string name, string fragment) =>
        AssertRefused(ExpressionParser.Parse("b*y", [name]), 0, fragment);

    [Fact]
    public void A_name_given_both_as_variable_and_as_parameter_is_refused() =>
        AssertRefused(ExpressionParser.Parse("b*x", X, ["x"]), 0, "given twice");

    [Fact]
    public void The_length_limit_is_inclusive()
    {
        var longest = "b" + string.Concat(Enumerable.Repeat("+1", (ExpressionLanguage.MaxLength - 1) / 2));
        longest += new string(' ', ExpressionLanguage.MaxLength - longest.Length);
        Assert.Equal(ExpressionLanguage.MaxLength, longest.Length);
        Assert.True(ExpressionParser.Parse(longest, X).IsSuccess);
        AssertRefused(ExpressionParser.Parse(longest + " ", X), ExpressionLanguage.MaxLength + 1, "over the limit of 2000");
    }

    [Fact]
    public void The_nesting_limit_is_inclusive()
    {
        // Each '(' adds one level below the top one; 63 pairs nest 64 levels deep.
        var deepest = new string('(', ExpressionLanguage.MaxDepth - 1) + "b" + new string(')', ExpressionLanguage.MaxDepth - 1);
        Assert.True(ExpressionParser.Parse(deepest, X).IsSuccess);
        var tooDeep = "(" + deepest + ")";
        AssertRefused(ExpressionParser.Parse(tooDeep, X), ExpressionLanguage.MaxDepth + 1, "more than 64 levels");
    }

    [Fact]
    public void A_long_chain_of_sums_is_not_deep()
    {
        // Left-associative chains are loops, not recursion: 300 terms nest one level.
        var chain = string.Join("+", Enumerable.Range(1, 300).Select(i => "b*" + i.ToString(CultureInfo.InvariantCulture)));
        var model = Parse(chain);
        Assert.Equal(300.0 * 301.0 / 2.0, model.Evaluate([1.0], [0.0]));
    }

    [Fact]
    public void The_parameter_limit_is_inclusive()
    {
        string Sum(int count) => string.Join("+", Enumerable.Range(1, count).Select(i => "p" + i.ToString(CultureInfo.InvariantCulture)));
        Assert.Equal(ExpressionLanguage.MaxParameters, Parse(Sum(ExpressionLanguage.MaxParameters)).ParameterCount);
        var text = Sum(ExpressionLanguage.MaxParameters + 1);
        AssertRefused(ExpressionParser.Parse(text, X), text.LastIndexOf('p') + 1, "33 parameters");
    }

    private static ModelExpression Parse(string text)
    {
        var result = ExpressionParser.Parse(text, X);
        Assert.True(result.IsSuccess, text + ": " + result.Error?.Message);
        return result.Expression;
    }

    private static void AssertRefused(ExpressionParseResult result, int column, string fragment)
    {
        Assert.False(result.IsSuccess);
        Assert.NotNull(result.Error);
        Assert.Contains(fragment, result.Error!.Message, StringComparison.Ordinal);
        Assert.Equal(column, result.Error.Column);
        Assert.Throws<InvalidOperationException>(() => result.Expression);
    }
}
