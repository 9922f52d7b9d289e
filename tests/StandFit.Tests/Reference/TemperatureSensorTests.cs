using System.Collections.Immutable;
using System.Globalization;
using StandFit.Core.Fitting;
using StandFit.Core.Problems;
using StandFit.Core.Uncertainty;

namespace StandFit.Tests.Reference;

/// <summary>
/// The trade's temperature-sensor equations, against the values quoted in
/// shared/notes/trade-reference.md ("Temperature sensors"): IEC 60751 Callendar-Van Dusen for a
/// Pt100 (A = 3.9083e-3, B = -5.775e-7, R0 = 100 ohm; computed check values R(100 C) = 138.5055,
/// R(200 C) = 175.8560, R(850 C) = 390.4811 ohm, alpha = 0.00385055) and the published 10 kohm
/// Steinhart-Hart set (Steinhart and Hart 1968; A = 1.129148e-3, B = 2.34125e-4, C = 8.76741e-8
/// gives T(10 kohm) = 298.15 K to 0.001 K).
/// </summary>
public sealed class TemperatureSensorTests
{
    // IEC 60751 coefficients, as quoted in trade-reference.md.
    private const double IecA = 3.9083e-3;
    private const double IecB = -5.775e-7;
    private const double IecR0 = 100.0;

    // Steinhart and Hart (1968), the published 10 kohm set quoted in trade-reference.md.
    private static readonly double[] PublishedSh = [1.129148e-3, 2.34125e-4, 8.76741e-8];

    private static FitResult CvdFit()
    {
        // R(t) of the IEC 60751 Pt100 every 10 C over 0 ... 850 C (86 points), rounded only to double.
        ImmutableArray<double> t = [.. Enumerable.Range(0, 86).Select(i => 10.0 * i)];
        ImmutableArray<double> r = [.. t.Select(v => CallendarVanDusen.Resistance(IecR0, IecA, IecB, v))];
        var fit = LeastSquaresFitter.Fit(CallendarVanDusen.AboveZero, t, r, "pt100.csv");
        Assert.True(fit.IsSuccess, string.Join("; ", fit.Problems));
        return fit.Value;
    }

    [Theory]
    [InlineData(100.0, "138.5055")] // trade-reference.md, computed check value
    [InlineData(200.0, "175.8560")] // trade-reference.md, computed check value
    [InlineData(850.0, "390.4811")] // trade-reference.md, computed check value
    public void The_iec_60751_resistance_matches_the_computed_check_values(double t, string printed)
    {
        var reference = double.Parse(printed, NumberStyles.Float, CultureInfo.InvariantCulture);
        var fit = CvdFit();
        var fromEquation = CallendarVanDusen.Resistance(IecR0, IecA, IecB, t);
        var fromFit = fit.Model.Evaluate(fit.Estimates.AsSpan(), t);
        Assert.True(Math.Abs(fromEquation - reference) <= 0.5e-4, Describe("equation", t, fromEquation, printed));
        Assert.True(Math.Abs(fromFit - reference) <= 0.5e-4, Describe("fitted curve", t, fromFit, printed));
    }

    [Fact]
    public void A_pt100_sweep_over_0_to_850_C_is_fitted_back_to_the_iec_60751_coefficients()
    {
        var fit = CvdFit();
        var derived = DerivedEstimates.Compute(fit, ConfidenceLevel.Default95);
        Assert.Equal<string>(["R0", "A", "B", "alpha"], derived.Select(d => d.Name));

        // IEC 60751 values (trade-reference.md); the data are exact to double rounding, so ~1e-10 relative.
        AssertRelative("R0", derived[0].Estimate, IecR0, 1e-10);
        AssertRelative("A", derived[1].Estimate, IecA, 1e-10);
        AssertRelative("B", derived[2].Estimate, IecB, 1e-10);

        // trade-reference.md: alpha = 0.00385055 (= A + 100 B).
        Assert.Equal("0.00385055", derived[3].Estimate.ToString("G6", CultureInfo.InvariantCulture));
        AssertRelative("alpha", derived[3].Estimate, IecA + (100 * IecB), 1e-10);
    }

    [Fact]
    public void The_fitted_callendar_van_dusen_parameters_are_r0_and_r0_times_a_and_b()
    {
        var fit = CvdFit();

        // R(t) = R0 + (R0 A) t + (R0 B) t^2 with the IEC 60751 values of trade-reference.md.
        AssertRelative("offset", fit.Estimates[fit.IndexOf("offset")], IecR0, 1e-10);
        AssertRelative("gain", fit.Estimates[fit.IndexOf("gain")], IecR0 * IecA, 1e-10);
        AssertRelative("c2", fit.Estimates[fit.IndexOf("c2")], IecR0 * IecB, 1e-10);
    }

