using System.Collections.Immutable;
using System.Globalization;
using StandFit.Core.Curve;
using StandFit.Core.Fitting;
using StandFit.Core.Recipes;
using StandFit.Core.Uncertainty;
using StandFit.Tests.Support;

namespace StandFit.Tests.Curve;

/// <summary>
/// Fits, bands, sensitivities and inverse predictions against R: every expected value is read from
/// tests/StandFit.Tests/Fixtures/Curve/curve-reference.csv, computed by curve_reference.R beside it
/// (R's lm, predict(interval = "confidence" / "prediction"), uniroot on predict for the inverse, the
/// closed-form calibration formula for the straight line, msm::deltamethod for the trade
/// coefficients); the fixture's first line names the R version. The sweeps are the files R wrote
/// beside it and the NIST StRD Pontius data. R is not needed to run these tests.
/// </summary>
public sealed class CurveReferenceTests
{
    private const double Tolerance = 1e-9;

    private static readonly ConfidenceLevel Level = ConfidenceLevel.Of(0.95); // curve_reference.R: level <- 0.95

    private static readonly Lazy<ReferenceFixture> Fixture = new(() => ReferenceFixture.Load("tests", "StandFit.Tests", "Fixtures", "Curve", "curve-reference.csv"));

    private static ReferenceFixture R => Fixture.Value;

    private static Dictionary<string, ImmutableArray<double>> Sweep(string file) =>
        ReferenceFixture.Table("tests", "StandFit.Tests", "Fixtures", "Curve", file);

    private static FitResult Fitted(LinearModel model, FitData data)
    {
        var result = LeastSquaresFitter.Fit(model, data);
        Assert.True(result.IsSuccess, string.Join("; ", result.Problems));
        return result.Value;
    }

    private static FitResult Pontius()
    {
        var data = StrdFile.Linear("Pontius.dat");
        return Fitted(Polynomial.OfDegree(2), new FitData(data.X, data.Y));
    }

    private static FitResult Transmitter(bool weighted)
    {
        var sweep = Sweep("transmitter-sweep.csv");
        var rule = new WeightRule(0.002, 0.0005); // curve_reference.R: u <- 0.002 + 0.0005 |y|
        var data = new FitData(sweep["pressure_kPa"], sweep["output_mA"])
        {
            Uncertainties = weighted ? [.. sweep["output_mA"].Select(rule.UncertaintyOf)] : default,
        };
        return Fitted(Polynomial.StraightLine, data);
    }

    private static FitResult Surface()
    {
        var sweep = Sweep("surface-sweep.csv");
        var terms = new[] { "1", "x1", "x2", "x1^2", "x1*x2" }.Select(t => BasisTermParser.Parse(t, 2).Term!);
        return Fitted(new BasisModel(terms, 2), new FitData([sweep["pressure_kPa"], sweep["temp_C"]], sweep["output_mV"]));
    }

    private static FitResult Thermistor(bool weighted = false)
    {
        var sweep = Sweep("thermistor-sweep.csv");
        var rule = new WeightRule(0.01, 0.0001); // curve_reference.R: ut <- 0.01 + 0.0001 T (K)
        var data = new FitData(sweep["r_ohm"], sweep["temp_K"])
        {
            Uncertainties = weighted ? [.. sweep["temp_K"].Select(rule.UncertaintyOf)] : default,
        };
        return Fitted(new SteinhartHart(TemperatureScale.Kelvin), data);
    }

    private static FitResult Pt100()
    {
        var sweep = Sweep("pt100-sweep.csv");
        return Fitted(CallendarVanDusen.AboveZero, new FitData(sweep["temp_C"], sweep["r_ohm"]));
    }

    public static TheoryData<string> FittedCases() => new() { "line", "weighted", "surface", "thermistor", "thermistor_weighted", "pt100" };

    private static FitResult Case(string name) => name switch
    {
        "line" => Transmitter(weighted: false),
        "weighted" => Transmitter(weighted: true),
        "surface" => Surface(),
        "thermistor" => Thermistor(),
        "thermistor_weighted" => Thermistor(weighted: true), // R: weights T^4 / u(T)^2 on 1/T
        "pt100" => Pt100(),
        _ => Pontius(),
    };

    [Fact]
    public void The_fixture_names_the_r_version_that_produced_it()
    {
        Assert.StartsWith("produced by curve_reference.R", R.Header, StringComparison.Ordinal);
        Assert.Contains("R version 4.2.2", R.Header, StringComparison.Ordinal);
    }

