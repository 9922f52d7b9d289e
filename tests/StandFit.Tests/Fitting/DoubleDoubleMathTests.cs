using System.Globalization;
using StandFit.Core.Fitting;
using StandFit.Core.Fitting.Expressions;

namespace StandFit.Tests.Fitting;

/// <summary>
/// The double-double functions behind the precise residuals, against mpmath 1.3.0 at 50 digits
/// (the rows come from double_double_reference.py beside this file, which prints them). Each
/// reference is a double-double pair; the check is the relative error of the whole value.
/// </summary>
public sealed class DoubleDoubleMathTests
{
    /// <summary>About 100 times the unit roundoff of a double-double (2^-104 = 4.9e-32).</summary>
    private const double Tolerance = 5e-30;

    [Theory]
    [InlineData("exp", 0.5, 1.6487212707001282, -4.731568479435833e-17)]
    [InlineData("exp", -20.25, 1.6052280551856116e-09, -3.657643988865463e-26)]
    [InlineData("exp", 1e-08, 1.00000001, 1.1077471008511378e-16)]
    [InlineData("exp", 3.75, 42.52108200006278, -3.2371687033598516e-16)]
    [InlineData("exp", 700.0, 1.0142320547350045e+304, 1.6666571920734673e+287)]
    [InlineData("exp", -300.0, 5.148200222412013e-131, 2.962376373372979e-147)]
    [InlineData("ln", 0.001, -6.907755278982137, -2.1613487097372872e-16)]
    [InlineData("ln", 2.0, 0.6931471805599453, 2.3190468138462996e-17)]
    [InlineData("ln", 1.5, 0.4054651081081644, -2.8811380259626426e-18)]
    [InlineData("ln", 123456.789, 11.723646487185881, -4.1025541885795297e-16)]
    [InlineData("ln", 1e-300, -690.7755278982137, -2.3670096176709832e-14)]
    [InlineData("log10", 7.0, 0.8450980400142568, 1.7965820250441286e-17)]
    [InlineData("log10", 0.3, -0.5228787452803376, 4.133893249000496e-17)]
    [InlineData("sqrt", 2.0, 1.4142135623730951, -9.667293313452913e-17)]
    [InlineData("sqrt", 1e-10, 1e-05, -6.358695525628244e-22)]
    [InlineData("sqrt", 12345.678, 111.11110655555547, -4.3594669324288495e-15)]
    [InlineData("sin", 0.5, 0.479425538604203, -5.103969860556013e-18)]
    [InlineData("sin", 3.0, 0.1411200080598672, 8.577269787017502e-18)]
    [InlineData("sin", -7.25, -0.8230808790115055, 4.782695371371335e-17)]
    [InlineData("sin", 88.0, 0.03539830273366068, 3.261761595013287e-18)]
    [InlineData("sin", 1000.0, 0.8268795405320025, 3.867581909641312e-17)]
    [InlineData("cos", 0.5, 0.8775825618903728, -4.2623149864279997e-17)]
    [InlineData("cos", 1.5707963267948966, 6.123233995736766e-17, -1.4973849048591698e-33)]
    [InlineData("cos", -7.25, 0.5679241732886948, 4.202033681904503e-17)]
    [InlineData("cos", 88.0, 0.9993732836951247, -2.4196319977282323e-17)]
    [InlineData("tan", 0.7, 0.8422883804630794, -3.9128846706146343e-17)]
    [InlineData("tan", -1.2, -2.5721516221263188, 1.6240475489929127e-16)]
    [InlineData("atan", 0.5, 0.4636476090008061, 2.2698777452961687e-17)]
    [InlineData("atan", -3.0, -1.2490457723982544, 2.196203799612311e-18)]
    [InlineData("atan", 1000000.0, 1.5707953267948966, -2.0700964655603606e-17)]
    [InlineData("atan", 1e-05, 9.999999999666668e-06, -4.575803486027043e-22)]
    public void Each_function_agrees_with_mpmath_to_about_thirty_digits(string function, double argument, double hi, double lo)
    {
        var x = DoubleDoubleMath.Of(argument);
        var value = function switch
        {
            "exp" => DoubleDoubleMath.Exp(x),
            "ln" => DoubleDoubleMath.Log(x),
            "log10" => DoubleDoubleMath.Log10(x),
            "sqrt" => DoubleDoubleMath.Sqrt(x),
            "sin" => DoubleDoubleMath.Sin(x),
            "cos" => DoubleDoubleMath.Cos(x),
            "tan" => DoubleDoubleMath.Tan(x),
            "atan" => DoubleDoubleMath.Atan(x),
            _ => throw new ArgumentOutOfRangeException(nameof(function), function, "No such function."),
        };
        AssertClose(value, hi, lo, function + "(" + argument.ToString("R", CultureInfo.InvariantCulture) + ")");
    }

    [Theory]
    [InlineData(1.7, 2.5, 3.7680989902071307, 2.7983646200911753e-17)]
    [InlineData(0.3, -1.25, 4.504000516023448, -2.310870846397654e-16)]
    [InlineData(2.0, 0.5, 1.4142135623730951, -9.667293313452913e-17)]
    [InlineData(-1.5, 3.0, -3.375, 0.0)]
    [InlineData(1.0001, 10000.0, 2.7181459268249255, 2.6557210415801324e-17)]
    public void Powers_agree_with_mpmath_to_about_thirty_digits(double x, double exponent, double hi, double lo) =>
        AssertClose(DoubleDoubleMath.Power(DoubleDoubleMath.Of(x), DoubleDoubleMath.Of(exponent)), hi, lo, "pow");

    [Fact]
    public void Division_and_square_root_undo_multiplication()
    {
        // Exact identities: (1/3) * 3 = 1 and sqrt(2)^2 = 2, to the double-double's precision.
        var third = DoubleDoubleMath.Divide(DoubleDoubleMath.One, 3.0);
        AssertClose(DoubleDoubleMath.Multiply(third, 3.0), 1.0, 0.0, "(1/3)*3");
        var root = DoubleDoubleMath.Sqrt(DoubleDoubleMath.Of(2.0));
        AssertClose(DoubleDoubleMath.Multiply(root, root), 2.0, 0.0, "sqrt(2)^2");
    }

    [Fact]
    public void Infinities_and_domain_errors_come_out_as_the_double_functions_give_them()
    {
        // IEEE 754 and System.Math conventions: exp overflows to +inf, ln(0) = -inf, ln(-1) = NaN, atan(+inf) = pi/2.
        Assert.Equal(double.PositiveInfinity, DoubleDoubleMath.Exp(DoubleDoubleMath.Of(800)).Hi);
        Assert.Equal(double.NegativeInfinity, DoubleDoubleMath.Log(DoubleDoubleMath.Of(0)).Hi);
        Assert.True(double.IsNaN(DoubleDoubleMath.Log(DoubleDoubleMath.Of(-1)).Hi));
        Assert.Equal(Math.PI / 2, DoubleDoubleMath.Atan(DoubleDoubleMath.Of(double.PositiveInfinity)).Hi);
        Assert.Equal(0.0, DoubleDoubleMath.Exp(DoubleDoubleMath.Of(double.NegativeInfinity)).Hi);
    }

    private static void AssertClose(DoubleDouble value, double hi, double lo, string what)
    {
        var error = Math.Abs((value.Hi - hi) + (value.Lo - lo)) / Math.Abs(hi);
        Assert.True(
            error <= Tolerance,
            string.Create(CultureInfo.InvariantCulture, $"{what}: got ({value.Hi:R}, {value.Lo:R}), mpmath ({hi:R}, {lo:R}), relative error {error:E2}"));
    }
}
