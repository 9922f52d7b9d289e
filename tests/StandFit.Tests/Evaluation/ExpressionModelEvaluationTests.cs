using System.Globalization;
using StandFit.Core.Evaluation;
using StandFit.Core.Fitting;
using StandFit.Core.Fitting.Nonlinear;
using StandFit.Core.Ingest;
using StandFit.Core.Judging;
using StandFit.Core.Problems;
using StandFit.Core.Recipes;
using StandFit.Edges.Outputs;
using StandFit.Edges.RecipeFiles;
using StandFit.Tests.Support;

namespace StandFit.Tests.Evaluation;

/// <summary>
/// Expression models through the pipeline for one unit: a model linear in its parameters written as
/// an expression gives, through Levenberg-Marquardt and the Jacobian at the solution, every figure
/// the QR fit of the same curve gives (the reference: the QR fit, itself checked against R in
/// CurveReferenceTests and DiagnosticsAgainstRTests); and a search that gives no solution rejects
/// the unit with its status, iterations and stop reason, never a NaN result.
/// </summary>
public sealed class ExpressionModelEvaluationTests
{
    private const string Columns = "columns:\n  stimulus: pressure_kPa\n  output: output_mA\nunits:\n  stimulus: kPa\n  output: mA\n";

    private const string Derived = "derived:\n  mid: { band_at: 500 }\n  fs: { value_at: 1000 }\n  slope_250: { sensitivity_at: 250 }\n  at_12mA: { inverse_at: 12.0 }\n  at_4mA: { inverse_at: 3.0 }\n";

    private const string Rise = "  expression: y0 + span*(1 - exp(-x/tau))\n  parameters:\n    y0: { start: 0 }\n    span: { start: 3 }\n";

    public static TheoryData<string, string> LinearCurves => new()
    {
        { "  type: straight-line", "  type: expression\n  expression: offset + gain*x\n  parameters:\n    offset: { start: 0 }\n    gain: { start: 0.01 }" },
        { "  type: polynomial\n  degree: 2", "  type: expression\n  expression: offset + gain*x + c2*x^2\n  parameters:\n    offset: { start: 0 }\n    gain: { start: 0.01 }\n    c2: { start: 0 }" },
    };

    [Theory]
    [MemberData(nameof(LinearCurves))]
    public void A_linear_curve_written_as_an_expression_gives_the_figures_of_the_QR_fit(string linearModel, string expressionModel)
    {
        var sweep = Transmitter();
        var linear = UnitEvaluator.Evaluate(sweep, RecipeOf(Columns + "model:\n" + linearModel + "\n" + Derived));
        var expression = UnitEvaluator.Evaluate(sweep, RecipeOf(Columns + "model:\n" + expressionModel + "\n" + Derived));

        Assert.IsType<FitResult>(linear.Fit);
        Assert.IsType<NonlinearFitResult>(expression.Fit);
        Assert.Equal(linear.Fit!.DegreesOfFreedom, expression.Fit!.DegreesOfFreedom);

        // Reference: the QR fit of the same curve on the same sweep.
        Close("estimates", expression.Parameters.Select(p => p.Estimate), linear.Parameters.Select(p => p.Estimate), 1e-9);
        Close("standard errors", expression.Parameters.Select(p => p.StandardError), linear.Parameters.Select(p => p.StandardError), 1e-7);
        Close("correlations", expression.Fit.Correlation, linear.Fit.Correlation, 1e-7, absolute: true);
        Close("leverage", expression.Fit.Leverage, linear.Fit.Leverage, 1e-9, absolute: true);
        Assert.True(expression.Fit.HasIntercept);
        foreach (var figure in new[] { "residual_sd", "r_squared", "adj_r_squared", "runs_p", "dw_p", "bp_p", "sw_p", "ad_p", "max_leverage", "max_cooks_distance", "max_abs_rstudent", "outlier_p", "fso", "nonlinearity_ls_pct" })
        {
            Assert.True(linear.Figures.ContainsKey(figure), figure);
            Close(figure, [expression.Figures[figure].Value], [linear.Figures[figure].Value], 1e-7);
        }

        Assert.Equal(linear.Curve.Select(c => (c.Name, c.Status)), expression.Curve.Select(c => (c.Name, c.Status)));
        foreach (var (a, b) in expression.Curve.Zip(linear.Curve).Where(p => p.Second.IsOk))
        {
            Close(a.Name + " value", [a.Value], [b.Value], 1e-9);
            Close(a.Name + " se", [a.StandardError], [b.StandardError], 1e-7);
            Close(a.Name + " interval", [a.Low, a.High, a.PredictionLow ?? 0, a.PredictionHigh ?? 0, a.IntervalLow ?? 0, a.IntervalHigh ?? 0], [b.Low, b.High, b.PredictionLow ?? 0, b.PredictionHigh ?? 0, b.IntervalLow ?? 0, b.IntervalHigh ?? 0], 1e-8);
        }

        // 3 mA is below the transmitter's 4 mA zero: no stimulus in the sweep gives it.
        Assert.Equal(Core.Curve.CurveFigureStatus.OutsideRange, expression.Curve.Single(c => c.Name == "at_4mA").Status);
    }

