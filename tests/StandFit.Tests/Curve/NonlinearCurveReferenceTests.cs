using System.Globalization;
using StandFit.Core.Evaluation;
using StandFit.Core.Fitting.Nonlinear;
using StandFit.Core.Ingest;
using StandFit.Core.Judging;
using StandFit.Edges.RecipeFiles;
using StandFit.Tests.Support;

namespace StandFit.Tests.Curve;

/// <summary>
/// Expression models from a recipe through UnitEvaluator (Levenberg-Marquardt, then the t
/// intervals and the recipe's band_at, sensitivity_at and inverse_at figures on the linearised
/// fit) against R: nls() polished by Gauss-Newton for the estimates, standard errors, residual SD
/// and correlations, and the
/// delta method with R's own symbolic derivatives for the bands, sensitivities and inverse
/// predictions. Every reference value is read from
/// tests/StandFit.Tests/Fixtures/Curve/nonlinear-curve-reference.csv, made by
/// nonlinear_curve_reference.R beside it (R 4.2.2, base R).
/// </summary>
public sealed class NonlinearCurveReferenceTests
{
    /// <summary>The script polishes nls's estimates by Gauss-Newton steps; the two agree to about 1e-12, and 1e-9 leaves room for another platform's exp and log.</summary>
    private const double Tolerance = 1e-9;

    private static readonly Lazy<ReferenceFixture> Fixture = new(() => ReferenceFixture.Load("tests", "StandFit.Tests", "Fixtures", "Curve", "nonlinear-curve-reference.csv"));

    private static ReferenceFixture R => Fixture.Value;

    public static TheoryData<string, string, string, string, string> Cases => new()
    {
        // case, sweep file, stimulus column, output column, model keys
        { "beta", "thermistor-sweep.csv", "temp_K", "r_ohm", "  expression: R25*exp(beta*(1/x - 1/298.15))\n  parameters:\n    R25: { start: 9000, unit: ohm }\n    beta: { start: 3500, unit: K }" },
        { "rise", "rise-sweep.csv", "x_pct", "out_V", "  expression: y0 + span*(1 - exp(-x/tau))\n  parameters:\n    y0: { start: 0 }\n    span: { start: 3 }\n    tau: { start: 20 }" },
    };

    [Fact]
    public void The_reference_values_name_the_R_that_made_them()
    {
        Assert.StartsWith("produced by nonlinear_curve_reference.R", R.Header, StringComparison.Ordinal);
        Assert.Contains("R version 4.2.2", R.Header, StringComparison.Ordinal);
    }

    [Theory]
    [MemberData(nameof(Cases))]
    public void The_estimates_standard_errors_and_correlations_are_those_of_R_nls(string name, string sweep, string stimulus, string output, string model)
    {
        var unit = Evaluate(name, sweep, stimulus, output, model);

        Assert.Equal(Ruling.Pass, unit.Ruling);
        var fit = Assert.IsType<NonlinearFitResult>(unit.Fit);
        Assert.True(fit.Converged);
        Close(name + " coef", unit.Parameters.Select(p => p.Estimate), R.Values(name, "coef"));
        Close(name + " se", unit.Parameters.Select(p => p.StandardError), R.Values(name, "se"));
        Close(name + " sigma", [fit.ResidualSd], R.Values(name, "sigma"));
        Assert.Equal((int)R.Values(name, "df")[0], fit.DegreesOfFreedom);
        CloseAbsolute(name + " cor", fit.Correlation, R.Values(name, "cor"));
    }

    [Theory]
    [MemberData(nameof(Cases))]
    public void The_bands_and_sensitivities_are_the_delta_method_values_of_R(string name, string sweep, string stimulus, string output, string model)
    {
        var unit = Evaluate(name, sweep, stimulus, output, model);
        var bands = unit.Curve.Where(c => c.Kind == DerivedKind.BandAt).ToList();
        var slopes = unit.Curve.Where(c => c.Kind == DerivedKind.SensitivityAt).ToList();

        Close(name + " band_fit", bands.Select(b => b.Value), R.Values(name, "band_fit"));
        Close(name + " band_se", bands.Select(b => b.StandardError), R.Values(name, "band_se"));
        Close(name + " conf_lwr", bands.Select(b => b.Low), R.Values(name, "conf_lwr"));
        Close(name + " conf_upr", bands.Select(b => b.High), R.Values(name, "conf_upr"));
        Close(name + " pred_lwr", bands.Select(b => b.PredictionLow!.Value), R.Values(name, "pred_lwr"));
        Close(name + " pred_upr", bands.Select(b => b.PredictionHigh!.Value), R.Values(name, "pred_upr"));
        Close(name + " sens", slopes.Select(s => s.Value), R.Values(name, "sens"));
        Close(name + " sens_se", slopes.Select(s => s.StandardError), R.Values(name, "sens_se"));
    }

