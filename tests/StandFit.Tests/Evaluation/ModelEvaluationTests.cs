using System.Globalization;
using StandFit.Core.Evaluation;
using StandFit.Core.Ingest;
using StandFit.Core.Judging;
using StandFit.Core.Problems;
using StandFit.Core.Recipes;
using StandFit.Edges.Outputs;
using StandFit.Edges.RecipeFiles;
using StandFit.Tests.Support;

namespace StandFit.Tests.Evaluation;

/// <summary>
/// The new models, several stimulus columns and weights through the whole pipeline for one unit:
/// a recipe file's text, a sweep file's text, UnitEvaluator and the summary row. The reference
/// values are R's, read from tests/StandFit.Tests/Fixtures/Curve/curve-reference.csv (made by
/// curve_reference.R beside it, which also wrote the sweeps used here).
/// </summary>
public sealed class ModelEvaluationTests
{
    private static readonly Lazy<ReferenceFixture> Fixture = new(() => ReferenceFixture.Load("tests", "StandFit.Tests", "Fixtures", "Curve", "curve-reference.csv"));

    private static ReferenceFixture R => Fixture.Value;

    /// <summary>A sweep file: the metadata lines, then the R-written CSV of the fixture folder (header and rows).</summary>
    private static SweepTable SweepFile(string fixture, string serial, string? extraColumn = null, Func<int, string>? extraCell = null)
    {
        var lines = File.ReadAllLines(RepoPaths.InRepo("tests", "StandFit.Tests", "Fixtures", "Curve", fixture)).Where(l => l.Length > 0).ToList();
        if (extraColumn is not null)
        {
            lines = [lines[0] + "," + extraColumn, .. lines.Skip(1).Select((l, i) => l + "," + extraCell!(i))];
        }

        var text = $"# serial: {serial}\n# part: X-1\n" + string.Join('\n', lines) + "\n";
        return SweepTextParser.Parse(serial + ".csv", text).Value;
    }

    private static Recipe RecipeOf(string body)
    {
        var result = RecipeBinder.Bind("x-1.yaml", "recipe: x-1\nversion: \"1\"\nparts: [X-1]\nconfidence: 0.95\n" + body, "hash");
        Assert.True(result.IsSuccess, string.Join("; ", result.Problems));
        return result.Value;
    }

    private static void Close(string what, IEnumerable<double> actual, IReadOnlyList<double> expected)
    {
        var a = actual.ToList();
        Assert.Equal(expected.Count, a.Count);
        for (var i = 0; i < a.Count; i++)
        {
            Assert.True(
                Math.Abs(a[i] - expected[i]) <= 1e-9 * Math.Abs(expected[i]),
                string.Create(CultureInfo.InvariantCulture, $"{what} [{i}]: StandFit {a[i]:R}, R {expected[i]:R}"));
        }
    }

    [Fact]
    public void A_pressure_temperature_surface_is_judged_from_two_stimulus_columns()
    {
        var recipe = RecipeOf("""
            columns:
              stimulus: [pressure_kPa, temp_C]
              output: output_mV
            units:
              stimulus: [kPa, degC]
              output: mV
            model:
              type: basis
              terms: [1, x1, x2, x1^2, x1*x2]
            decision:
              rule: guarded
            limits:
              b1: { min: 0.019, max: 0.021 }
            """);

        var unit = UnitEvaluator.Evaluate(SweepFile("surface-sweep.csv", "PS-1"), recipe);

        Assert.Equal(Ruling.Pass, unit.Ruling);
        Close("surface coefficients", unit.Parameters.Select(p => p.Estimate), R.Values("surface", "coef")); // R: coef(lm(...))
        Close("surface standard errors", unit.Parameters.Select(p => p.StandardError), R.Values("surface", "se"));
        var row = SummaryRecordFactory.Create(unit, "sha", DateTime.UnixEpoch, "test");
        Assert.Equal("basis(1, x1, x2, x1^2, x1*x2)", row.Model);
        Assert.False(row.Weighted);
        Assert.Equal("mV/(kPa*degC)", row.Parameters[4].Unit);
    }

    [Fact]
    public void A_pt100_is_judged_on_its_derived_coefficients_and_the_row_carries_them()
    {
        var recipe = RecipeOf("""
            columns:
              stimulus: temp_C
              output: r_ohm
            units:
              stimulus: degC
              output: ohm
            model:
              type: callendar-van-dusen
            decision:
              rule: guarded
            limits:
              R0: { min: 99.94, max: 100.06 }
              A: { min: 3.90e-3, max: 3.92e-3 }
            """);

        var unit = UnitEvaluator.Evaluate(SweepFile("pt100-sweep.csv", "PT-1"), recipe);

        Assert.Equal(Ruling.Pass, unit.Ruling);
        Assert.Equal<string>(["R0.within_limits", "A.within_limits"], unit.Verdict.Codes);
        var row = SummaryRecordFactory.Create(unit, "sha", DateTime.UnixEpoch, "test");
        Assert.Equal<string>(["R0", "A", "B", "alpha"], row.Derived.Select(d => d.Name));
        Assert.Equal<string>(["ohm", "1/degC", "1/degC^2", "1/degC"], row.Derived.Select(d => d.Unit!));

        // R: the trade coefficients and msm::deltamethod standard errors.
        Close("derived", row.Derived.Select(d => d.Estimate), R.Values("pt100", "derived"));
        Close("derived SE", row.Derived.Select(d => d.StandardError), R.Values("pt100", "derived_se"));
    }