    [Fact]
    public void A_search_that_reaches_its_iteration_limit_rejects_the_unit_with_fit_not_converged()
    {
        var unit = UnitEvaluator.Evaluate(RiseSweep(), RecipeOf(RiseColumns + "model:\n  type: expression\n" + Rise + "    tau: { start: 20 }\n  max_iterations: 2\n"));

        Assert.Equal(Ruling.Rejected, unit.Ruling);
        Assert.Equal(ReasonCodes.FitNotConverged.Code, unit.Problem!.Code);
        Assert.Contains("max-iterations after 2 iterations", unit.Problem.Message, StringComparison.Ordinal);
        Assert.Contains("stopped at the limit of 2 iterations", unit.Problem.Message, StringComparison.Ordinal);
        Assert.Null(unit.Fit);
        Assert.Empty(unit.Parameters);
        Assert.Equal(NonlinearFitStatus.MaxIterations, unit.Search!.Status);

        var row = SummaryRecordFactory.Create(unit, new string('a', 64), DateTime.UtcNow, "test");
        Assert.Equal("rejected", row.Ruling);
        Assert.Equal("max-iterations", row.FitStatus);
        Assert.Equal(2, row.FitIterations);
        Assert.StartsWith("did not converge", row.FitStopReason, StringComparison.Ordinal);
        Assert.Empty(row.Parameters);
        Assert.Null(row.ResidualSd);
        Assert.Equal(["fit.not_converged"], row.ReasonCodes);
    }

    [Fact]
    public void A_parameter_that_ends_on_its_bound_rejects_the_unit_with_fit_at_bound()
    {
        // The sweep's time constant is 30 (rise-sweep.csv, nonlinear_curve_reference.R); the recipe allows at most 25.
        var unit = UnitEvaluator.Evaluate(RiseSweep(), RecipeOf(RiseColumns + "model:\n  type: expression\n" + Rise + "    tau: { start: 20, min: 1, max: 25 }\n"));

        Assert.Equal(ReasonCodes.FitAtBound.Code, unit.Problem!.Code);
        Assert.Contains("'tau' on its upper bound 25", unit.Problem.Message, StringComparison.Ordinal);
        Assert.Null(unit.Fit);
    }

    [Fact]
    public void A_model_that_is_not_finite_at_the_start_rejects_the_unit_with_fit_non_finite()
    {
        // ln(x - c) with c = 50 is NaN for the sweep's points below 50 %RH.
        var unit = UnitEvaluator.Evaluate(RiseSweep(), RecipeOf(RiseColumns + "model:\n  type: expression\n  expression: a + b*ln(x - c)\n  parameters:\n    a: { start: 0 }\n    b: { start: 1 }\n    c: { start: 50 }\n"));

        Assert.Equal(ReasonCodes.FitNonFinite.Code, unit.Problem!.Code);
        Assert.Contains("non-finite", unit.Problem.Message, StringComparison.Ordinal);
        Assert.Empty(unit.Figures);
    }

