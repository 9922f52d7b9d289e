using System.Diagnostics;
using System.Globalization;
using System.Text;
using StandFit.Core.Diagnostics;
using StandFit.Core.Fitting;
using StandFit.Core.Merit;
using StandFit.Core.Uncertainty.Resampling;

namespace StandFit.Benchmarks;

/// <summary>
/// Where <see cref="ResidualDiagnostics.Compute"/> spends its time: the process's CPU time per
/// operation of each part alone, on the 41-point up/down sweep of <see cref="DiagnosticsBenchmarks"/>
/// (a profile, cross-checking the BenchmarkDotNet figures on a loaded machine; single-threaded; the
/// least CPU time of five rounds of <c>operations</c> calls).
/// </summary>
internal static class DiagnosticsProfile
{
    public static string Run(int operations)
    {
        var text = new StringBuilder();
        foreach (var degree in new[] { 1, 2 })
        {
            var rng = new Xoshiro256StarStar(20261202);
            var sweep = Simulation.UpDown(21, ref rng, c2: degree == 2 ? 2e-6 : 0);
            var fit = Simulation.Fit(sweep, Polynomial.OfDegree(degree));
            var options = new DiagnosticsOptions { SetPointTolerance = 1.0, Nominal = new NominalLine(Simulation.Offset, Simulation.Gain) };
            var residuals = fit.WeightedResiduals.ToArray();
            var design = DesignBasis.Of(fit);
            var eigenvalues = DurbinWatson.Eigenvalues(design, null);
            var dw = DurbinWatson.Compute(fit);
            var groups = SetPoints.Group(fit.Stimulus.AsSpan(), options.SetPointTolerance);
            var points = Influence.Points(fit);
            var acquisition = ResidualOrders.ByAcquisition(fit.Count);
            var kept = DurbinWatson.KeptColumns(design, null).Columns;
            var sine = DurbinWatson.SineTransform(kept, fit.Count);
            var parts = new (string Name, Func<double> Op)[]
            {
                ("ResidualDiagnostics.Compute (all)", () => ResidualDiagnostics.Compute(fit, sweep.Legs.AsSpan(), options).DurbinWatson.P),
                ("DesignBasis.Of", () => DesignBasis.Of(fit)[0, 0]),
                ("DurbinWatson eigenvalues", () => DurbinWatson.Eigenvalues(design, null)[0]),
                ("DurbinWatson.Compute (exact p)", () => DurbinWatson.Compute(fit).P),
                ("  without eigenvalues (columns+sines+integral)", () => DurbinWatson.LowerTailWithoutEigenvalues(design, null, dw.Statistic, true)),
                ("  kept columns", () => DurbinWatson.KeptColumns(design, null).M),
                ("  sine transform", () => DurbinWatson.SineTransform(kept, fit.Count).W[0]),
                ("  low-rank integral", () => LowRankQuadraticForm.LowerTail(sine.Lambda, sine.W, kept.Count, design.Columns - 1, dw.Statistic)),
                ("DurbinWatson Imhof integral", () => DurbinWatson.LowerTail(eigenvalues, dw.Statistic)),
                ("runs test (acquisition)", () => RunsTest.Compute(residuals, acquisition).P),
                ("lag-1 autocorrelation", () => Autocorrelation.Lag1(residuals).P),
                ("set points", () => SetPoints.Group(fit.Stimulus.AsSpan(), options.SetPointTolerance).Count),
                ("lack of fit", () => LackOfFit.Compute(fit, groups).P),
                ("curvature", () => Curvature.Compute(fit, design).P),
                ("Breusch-Pagan", () => BreuschPagan.Compute(fit, design).P),
                ("Shapiro-Wilk", () => ShapiroWilk.Compute(residuals).P),
                ("Anderson-Darling", () => AndersonDarling.Compute(residuals).P),
                ("moments", () => MomentsResult.Of(residuals).Skewness),
                ("influence points", () => Influence.Points(fit).Leverage[0]),
                ("outlier test", () => Influence.OutlierTest(fit, points).P),
                ("histogram", () => ResidualHistogram.FreedmanDiaconis(residuals).Counts.Length),
                ("figures of merit", () => FiguresOfMerit.Compute(fit.Stimulus.AsSpan(), fit.Output.AsSpan(), sweep.Legs.AsSpan(), groups, fit.ResidualSd, options.Nominal)!.FullScaleOutput),
            };
            text.Append(CultureInfo.InvariantCulture, $"degree {degree}, {fit.Count} points, {eigenvalues.Length} Durbin-Watson eigenvalues:\n");
            foreach (var (name, op) in parts)
            {
                var sink = 0.0;
                for (var i = 0; i < Math.Max(1, operations / 10); i++)
                {
                    sink += op();
                }

                // The least of five rounds: the machine may be shared, and load only ever adds time.
                var perOp = double.PositiveInfinity;
                for (var round = 0; round < 5; round++)
                {
                    var process = Process.GetCurrentProcess();
                    var before = process.TotalProcessorTime;
                    for (var i = 0; i < operations; i++)
                    {
                        sink += op();
                    }

                    process.Refresh();
                    perOp = Math.Min(perOp, (process.TotalProcessorTime - before).TotalMicroseconds / operations);
                }

                text.Append(CultureInfo.InvariantCulture, $"  {name,-36} {perOp,8:F2} us CPU{(double.IsNaN(sink) ? " (NaN)" : "")}\n");
            }
        }

        return text.ToString();
    }
}
