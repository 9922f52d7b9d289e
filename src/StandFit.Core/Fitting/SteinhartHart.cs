using System.Collections.Immutable;

namespace StandFit.Core.Fitting;

/// <summary>The unit of a temperature column.</summary>
public enum TemperatureScale
{
    Kelvin,
    Celsius,
}

/// <summary>
/// The Steinhart-Hart equation of an NTC thermistor (Steinhart and Hart 1968, Deep-Sea Research
/// 15: 497): 1/T = A + B ln R + C (ln R)^3, T in kelvin, R in ohm. The stimulus is the
/// thermistor's resistance and the output the reference temperature; the fitted response is 1/T
/// (in 1/K), so residuals and bands are on that scale; the readings' standard uncertainties of a
/// weighted fit (in K) become u(1/T) = u(T) / T^2. Parameters A, B, C are the trade's own
/// coefficients and are also the derived quantities.
/// </summary>
public sealed class SteinhartHart : BasisModel
{
    /// <summary>0 degrees Celsius in kelvin.</summary>
    public const double ZeroCelsius = 273.15;

    private static readonly ImmutableArray<string> Names = ["A", "B", "C"];

    public SteinhartHart(TemperatureScale temperature)
        : base([BasisTerm.Constant(1), BasisTerm.LogPower(1, 0, 1), BasisTerm.LogPower(1, 0, 3)], 1, Names, "steinhart-hart")
    {
        Temperature = temperature;
    }

    /// <summary>The unit of the output (temperature) column.</summary>
    public TemperatureScale Temperature { get; }

    public override string? ResponseDescription => "1/T in 1/K";

    public override ImmutableArray<string> DerivedNames => Names;

    /// <summary>T in kelvin from the coefficients A, B, C at resistance <paramref name="resistance"/> (ohm).</summary>
    public static double TemperatureAt(ReadOnlySpan<double> abc, double resistance)
    {
        var ln = Math.Log(resistance);
        return 1.0 / (abc[0] + (abc[1] * ln) + (abc[2] * ln * ln * ln));
    }

    public override double TransformResponse(double output) => 1.0 / Kelvin(output);

    /// <summary>u(1/T) = u(T) / T^2 (delta method), T in kelvin.</summary>
    public override double TransformUncertainty(double output, double uncertainty)
    {
        var kelvin = Kelvin(output);
        return uncertainty / (kelvin * kelvin);
    }

    public override string? CheckResponse(double output) =>
        Kelvin(output) > 0 ? null : "Steinhart-Hart needs a temperature above 0 K";

    public override void Derive(ReadOnlySpan<double> parameters, Span<double> values, Span<double> jacobian)
    {
        jacobian.Clear();
        for (var j = 0; j < 3; j++)
        {
            values[j] = parameters[j];
            jacobian[(j * 3) + j] = 1.0;
        }
    }

    public override string UnitOf(int parameter, ImmutableArray<string> inputUnits, string outputUnit) => "1/K";

    public override string DerivedUnitOf(int derived, ImmutableArray<string> inputUnits, string outputUnit) => "1/K";

    private double Kelvin(double output) => Temperature == TemperatureScale.Celsius ? output + ZeroCelsius : output;
}