    [Theory]
    [MemberData(nameof(FittedCases))]
    public void Coefficients_standard_errors_and_fit_statistics_match_r_lm(string name)
    {
        var fit = Case(name);

        // R: coef(fit), summary(fit)$coefficients[, 2], $sigma, $df.residual, $r.squared, $adj.r.squared.
        Close(name + " coefficients", fit.Estimates, R.Values(name, "coef"));
        Close(name + " standard errors", Enumerable.Range(0, fit.ParameterCount).Select(fit.StandardError).ToList(), R.Values(name, "se"));
        Close(name + " residual SD", [fit.ResidualSd], [R.Value(name, "sigma")]);
        Assert.Equal((int)R.Value(name, "df"), fit.DegreesOfFreedom);
        Close(name + " R-squared", [fit.RSquared], [R.Value(name, "r2")]);
        Close(name + " adjusted R-squared", [fit.AdjustedRSquared], [R.Value(name, "adjr2")]);
    }

    [Theory]
    [MemberData(nameof(FittedCases))]
    public void The_correlation_matrix_matches_r_cov2cor(string name)
    {
        var fit = Case(name);
        var expected = R.Values(name, "cor"); // R: as.vector(t(cov2cor(vcov(fit)))), row-major
        Assert.Equal(expected.Count, fit.Correlation.Length);
        for (var i = 0; i < expected.Count; i++)
        {
            Assert.True(Math.Abs(fit.Correlation[i] - expected[i]) <= Tolerance, Describe($"{name} correlation [{i}]", fit.Correlation[i], expected[i]));
        }
    }

    [Theory]
    [InlineData("pontius")]
    [InlineData("line")]
    [InlineData("weighted")]
    [InlineData("thermistor")]
    public void Confidence_and_prediction_bands_match_r_predict(string name)
    {
        var fit = Case(name);
        double? u0 = name == "weighted" ? R.Value(name, "u0") : null; // R: predict(..., weights = 1/u0^2)
        var xs = R.Values(name, "band_x");
        var bands = xs.Select(x => CurveUse.BandAt(fit, x, Level, u0)).ToList();
        AssertBands(name, bands);
    }

    [Fact]
    public void Bands_of_a_polynomial_surface_in_two_inputs_match_r_predict()
    {
        var fit = Surface();
        var x1 = R.Values("surface", "band_x1");
        var x2 = R.Values("surface", "band_x2");
        var bands = x1.Select((p, i) => CurveUse.BandAt(fit, [p, x2[i]], Level)).ToList();
        AssertBands("surface", bands);
    }

    [Fact]
    public void The_sensitivity_and_its_standard_error_match_the_gradient_computed_in_r()
    {
        // R: dy/dx from the centred-and-scaled quadratic's coefficients; se = sqrt(g' vcov g).
        var pontius = Pontius();
        var points = R.Values("pontius", "sens_x");
        var slopes = points.Select(x => CurveUse.SensitivityAt(pontius, x, Level)).ToList();
        Close("pontius sensitivity", slopes.Select(s => s.Value).ToList(), R.Values("pontius", "sens"));
        Close("pontius sensitivity SE", slopes.Select(s => s.StandardError).ToList(), R.Values("pontius", "sens_se"));

        // R: d/dp of the surface at (p, t) = b1 + 2 b3 p + b4 t, and its se.
        var surface = Surface();
        var x1 = R.Values("surface", "band_x1");
        var x2 = R.Values("surface", "band_x2");
        var partial = x1.Select((p, i) => CurveUse.SensitivityAt(surface, [p, x2[i]], Level, input: 0)).ToList();
        Close("surface dy/dp", partial.Select(s => s.Value).ToList(), R.Values("surface", "sens"));
        Close("surface dy/dp SE", partial.Select(s => s.StandardError).ToList(), R.Values("surface", "sens_se"));

        // R: d(1/T)/dR = (B + 3 C ln(R)^2) / R.
        var thermistor = Thermistor();
        var resistances = R.Values("thermistor", "band_x");
        Close("thermistor slope", resistances.Select(r => CurveUse.SensitivityAt(thermistor, r, Level).Value).ToList(), R.Values("thermistor", "sens"));
    }

    [Theory]
    [InlineData("pontius", "inv", 1)]
    [InlineData("line", "inv", 1)]
    [InlineData("line", "inv3", 3)]
    [InlineData("weighted", "inv", 1)]
    [InlineData("thermistor", "inv", 1)]
    public void Inverse_prediction_matches_r(string name, string tag, int observations)
    {
        var fit = Case(name);
        double? u0 = name == "weighted" ? R.Value(name, "u0") : null;
        var responses = R.Values(name, tag + "_y0");
        var solved = responses.Select(y0 => InversePrediction.Solve(fit, y0, Level, observations, u0)).ToList();
        AssertInverse(name + " " + tag, solved);
    }

