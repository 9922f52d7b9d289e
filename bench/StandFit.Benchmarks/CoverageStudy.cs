using System.Globalization;
using System.Text;
using StandFit.Core.Fitting;
using StandFit.Core.Recipes;
using StandFit.Core.Uncertainty;
using StandFit.Core.Uncertainty.Resampling;

namespace StandFit.Benchmarks;

/// <summary>
/// How often the 95 % intervals for the gain cover the true gain, over simulated straight-line
/// units with Gaussian noise (truth: offset 0.01, gain 0.2, sigma 0.005; set points evenly over
/// 0-250). Each unit has its own noise stream and its own resampling stream, so the figures are the
/// same on every run. Prints a Markdown table for docs/uncertainty.md.
/// </summary>
internal static class CoverageStudy
{
    private const int B = 1000;
    private static readonly int[] Sizes = [11, 21, 41];
    private static readonly BootstrapScheme[] Schemes = [BootstrapScheme.Pairs, BootstrapScheme.Residual, BootstrapScheme.WildRademacher, BootstrapScheme.WildMammen];

    public static string Run(int units)
    {
        var level = ConfidenceLevel.Of(0.95);
        var methods = new List<string> { "t (analytic)", "jackknife (delete-one)" };
        foreach (var s in Schemes)
        {
            foreach (var m in new[] { "percentile", "basic", "BCa" })
            {
                methods.Add(ResamplingPlan.SchemeName(s) + " " + m);
            }
        }

        var table = new StringBuilder();
        table.Append(CultureInfo.InvariantCulture, $"Coverage of the true gain by 95 % intervals, {units} simulated units per sweep size, B = {B} resamples (binomial SE of a coverage near 95 %: {100 * Math.Sqrt(0.95 * 0.05 / units):F2} points). Mean width relative to the t interval in brackets.\n\n");
        table.Append("| interval |");
        foreach (var n in Sizes)
        {
            table.Append(CultureInfo.InvariantCulture, $" n = {n} |");
        }

        table.Append("\n|---|");
        foreach (var _ in Sizes)
        {
            table.Append("---|");
        }

        table.Append('\n');
        var cover = new double[Sizes.Length, methods.Count];
        var width = new double[Sizes.Length, methods.Count];
        for (var s = 0; s < Sizes.Length; s++)
        {
            var n = Sizes[s];
            var hits = new bool[units, methods.Count];
            var widths = new double[units, methods.Count];
            Parallel.For(0, units, u =>
            {
                var serial = string.Create(CultureInfo.InvariantCulture, $"COV-{n}-{u}");
                var noise = new Xoshiro256StarStar(StreamSeed.Derive(1, serial, "noise"));
                var sweep = Simulation.Sweep(n, ref noise, serial: serial);
                var fit = Simulation.Fit(sweep, Polynomial.StraightLine);
                var t = TIntervals.Compute(fit, level)[1];
                var k = 0;
                void Record(double low, double high)
                {
                    hits[u, k] = low <= Simulation.Gain && Simulation.Gain <= high;
                    widths[u, k] = (high - low) / (t.High - t.Low);
                    k++;
                }

                Record(t.Low, t.High);
                var first = true;
                foreach (var scheme in Schemes)
                {
                    var plan = new ResamplingPlan(7) { Bootstrap = scheme, Resamples = B, ResamplesStated = true };
                    var recipe = new Recipe("coverage", "1", ["SIM"], new StandFit.Core.Ingest.ColumnMap("x", "y"), ColumnUnits.None, Polynomial.StraightLine, level, [], null, "", "c.yaml") { Resampling = plan };
                    var gain = ResamplingAnalysis.Run(fit, sweep, recipe, plan, StreamSeed.Derive(plan.Seed, serial, ResamplingPlan.SchemeName(scheme))).For("gain")!;
                    if (first)
                    {
                        var j = gain.JackknifeInterval!.Value;
                        Record(j.Low, j.High);
                        first = false;
                    }

                    var b = gain.Bootstrap!;
                    foreach (var interval in new[] { b.Percentile, b.Basic, b.Bca })
                    {
                        if (interval is { } iv)
                        {
                            Record(iv.Low, iv.High);
                        }
                        else
                        {
                            Record(double.NaN, double.NaN);
                        }
                    }
                }
            });

            for (var m = 0; m < methods.Count; m++)
            {
                double c = 0, w = 0;
                for (var u = 0; u < units; u++)
                {
                    c += hits[u, m] ? 1 : 0;
                    w += widths[u, m];
                }

                cover[s, m] = 100 * c / units;
                width[s, m] = w / units;
            }
        }

        for (var m = 0; m < methods.Count; m++)
        {
            table.Append(CultureInfo.InvariantCulture, $"| {methods[m]} |");
            for (var s = 0; s < Sizes.Length; s++)
            {
                var flag = cover[s, m] is < 93.5 or > 96.5 ? " **outside**" : "";
                table.Append(CultureInfo.InvariantCulture, $" {cover[s, m]:F1} %{flag} ({width[s, m]:F2}) |");
            }

            table.Append('\n');
        }

        return table.ToString();
    }
}
