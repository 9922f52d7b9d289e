using System.Globalization;
using StandFit.Core.Diagnostics;
using StandFit.Core.Fitting;
using StandFit.Core.Ingest;
using StandFit.Tests.Support;

namespace StandFit.Tests.Reference;

/// <summary>
/// NIST/SEMATECH e-Handbook of Statistical Methods, section 4.6.1 (load cell calibration, the StRD
/// Pontius data), as quoted in shared/notes/trade-reference.md: the straight line is rejected (its
/// residuals have a horseshoe shape; lack-of-fit F = 214.7464 against F(0.05; 18, 20) = 2.15), and
/// the quadratic leaves residuals that look random, of constant variance, independent and normal.
/// Judged here at the 5 % level the handbook uses. The data are two runs in increasing-load order,
/// so the tests on acquisition order and on stimulus order see different sequences.
/// </summary>
public sealed class PontiusDiagnosticsHandbookTests
{
    private const double Level = 0.05;

    [Fact]
    public void With_the_straight_line_the_runs_lack_of_fit_curvature_and_normality_checks_flag_the_fit()
    {
        var (fit, d) = Diagnose(Polynomial.StraightLine);
        var runs = StimulusRuns(fit);
        Assert.True(runs.P < Level, P("runs (stimulus order)", runs.P));
        Assert.True(d.LackOfFit.P < Level, P("lack of fit", d.LackOfFit.P));
        Assert.True(d.Curvature.P < Level, P("curvature", d.Curvature.P));
        Assert.True(d.ShapiroWilk.P < Level, P("Shapiro-Wilk", d.ShapiroWilk.P));
        Assert.True(d.AndersonDarling.P < Level, P("Anderson-Darling", d.AndersonDarling.P));
    }

    [Fact]
    public void The_straight_line_lack_of_fit_F_is_the_handbooks_214_75_on_18_and_20_degrees_of_freedom()
    {
        // Handbook: F = 214.7464; R's anova gives 214.74692 (make-fixtures.R). The handbook's value
        // holds to the five significant digits 214.75 (its residual SD is also off in the 7th digit,
        // see PontiusHandbookTests).
        var (_, d) = Diagnose(Polynomial.StraightLine);
        Assert.Equal(18, d.LackOfFit.LackDf);
        Assert.Equal(20, d.LackOfFit.PureErrorDf);
        Assert.Equal(214.75, Math.Round(d.LackOfFit.F, 2));
        Assert.True(d.LackOfFit.F > 2.15); // F(0.05; 18, 20) from the handbook
    }

    [Fact]
    public void With_the_quadratic_no_check_flags_the_fit()
    {
        var (fit, d) = Diagnose(Polynomial.OfDegree(2));
        var runs = StimulusRuns(fit);
        Assert.True(runs.P >= Level, P("runs (stimulus order)", runs.P));
        Assert.True(d.RunsByAcquisition.P >= Level, P("runs (acquisition order)", d.RunsByAcquisition.P));
        Assert.True(d.DurbinWatson.P >= Level, P("Durbin-Watson", d.DurbinWatson.P));
        Assert.True(d.LackOfFit.P >= Level, P("lack of fit", d.LackOfFit.P));
        Assert.True(d.Curvature.P >= Level, P("curvature", d.Curvature.P));
        Assert.True(d.BreuschPagan.P >= Level, P("Breusch-Pagan", d.BreuschPagan.P));
        Assert.True(d.ShapiroWilk.P >= Level, P("Shapiro-Wilk", d.ShapiroWilk.P));
        Assert.True(d.AndersonDarling.P >= Level, P("Anderson-Darling", d.AndersonDarling.P));
        Assert.True(d.Outliers.P >= Level, P("outliers", d.Outliers.P));
    }

    [Fact]
    public void Acquisition_order_and_stimulus_order_give_different_runs_of_residual_signs()
    {
        foreach (var model in new LinearModel[] { Polynomial.StraightLine, Polynomial.OfDegree(2) })
        {
            var (fit, d) = Diagnose(model);
            var byStimulus = StimulusRuns(fit);
            Assert.NotEqual(byStimulus.Runs, d.RunsByAcquisition.Runs);
        }

        // The straight line's horseshoe, once per run of loads in acquisition order, once in stimulus order.
        var (line, lineDiagnostics) = Diagnose(Polynomial.StraightLine);
        Assert.Equal(3, StimulusRuns(line).Runs);
        Assert.Equal(5, lineDiagnostics.RunsByAcquisition.Runs);
    }

    private static (FitResult Fit, ResidualDiagnostics Diagnostics) Diagnose(LinearModel model)
    {
        var data = StrdFile.Linear("Pontius.dat");
        var fit = LeastSquaresFitter.Fit(model, data.X, data.Y, "Pontius.dat").Value;
        var legs = Enumerable.Repeat(Leg.Unknown, fit.Count).ToArray();
        return (fit, ResidualDiagnostics.Compute(fit, legs, new DiagnosticsOptions { SetPointTolerance = 0 }));
    }

    private static RunsTestResult StimulusRuns(FitResult fit) =>
        RunsTest.Compute(fit.Residuals.AsSpan(), ResidualOrders.ByStimulus(fit.Stimulus.AsSpan()));

    private static string P(string test, double p) => string.Create(CultureInfo.InvariantCulture, $"{test}: p = {p:G4}");
}