    [Fact]
    public void A_temperature_below_0_C_is_outside_the_callendar_van_dusen_model_above_zero_and_names_its_line()
    {
        ImmutableArray<double> t = [0, 50, -5, 100, 150];
        ImmutableArray<double> r = [.. t.Select(v => CallendarVanDusen.Resistance(IecR0, IecA, IecB, v))];
        var data = new FitData(t, r) { SourceName = "pt100.csv", SourceLines = [7, 8, 9, 10, 11], InputNames = ["temp_C"] };

        var fit = LeastSquaresFitter.Fit(CallendarVanDusen.AboveZero, data);

        Assert.False(fit.IsSuccess);
        var problem = Assert.Single(fit.Problems);
        Assert.Equal(ReasonCodes.FitDomain.Code, problem.Code);
        Assert.Equal(SourceLocation.At("pt100.csv", 9), problem.Location);
        Assert.Contains("'temp_C'", problem.Message, StringComparison.Ordinal);
        Assert.Contains("0 <= t <= 850", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void The_published_steinhart_hart_set_gives_298_15_K_at_10_kohm()
    {
        // trade-reference.md: T(10 kohm) = 298.15 K to 0.001 K.
        var t = SteinhartHart.TemperatureAt(PublishedSh, 10_000.0);
        Assert.True(Math.Abs(t - 298.15) <= 0.001, string.Create(CultureInfo.InvariantCulture, $"T(10 kohm) = {t:R} K"));
    }

    [Theory]
    [InlineData(TemperatureScale.Kelvin)]
    [InlineData(TemperatureScale.Celsius)]
    public void A_thermistor_sweep_is_fitted_back_to_the_published_steinhart_hart_coefficients(TemperatureScale scale)
    {
        // R from 1 kohm to 100 kohm in 25 geometric steps; T from the published set (trade-reference.md).
        ImmutableArray<double> r = [.. Enumerable.Range(0, 25).Select(i => 1000.0 * Math.Pow(100.0, i / 24.0))];
        ImmutableArray<double> kelvin = [.. r.Select(v => SteinhartHart.TemperatureAt(PublishedSh, v))];
        ImmutableArray<double> output = scale == TemperatureScale.Kelvin ? kelvin : [.. kelvin.Select(k => k - SteinhartHart.ZeroCelsius)];
        var model = new SteinhartHart(scale);

        var result = LeastSquaresFitter.Fit(model, r, output, "ntc.csv");

        Assert.True(result.IsSuccess, string.Join("; ", result.Problems));
        var fit = result.Value;
        Assert.Equal<string>(["A", "B", "C"], fit.Model.ParameterNames);

        // The Celsius data carry the rounding of T - 273.15 (about 1e-14 K), so 1e-8 relative on C.
        var tolerance = scale == TemperatureScale.Kelvin ? 1e-10 : 1e-8;
        for (var j = 0; j < 3; j++)
        {
            AssertRelative(fit.Model.ParameterNames[j], fit.Estimates[j], PublishedSh[j], tolerance);
        }

        var derived = DerivedEstimates.Compute(fit, ConfidenceLevel.Default95);
        Assert.Equal<double>(fit.Estimates, derived.Select(d => d.Estimate));

        // trade-reference.md: 298.15 K at 10 kohm (to 0.001 K), now from the fitted coefficients.
        var t = SteinhartHart.TemperatureAt(fit.Estimates.AsSpan(), 10_000.0);
        Assert.True(Math.Abs(t - 298.15) <= 0.001, string.Create(CultureInfo.InvariantCulture, $"T(10 kohm) = {t:R} K"));
    }

    [Fact]
    public void A_resistance_that_is_not_positive_is_outside_the_steinhart_hart_domain()
    {
        ImmutableArray<double> r = [1000, 2000, 0, 4000, 8000];
        ImmutableArray<double> t = [330, 320, 310, 300, 290];
        var data = new FitData(r, t) { SourceName = "ntc.csv", SourceLines = [5, 6, 7, 8, 9], InputNames = ["r_ohm"] };

        var fit = LeastSquaresFitter.Fit(new SteinhartHart(TemperatureScale.Kelvin), data);

        var problem = Assert.Single(fit.Problems);
        Assert.Equal(ReasonCodes.FitDomain.Code, problem.Code);
        Assert.Equal(7, problem.Location.Line);
        Assert.Contains("ln(x) needs x > 0", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_temperature_at_or_below_absolute_zero_is_outside_the_steinhart_hart_domain()
    {
        ImmutableArray<double> r = [1000, 2000, 3000, 4000, 8000];
        ImmutableArray<double> t = [30, 20, -273.15, 0, -10];
        var data = new FitData(r, t) { SourceName = "ntc.csv", SourceLines = [5, 6, 7, 8, 9] };

        var fit = LeastSquaresFitter.Fit(new SteinhartHart(TemperatureScale.Celsius), data);

        var problem = Assert.Single(fit.Problems);
        Assert.Equal(ReasonCodes.FitDomain.Code, problem.Code);
        Assert.Equal(7, problem.Location.Line);
    }

    private static string Describe(string what, double t, double value, string printed) =>
        string.Create(CultureInfo.InvariantCulture, $"{what}: R({t} C) = {value:R} ohm, check value {printed}");

    private static void AssertRelative(string what, double value, double reference, double tolerance)
    {
        var relative = Math.Abs(value - reference) / Math.Abs(reference);
        Assert.True(relative <= tolerance, string.Create(CultureInfo.InvariantCulture, $"{what}: {value:R}, reference {reference:R}, relative error {relative:E2} (allowed {tolerance:E0})"));
    }
}