    [Theory]
    [MemberData(nameof(Cases))]
    public void The_inverse_predictions_and_their_intervals_are_those_of_R(string name, string sweep, string stimulus, string output, string model)
    {
        var unit = Evaluate(name, sweep, stimulus, output, model);
        var inverse = unit.Curve.Where(c => c.Kind == DerivedKind.InverseAt).ToList();

        Assert.All(inverse, i => Assert.True(i.IsOk, i.Name + ": " + i.StatusCode));
        Close(name + " inv_x0", inverse.Select(i => i.Value), R.Values(name, "inv_x0"));
        Close(name + " inv_se", inverse.Select(i => i.StandardError), R.Values(name, "inv_se"));
        Close(name + " inv_slope", inverse.Select(i => i.Slope!.Value), R.Values(name, "inv_slope"));
        Close(name + " inv_lwr", inverse.Select(i => i.IntervalLow!.Value), R.Values(name, "inv_lwr"));
        Close(name + " inv_upr", inverse.Select(i => i.IntervalHigh!.Value), R.Values(name, "inv_upr"));
    }

    /// <summary>The unit judged under an expression recipe that asks for a band and a sensitivity at each of R's points and an inverse prediction at each of R's outputs.</summary>
    private static UnitEvaluation Evaluate(string name, string sweep, string stimulus, string output, string model)
    {
        var derived = string.Concat(R.Values(name, "band_x").Select((x, i) => Invariant($"  band_{i}: {{ band_at: {x:R} }}\n  slope_{i}: {{ sensitivity_at: {x:R} }}\n")))
            + string.Concat(R.Values(name, "inv_y0").Select((y, i) => Invariant($"  inverse_{i}: {{ inverse_at: {y:R} }}\n")));
        var text = "recipe: nonlinear reference\nversion: \"1\"\nparts: [NL-1]\nconfidence: 0.95\n"
            + $"columns:\n  stimulus: {stimulus}\n  output: {output}\nmodel:\n  type: expression\n{model}\nderived:\n{derived}";
        var recipe = RecipeBinder.Bind("nl-1.yaml", text, "hash");
        Assert.True(recipe.IsSuccess, string.Join("; ", recipe.Problems));
        var lines = File.ReadAllLines(RepoPaths.InRepo("tests", "StandFit.Tests", "Fixtures", "Curve", sweep)).Where(l => l.Length > 0);
        var table = SweepTextParser.Parse(name + ".csv", "# serial: NL-0001\n# part: NL-1\n" + string.Join('\n', lines) + "\n").Value;
        return UnitEvaluator.Evaluate(table, recipe.Value);
    }

    private static string Invariant(FormattableString s) => s.ToString(CultureInfo.InvariantCulture);

    private static void Close(string what, IEnumerable<double> actual, IReadOnlyList<double> expected)
    {
        var a = actual.ToList();
        Assert.Equal(expected.Count, a.Count);
        for (var i = 0; i < a.Count; i++)
        {
            Assert.True(
                Math.Abs(a[i] - expected[i]) <= Tolerance * Math.Abs(expected[i]),
                Invariant($"{what} [{i}]: StandFit {a[i]:R}, R {expected[i]:R}"));
        }
    }

    private static void CloseAbsolute(string what, IEnumerable<double> actual, IReadOnlyList<double> expected)
    {
        var a = actual.ToList();
        Assert.Equal(expected.Count, a.Count);
        for (var i = 0; i < a.Count; i++)
        {
            Assert.True(Math.Abs(a[i] - expected[i]) <= Tolerance, Invariant($"{what} [{i}]: StandFit {a[i]:R}, R {expected[i]:R}"));
        }
    }
}