    [Fact]
    public void Parameters_the_sweep_cannot_separate_reject_the_unit_as_rank_deficient()
    {
        // a and b appear only as their product: the Jacobian's columns for them are parallel.
        var unit = UnitEvaluator.Evaluate(RiseSweep(), RecipeOf(RiseColumns + "model:\n  type: expression\n  expression: c + a*b*x\n  parameters:\n    a: { start: 1 }\n    b: { start: 0.03 }\n    c: { start: 0 }\n"));

        Assert.Equal(ReasonCodes.FitRankDeficient.Code, unit.Problem!.Code);
        Assert.Contains("singular-jacobian", unit.Problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_converged_expression_fit_fills_the_status_covariance_and_curve_columns_of_the_summary_row()
    {
        var recipe = RecipeOf(RiseColumns + "model:\n  type: expression\n" + Rise + "    tau: { start: 20, unit: \"%RH\" }\n"
            + "derived:\n  at_3V: { inverse_at: 3.0 }\n  band_50: { band_at: 50 }\ndecision:\n  rule: guarded\nlimits:\n  at_3V: { min: 29, max: 30 }\n  at_3V.half_width: { max: 0.2, rule: simple }\n  band_50.prediction_half_width: { max: 0.01, rule: simple }\n  tau: { min: 29, max: 31 }\n");
        var unit = UnitEvaluator.Evaluate(RiseSweep(), recipe);
        var row = SummaryRecordFactory.Create(unit, new string('a', 64), DateTime.UtcNow, "test");

        Assert.Equal(Ruling.Pass, unit.Ruling);
        Assert.Equal("expression(y0 + span*(1 - exp(-x/tau)))", row.Model);
        Assert.StartsWith("converged-", row.FitStatus, StringComparison.Ordinal);
        Assert.True(row.FitIterations > 0);
        Assert.Equal(9, row.Covariance.Count);
        Assert.Equal(1.0, row.Correlation[4]);
        Assert.Equal(["at_3V", "band_50"], row.Curve.Select(c => c.Name));
        var inverse = row.Curve[0];
        Assert.Equal(("inverse_at", "ok", "%RH"), (inverse.Kind, inverse.Status, inverse.Unit));
        Assert.True(inverse.IntervalLow < inverse.Value && inverse.Value < inverse.IntervalHigh);
        Assert.Contains(row.ReasonCodes, c => c == "at_3V.within_limits");
        Assert.Contains(row.ReasonCodes, c => c == "band_50.prediction_half_width.within_limits");
        Assert.Equal("%RH", row.Parameters.Single(p => p.Name == "tau").Unit);
    }

    private const string RiseColumns = "columns:\n  stimulus: x_pct\n  output: out_V\nunits:\n  stimulus: \"%RH\"\n  output: V\n";

    private static Recipe RecipeOf(string body)
    {
        var result = RecipeBinder.Bind("x-1.yaml", "recipe: x-1\nversion: \"1\"\nparts: [X-1]\nconfidence: 0.95\n" + body, "hash");
        Assert.True(result.IsSuccess, string.Join("; ", result.Problems));
        return result.Value;
    }

    private static SweepTable Transmitter() => Sweep("transmitter-sweep.csv");

    private static SweepTable RiseSweep() => Sweep("rise-sweep.csv");

    /// <summary>A sweep file from an R-written CSV of tests/StandFit.Tests/Fixtures/Curve.</summary>
    private static SweepTable Sweep(string fixture)
    {
        var lines = File.ReadAllLines(RepoPaths.InRepo("tests", "StandFit.Tests", "Fixtures", "Curve", fixture)).Where(l => l.Length > 0);
        return SweepTextParser.Parse(fixture, "# serial: X-0001\n# part: X-1\n" + string.Join('\n', lines) + "\n").Value;
    }

    private static void Close(string what, IEnumerable<double> actual, IEnumerable<double> expected, double tolerance, bool absolute = false)
    {
        var a = actual.ToList();
        var e = expected.ToList();
        Assert.Equal(e.Count, a.Count);
        for (var i = 0; i < a.Count; i++)
        {
            var scale = absolute ? 1.0 : Math.Abs(e[i]);
            Assert.True(Math.Abs(a[i] - e[i]) <= tolerance * scale, string.Create(CultureInfo.InvariantCulture, $"{what} [{i}]: expression {a[i]:R}, QR {e[i]:R}"));
        }
    }
}