    [Fact]
    public void A_recipe_weight_rule_gives_r_weighted_fit()
    {
        var recipe = RecipeOf("""
            columns:
              stimulus: pressure_kPa
              output: output_mA
            model:
              type: straight-line
            weights:
              u_fixed: 0.002
              u_relative: 0.0005
            """);

        var unit = UnitEvaluator.Evaluate(SweepFile("transmitter-sweep.csv", "TX-1"), recipe);

        Assert.True(unit.Fit!.IsWeighted);
        Close("weighted coefficients", unit.Parameters.Select(p => p.Estimate), R.Values("weighted", "coef")); // R: lm(weights = 1/u^2)
        Close("weighted SEs", unit.Parameters.Select(p => p.StandardError), R.Values("weighted", "se"));
        Assert.True(SummaryRecordFactory.Create(unit, "sha", DateTime.UnixEpoch, "test").Weighted);
    }

    [Fact]
    public void An_uncertainty_column_weights_the_fit_like_the_rule_that_filled_it()
    {
        var recipe = RecipeOf("""
            columns:
              stimulus: pressure_kPa
              output: output_mA
            model:
              type: straight-line
            weights:
              column: u_mA
            """);
        var table = SweepFile("transmitter-sweep.csv", "TX-2");
        var outputs = table.Rows.Select(r => double.Parse(r.Cells[1], CultureInfo.InvariantCulture)).ToList();
        var withColumn = SweepFile("transmitter-sweep.csv", "TX-2", "u_mA", i => (0.002 + (0.0005 * Math.Abs(outputs[i]))).ToString("R", CultureInfo.InvariantCulture));

        var unit = UnitEvaluator.Evaluate(withColumn, recipe);

        Close("weighted coefficients", unit.Parameters.Select(p => p.Estimate), R.Values("weighted", "coef")); // R: lm(weights = 1/u^2)
    }

    [Fact]
    public void An_uncertainty_of_zero_in_the_column_rejects_the_unit_at_its_cell()
    {
        var recipe = RecipeOf("""
            columns:
              stimulus: pressure_kPa
              output: output_mA
            model:
              type: straight-line
            weights:
              column: u_mA
            """);

        var unit = UnitEvaluator.Evaluate(SweepFile("transmitter-sweep.csv", "TX-3", "u_mA", i => i == 4 ? "0" : "0.01"), recipe);

        Assert.Equal(Ruling.Rejected, unit.Ruling);
        Assert.Equal(ReasonCodes.InputBadUncertainty.Code, unit.Problem!.Code);

        // Two metadata lines and the header come first: data row 5 (index 4) is line 8; the column is the third.
        Assert.Equal(SourceLocation.At("TX-3.csv", 8, 3), unit.Problem.Location);
    }

    [Fact]
    public void Ln_of_a_stimulus_of_zero_rejects_the_unit_with_fit_domain_naming_the_line()
    {
        var recipe = RecipeOf("""
            columns:
              stimulus: pressure_kPa
              output: output_mA
            model:
              type: basis
              terms: [1, ln(x)]
            """);

        var unit = UnitEvaluator.Evaluate(SweepFile("transmitter-sweep.csv", "TX-4"), recipe);

        Assert.Equal(Ruling.Rejected, unit.Ruling);
        Assert.Equal(ReasonCodes.FitDomain.Code, unit.Problem!.Code);
        Assert.Equal(SourceLocation.At("TX-4.csv", 4), unit.Problem.Location); // the first data row, pressure 0
        Assert.Contains("ln(x) needs x > 0", unit.Problem.Message, StringComparison.Ordinal);
        Assert.Contains("'pressure_kPa'", unit.Problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_thermistor_recipe_fits_steinhart_hart_as_r_does()
    {
        var recipe = RecipeOf("""
            columns:
              stimulus: r_ohm
              output: temp_K
            model:
              type: steinhart-hart
              temperature: kelvin
            """);

        var unit = UnitEvaluator.Evaluate(SweepFile("thermistor-sweep.csv", "NTC-1"), recipe);

        Close("A, B, C", unit.Parameters.Select(p => p.Estimate), R.Values("thermistor", "coef")); // R: lm(I(1/T) ~ log(R) + I(log(R)^3))
        Close("derived A, B, C", unit.Derived.Select(p => p.Estimate), R.Values("thermistor", "coef"));
        Assert.Equal("1/K", recipe.UnitOf("B"));
    }
}
