using StandFit.Core.Diagnostics;
using StandFit.Core.Fitting;
using StandFit.Core.Uncertainty.Resampling;
using StandFit.Tests.Support;

namespace StandFit.Tests.Diagnostics;

/// <summary>
/// A weighted fit is diagnosed and resampled in its whitened coordinates (rows and residuals times
/// sqrt(w)). With every reading given the same uncertainty u, the whitened problem is the unweighted
/// one scaled by 1/u, so every scale-free figure must come out as for the unweighted fit, and every
/// figure in output units the same too (the jackknife of a parameter does not depend on u at all).
/// This is a property of weighted least squares, not a reference value.
/// </summary>
public sealed class WeightedFitConsistencyTests
{
    private static readonly Polynomial Quadratic = Polynomial.OfDegree(2);

    private static (FitResult Plain, FitResult Weighted, Core.Ingest.Sweep Sweep) Fits(LinearModel model)
    {
        var sweep = SimulatedUnits.Line(21, seed: 11, c2: 2e-6);
        var plain = LeastSquaresFitter.Fit(model, new FitData(sweep.Stimulus, sweep.Output)).Value;
        var weighted = LeastSquaresFitter.Fit(model, new FitData(sweep.Stimulus, sweep.Output)
        {
            Uncertainties = [.. Enumerable.Repeat(0.004, sweep.Output.Length)],
        }).Value;
        Assert.True(weighted.IsWeighted);
        return (plain, weighted, sweep);
    }

    [Fact]
    public void Equal_weights_give_the_unweighted_residual_diagnostics()
    {
        var (plain, weighted, sweep) = Fits(Polynomial.StraightLine);
        var a = ResidualDiagnostics.Compute(plain, sweep.Legs.AsSpan(), DiagnosticsOptions.Default);
        var b = ResidualDiagnostics.Compute(weighted, sweep.Legs.AsSpan(), DiagnosticsOptions.Default);

        Assert.Equal(a.DurbinWatson.Statistic, b.DurbinWatson.Statistic, 10);
        Assert.Equal(a.DurbinWatson.P, b.DurbinWatson.P, 10);
        Assert.Equal(a.Curvature.P, b.Curvature.P, 10);
        Assert.Equal(a.BreuschPagan.P, b.BreuschPagan.P, 10);
        Assert.Equal(a.ShapiroWilk.W, b.ShapiroWilk.W, 10);
        Assert.Equal(a.Outliers.MaxAbsStudentized, b.Outliers.MaxAbsStudentized, 10);
        Assert.Equal(a.Points.CooksDistance.Max(), b.Points.CooksDistance.Max(), 10);
    }

    [Fact]
    public void Equal_weights_give_the_unweighted_delete_one_jackknife()
    {
        var (plain, weighted, sweep) = Fits(Quadratic);
        var plan = new ResamplingPlan(7);
        var recipe = SimulatedUnits.Recipe(plan, Quadratic);
        var a = ResamplingAnalysis.Run(plain, sweep, recipe, plan, 7);
        var b = ResamplingAnalysis.Run(weighted, sweep, recipe, plan, 7);
        foreach (var name in Quadratic.ParameterNames)
        {
            var ja = a.For(name)!.DeleteOne!;
            var jb = b.For(name)!.DeleteOne!;
            Assert.Equal(1.0, jb.StandardError / ja.StandardError, 9);
            Assert.Equal(1.0, jb.Estimate / ja.Estimate, 9);
        }
    }
}