    [Fact]
    public void Inverse_prediction_on_a_surface_holds_the_other_input_fixed()
    {
        // R: the pressure that gives 10 mV at 25 C.
        var fit = Surface();
        var solved = InversePrediction.Solve(fit, R.Value("surface", "inv_y0"), Level, input: 0, at: [0.0, 25.0]);
        AssertInverse("surface", [solved]);
    }

    [Theory]
    [InlineData(1)]
    [InlineData(3)]
    public void The_inverse_standard_error_of_a_straight_line_is_the_textbook_calibration_formula(int observations)
    {
        // R: (s / |b|) sqrt(1/m + 1/n + (y0 - ybar)^2 / (b^2 Sxx)) at y0 = 12.000 mA, written out in closed form.
        var fit = Transmitter(weighted: false);
        var solved = InversePrediction.Solve(fit, 12.000, Level, observations);
        Close("textbook calibration SE", [solved.StandardError], [R.Value("line", "textbook_se_m" + observations.ToString(CultureInfo.InvariantCulture))]);
    }

    [Fact]
    public void Weighted_residuals_are_the_raw_residuals_times_the_square_root_of_the_weight()
    {
        // R: residuals(fit) and weighted.residuals(fit).
        var fit = Transmitter(weighted: true);
        Assert.True(fit.IsWeighted);
        Close("raw residuals", fit.Residuals, R.Values("weighted", "res"), absoluteFloor: 1e-12);
        Close("weighted residuals", fit.WeightedResiduals, R.Values("weighted", "wres"), absoluteFloor: 1e-9);
    }

    [Fact]
    public void The_callendar_van_dusen_trade_coefficients_and_their_delta_method_errors_match_msm()
    {
        // R: R0 = c0, A = c1/c0, B = c2/c0, alpha = (c1 + 100 c2)/c0, se by msm::deltamethod.
        var fit = Pt100();
        var derived = DerivedEstimates.Compute(fit, Level);
        Close("trade coefficients", derived.Select(d => d.Estimate).ToList(), R.Values("pt100", "derived"));
        Close("their standard errors", derived.Select(d => d.StandardError).ToList(), R.Values("pt100", "derived_se"));
    }

    private static void AssertBands(string name, IReadOnlyList<BandPoint> bands)
    {
        Close(name + " fitted", bands.Select(b => b.Fitted).ToList(), R.Values(name, "band_fit"));
        Close(name + " se of the mean", bands.Select(b => b.MeanStandardError).ToList(), R.Values(name, "band_se"));
        Close(name + " confidence low", bands.Select(b => b.ConfidenceLow).ToList(), R.Values(name, "conf_lwr"));
        Close(name + " confidence high", bands.Select(b => b.ConfidenceHigh).ToList(), R.Values(name, "conf_upr"));
        Close(name + " prediction low", bands.Select(b => b.PredictionLow).ToList(), R.Values(name, "pred_lwr"));
        Close(name + " prediction high", bands.Select(b => b.PredictionHigh).ToList(), R.Values(name, "pred_upr"));
    }

    private static void AssertInverse(string name, IReadOnlyList<InverseEstimate> solved)
    {
        var tag = name.EndsWith("inv3", StringComparison.Ordinal) ? "inv3" : "inv";
        var @case = name.Split(' ')[0];
        Assert.All(solved, s => Assert.Equal(InverseStatus.Solved, s.Status));
        Close(name + " x0", solved.Select(s => s.Stimulus).ToList(), R.Values(@case, tag + "_x0"));
        Close(name + " calibration SE", solved.Select(s => s.StandardError).ToList(), R.Values(@case, tag + "_se"));
        Close(name + " inverse interval low", solved.Select(s => s.IntervalLow!.Value).ToList(), R.Values(@case, tag + "_lwr"));
        Close(name + " inverse interval high", solved.Select(s => s.IntervalHigh!.Value).ToList(), R.Values(@case, tag + "_upr"));
    }

    private static void Close(string what, IReadOnlyList<double> actual, IReadOnlyList<double> expected, double absoluteFloor = 0)
    {
        Assert.True(actual.Count == expected.Count, $"{what}: {actual.Count} values, R has {expected.Count}");
        for (var i = 0; i < actual.Count; i++)
        {
            var allowed = Math.Max(Tolerance * Math.Abs(expected[i]), absoluteFloor);
            Assert.True(Math.Abs(actual[i] - expected[i]) <= allowed, Describe($"{what} [{i}]", actual[i], expected[i]));
        }
    }

    private static string Describe(string what, double actual, double expected) =>
        string.Create(CultureInfo.InvariantCulture, $"{what}: StandFit {actual:R}, R {expected:R}, relative difference {Math.Abs(actual - expected) / Math.Max(Math.Abs(expected), double.Epsilon):E2}");
}
