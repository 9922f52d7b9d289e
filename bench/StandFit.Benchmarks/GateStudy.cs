using System.Collections.Immutable;
using System.Globalization;
using System.Text;
using StandFit.Core.Diagnostics;
using StandFit.Core.Fitting;
using StandFit.Core.Ingest;
using StandFit.Core.Judging;
using StandFit.Core.Merit;
using StandFit.Core.Uncertainty.Resampling;

namespace StandFit.Benchmarks;

/// <summary>
/// The decision quality of the residual gates (docs/diagnostics.md, "Decision quality"): simulated
/// KP-250-like units, a 21-point up/down sweep (0-250 kPa in 25 kPa steps up, back down to 0; gain
/// 0.2 mV/kPa, offset 0.01 mV, noise SD 0.005 mV, the reference gauge's reading scattered by 0.002
/// kPa), fitted by a straight line. Each unit's noise comes from its own seeded stream (xoshiro256**,
/// StreamSeed.Derive(seed, "GATES-u", "noise"), seed 20261202 unless given); every defect is added to the same noise draw
/// (common random numbers), so the rates of different defects and sizes are compared on one set of
/// units. For each gate the p-value is the one the gate judges (the runs gates' mid-p, the
/// heteroscedasticity gate's F form), from the real diagnostics code, and the combined rulings
/// are those of the real gate objects (<see cref="RunsGate.Judge(RunsTestResult, ResidualDiagnostics)"/>,
/// <see cref="DiagnosticGate.Judge"/>). Prints Markdown tables; single-threaded; the same figures on
/// every run.
/// </summary>
internal static class GateStudy
{
    public const ulong DefaultSeed = 20261202;
    private const int SetPoints = 11;
    private static readonly double[] Levels = [0.05, 0.01, 0.005, 0.001];

    private static readonly string[] GateNames =
    [
        "runs, stimulus", "runs, acquisition", "runs, per-leg",
        "Durbin-Watson, acquisition", "Durbin-Watson, stimulus", "Durbin-Watson, per-leg",
        "lack of fit", "curvature", "Shapiro-Wilk", "Anderson-Darling", "Breusch-Pagan", "outliers",
    ];

    /// <summary>The p-values kept in the summary as R computes them, after the gates' own in each unit's row.</summary>
    private static readonly string[] ReferenceNames =
    [
        "runs, stimulus: exact p (`runs_p`)", "runs, acquisition: exact p (`runs_acquisition_p`)", "runs, per-leg: Šidák of the legs' exact p (`runs_per_leg_p`)", "Breusch-Pagan: chi-square p (`bp_p`)",
    ];

    /// <summary>A defect added to a well-behaved unit, in noise SDs.</summary>
    private sealed record Defect(string Name, string Description, double[] Sizes, Action<double[], double[], Leg[], double, int> Apply);

    private static readonly Defect[] Defects =
    [
        new("bow", "a parabolic bow, k SDs at mid-scale (125 kPa), 0 at both ends: k 4x(250 - x)/250^2", [2, 3, 4, 6], (x, y, _, k, _) =>
        {
            for (var i = 0; i < y.Length; i++)
            {
                y[i] += k * Simulation.Sigma * 4 * x[i] * (250 - x[i]) / (250.0 * 250.0);
            }
        }),
        new("drift", "a linear drift in acquisition order, 0 at the first point to k SDs at the last", [2, 4, 6, 8], (_, y, _, k, _) =>
        {
            for (var i = 0; i < y.Length; i++)
            {
                y[i] += k * Simulation.Sigma * i / (y.Length - 1);
            }
        }),
        new("hysteresis", "the down leg k SDs above the up leg (its every point offset)", [1, 2, 3, 4], (_, y, legs, k, _) =>
        {
            for (var i = 0; i < y.Length; i++)
            {
                y[i] += legs[i] == Leg.Down ? k * Simulation.Sigma : 0;
            }
        }),
        new("outlier", "one point, drawn at random per unit, k SDs off (sign drawn at random)", [4, 5, 6, 8], (_, y, _, k, pick) =>
        {
            // pick is uniform on 0 .. 2n - 1: the point pick mod n, upward for the first n values.
            y[pick % y.Length] += (pick < y.Length ? 1 : -1) * k * Simulation.Sigma;
        }),
    ];

    /// <summary>The seed of the current run (every unit's streams derive from it).</summary>
    private static ulong Seed { get; set; } = DefaultSeed;

    public static string Run(int units, ulong seed)
    {
        Seed = seed;
        var text = new StringBuilder();
        var started = DateTime.UtcNow;
        var process = System.Diagnostics.Process.GetCurrentProcess();
        var cpuStarted = process.TotalProcessorTime;
        var nullP = PValues(units, null, 0);
        var recommended = Combined(units, null, 0);

        text.Append(CultureInfo.InvariantCulture, $"Decision-quality study: {units} simulated units per case, seed {Seed}, 21-point up/down straight-line sweep (KP-250 shape).\n\n");
        text.Append(CultureInfo.InvariantCulture, $"### False alarms on well-behaved units\n\nPer cent of units whose p-value is below the level (binomial SE at 5 %: {Se(0.05, units):F2} points, at 1 %: {Se(0.01, units):F2}). A rate more than 0.5 points from its level is marked *.\n\n");
        text.Append("| gate |");
        foreach (var a in Levels)
        {
            text.Append(CultureInfo.InvariantCulture, $" p < {a} |");
        }

        text.Append(" not applicable |\n|---|");
        foreach (var _ in Levels)
        {
            text.Append("---|");
        }

        text.Append("---|\n");
        for (var g = 0; g < GateNames.Length; g++)
        {
            text.Append("| ").Append(GateNames[g]).Append(" |");
            foreach (var a in Levels)
            {
                var rate = Rate(nullP, g, a);
                var off = Math.Abs(rate - a) > 0.005;
                text.Append(CultureInfo.InvariantCulture, $" {100 * rate:F2}{(off ? " *" : "")} |");
            }

            text.Append(CultureInfo.InvariantCulture, $" {100.0 * nullP.Count(p => double.IsNaN(p[g])) / units:F1} |\n");
        }

        text.Append("\nThe runs gates judge the two-sided mid-p (Lancaster 1961), the per-leg gate that of the stratified test within legs (the legs' run counts summed, their exact distributions convolved); the mid-p of a discrete test is not bounded by its level, so beside each rate is the attained size P(mid-p < level) of the exact runs distribution for the unit's own sign counts, averaged over the units (what the rate would be if the residual signs were in random order):\n\n| gate |");
        foreach (var a in Levels)
        {
            text.Append(CultureInfo.InvariantCulture, $" p < {a}: rate / attained |");
        }

        text.Append("\n|---|");
        foreach (var _ in Levels)
        {
            text.Append("---|");
        }

        text.Append('\n');
        var sizes = AttainedSizes(units);
        for (var g = 0; g < 3; g++)
        {
            text.Append("| ").Append(GateNames[g]).Append(" |");
            for (var l = 0; l < Levels.Length; l++)
            {
                var rate = Rate(nullP, g, Levels[l]);
                var off = Math.Abs(rate - sizes[g, l]) > 0.005;
                text.Append(CultureInfo.InvariantCulture, $" {100 * rate:F2} / {100 * sizes[g, l]:F2}{(off ? " *" : "")} |");
            }

            text.Append('\n');
        }

        text.Append("\nThe p-values the summary keeps beside them, as R computes them, which the gates no longer judge (per cent of units below the level):\n\n| p-value | p < 0.05 | p < 0.01 | p < 0.005 | p < 0.001 |\n|---|---|---|---|---|\n");
        for (var g = 0; g < ReferenceNames.Length; g++)
        {
            text.Append("| ").Append(ReferenceNames[g]).Append(" |");
            foreach (var a in Levels)
            {
                var rate = Rate(nullP, GateNames.Length + g, a);
                text.Append(CultureInfo.InvariantCulture, $" {100 * rate:F2}{(Math.Abs(rate - a) > 0.005 ? " *" : "")} |");
            }

            text.Append('\n');
        }

        text.Append(CultureInfo.InvariantCulture, $"\nRecommended gates ({Describe()}): {100 * recommended.Rate:F2} % of well-behaved units fail at least one (binomial SE {Se(recommended.Rate, units):F2} points).\n\n");

        text.Append("### Detection at p < 0.01 (per cent of units failed)\n\n");
        foreach (var defect in Defects)
        {
            text.Append(CultureInfo.InvariantCulture, $"{char.ToUpperInvariant(defect.Name[0])}{defect.Name[1..]}: {defect.Description}.\n\n| gate |");
            foreach (var k in defect.Sizes)
            {
                text.Append(CultureInfo.InvariantCulture, $" {k} SD |");
            }

            text.Append("\n|---|");
            foreach (var _ in defect.Sizes)
            {
                text.Append("---|");
            }

            text.Append('\n');
            var byGate = defect.Sizes.Select(k => PValues(units, defect, k)).ToArray();
            var combined = defect.Sizes.Select(k => Combined(units, defect, k).Rate).ToArray();
            for (var g = 0; g < GateNames.Length; g++)
            {
                text.Append("| ").Append(GateNames[g]).Append(" |");
                foreach (var p in byGate)
                {
                    text.Append(CultureInfo.InvariantCulture, $" {100 * Rate(p, g, 0.01):F1} |");
                }

                text.Append('\n');
            }

            text.Append("| **recommended gates, combined** |");
            foreach (var c in combined)
            {
                text.Append(CultureInfo.InvariantCulture, $" **{100 * c:F2}** |");
            }

            text.Append("\n\n");
        }

        text.Append("### Candidate default gates\n\nFloors on runs (stimulus), Durbin-Watson (acquisition), curvature and outliers; per cent of units failed by at least one (from the p-values above).\n\n");
        text.Append("| runs | Durbin-Watson | curvature | outliers | false alarms | bow 3 SD | bow 4 SD | drift 4 SD | hysteresis 2 SD | outlier 5 SD |\n|---|---|---|---|---|---|---|---|---|---|\n");
        var cases = new[] { nullP, PValues(units, Defects[0], 3), PValues(units, Defects[0], 4), PValues(units, Defects[1], 4), PValues(units, Defects[2], 2), PValues(units, Defects[3], 5) };
        foreach (var floors in Candidates)
        {
            text.Append(CultureInfo.InvariantCulture, $"| {floors[0]} | {floors[1]} | {floors[2]} | {floors[3]} |");
            foreach (var c in cases)
            {
                text.Append(CultureInfo.InvariantCulture, $" {100 * AnyBelow(c, floors):F2} |");
            }

            text.Append('\n');
        }

        text.Append(CultureInfo.InvariantCulture, $"\n({(DateTime.UtcNow - started).TotalSeconds:F0} s wall, {(process.TotalProcessorTime - cpuStarted).TotalSeconds:F0} s CPU)\n");
        return text.ToString();
    }

    /// <summary>
    /// The attained size of the three runs gates at each level, averaged over the well-behaved units:
    /// for a unit's sign counts, the sum of P(R = r) over the run counts r whose mid-p is below the
    /// level (per-leg: over the pairs of leg run counts whose stratified mid-p is; the normal
    /// approximation's size is the level itself).
    /// </summary>
    private static double[,] AttainedSizes(int units)
    {
        var sums = new double[3, Levels.Length];
        for (var u = 0; u < units; u++)
        {
            var (fit, sweep) = Unit(u, null, 0);
            var d = ResidualDiagnostics.Compute(fit, sweep.Legs.AsSpan(), Options(ResidualOrder.Acquisition));
            var runs = RunsTest.Compute(fit.Residuals.AsSpan(), ResidualOrders.ByStimulus(sweep.Stimulus.AsSpan()));
            var legs = d.RunsPerLeg.Results.Where(r => r.IsApplicable).ToArray();
            for (var l = 0; l < Levels.Length; l++)
            {
                sums[0, l] += Size(runs, Levels[l]);
                sums[1, l] += Size(d.RunsByAcquisition, Levels[l]);
                sums[2, l] += StratifiedSize(legs, Levels[l]);
            }
        }

        for (var g = 0; g < 3; g++)
        {
            for (var l = 0; l < Levels.Length; l++)
            {
                sums[g, l] /= units;
            }
        }

        return sums;
    }

    private static double Size(RunsTestResult runs, double level)
    {
        if (!runs.IsApplicable)
        {
            return 0;
        }

        if (runs.Method != RunsMethod.Exact)
        {
            return level;
        }

        var size = 0.0;
        for (var r = 2; r <= runs.Positive + runs.Negative; r++)
        {
            if (RunsTest.FromCounts(r, runs.Positive, runs.Negative).MidP < level)
            {
                size += RunsTest.Probability(r, runs.Positive, runs.Negative);
            }
        }

        return size;
    }

    /// <summary>The stratified test's attained size: every combination of the legs' run counts, by its probability (legs independent).</summary>
    private static double StratifiedSize(RunsTestResult[] legs, double level)
    {
        if (legs.Length == 0)
        {
            return 0;
        }

        if (legs.Any(l => l.Method != RunsMethod.Exact))
        {
            return level;
        }

        var size = 0.0;
        var chosen = new RunsTestResult[legs.Length];
        void Visit(int leg, double probability)
        {
            if (leg == legs.Length)
            {
                size += RunsTest.Stratified(chosen).MidP < level ? probability : 0;
                return;
            }

            var (n1, n2) = (legs[leg].Positive, legs[leg].Negative);
            for (var r = 2; r <= n1 + n2; r++)
            {
                var pr = RunsTest.Probability(r, n1, n2);
                if (pr > 0)
                {
                    chosen[leg] = RunsTest.FromCounts(r, n1, n2);
                    Visit(leg + 1, probability * pr);
                }
            }
        }

        Visit(0, 1.0);
        return size;
    }

    /// <summary>The recommended gates as the docs list them.</summary>
    public static string Describe()
    {
        var parts = new List<string> { string.Create(CultureInfo.InvariantCulture, $"runs {ResidualOrderNames.Name(RecommendedGates.Runs.Order)} {RecommendedGates.Runs.PValueFloor}") };
        foreach (var g in RecommendedGates.Diagnostic)
        {
            var name = g.Kind == DiagnosticGateKind.DurbinWatson ? "Durbin-Watson " + ResidualOrderNames.Name(g.Order) : g.Kind.ToString().ToLowerInvariant();
            parts.Add(string.Create(CultureInfo.InvariantCulture, $"{name} {g.PValueFloor}"));
        }

        return string.Join(", ", parts);
    }

    /// <summary>The fraction of units failed by at least one recommended gate, judged by the gate objects themselves.</summary>
    private static (double Rate, int Failed) Combined(int units, Defect? defect, double size)
    {
        var failed = 0;
        for (var u = 0; u < units; u++)
        {
            var (fit, sweep) = Unit(u, defect, size);
            var d = ResidualDiagnostics.Compute(fit, sweep.Legs.AsSpan(), Options(ResidualOrder.Acquisition));
            var runs = RunsTest.Compute(fit.Residuals.AsSpan(), ResidualOrders.ByStimulus(sweep.Stimulus.AsSpan()));
            var fails = RecommendedGates.Runs.Judge(runs, d).Kind == StandFit.Core.Problems.ReasonKind.Fail;
            foreach (var gate in RecommendedGates.Diagnostic)
            {
                fails |= gate.Judge(d, sweep.SourceLines).Kind == StandFit.Core.Problems.ReasonKind.Fail;
            }

            failed += fails ? 1 : 0;
        }

        return ((double)failed / units, failed);
    }

    private static DiagnosticsOptions Options(ResidualOrder dwOrder) =>
        new() { SetPointTolerance = 1.0, Nominal = new NominalLine(Simulation.Offset, Simulation.Gain), DurbinWatsonOrder = dwOrder };

    /// <summary>Every gate's p-value (NaN: not applicable) for each unit.</summary>
    private static double[][] PValues(int units, Defect? defect, double size)
    {
        var result = new double[units][];
        for (var u = 0; u < units; u++)
        {
            var (fit, sweep) = Unit(u, defect, size);
            var legs = sweep.Legs.AsSpan();
            var d = ResidualDiagnostics.Compute(fit, legs, Options(ResidualOrder.PerLeg) with { AlsoDurbinWatson = [ResidualOrder.Stimulus] });
            var byStimulusDw = d.DurbinWatsonIn(ResidualOrder.Stimulus);
            var runs = RunsTest.Compute(fit.Residuals.AsSpan(), ResidualOrders.ByStimulus(sweep.Stimulus.AsSpan()));
            static double P(bool applicable, double p) => applicable ? p : double.NaN;
            result[u] =
            [
                P(runs.IsApplicable, runs.MidP),
                P(d.RunsByAcquisition.IsApplicable, d.RunsByAcquisition.MidP),
                P(d.RunsPerLeg.IsApplicable, d.RunsPerLeg.WithinLegs.MidP),
                P(d.DurbinWatson.IsApplicable, d.DurbinWatson.P),
                P(byStimulusDw.IsApplicable, byStimulusDw.P),
                P(d.DurbinWatsonPerLeg!.IsApplicable, d.DurbinWatsonPerLeg.P),
                P(d.LackOfFit.IsApplicable, d.LackOfFit.P),
                P(d.Curvature.IsApplicable, d.Curvature.P),
                P(d.ShapiroWilk.IsApplicable, d.ShapiroWilk.P),
                P(d.AndersonDarling.IsApplicable, d.AndersonDarling.P),
                P(d.BreuschPagan.IsApplicable, d.BreuschPagan.FP),
                P(d.Outliers.IsApplicable, d.Outliers.P),

                // The R-matching p-values the gates no longer judge (ReferenceNames).
                P(runs.IsApplicable, runs.P),
                P(d.RunsByAcquisition.IsApplicable, d.RunsByAcquisition.P),
                P(d.RunsPerLeg.IsApplicable, d.RunsPerLeg.P),
                P(d.BreuschPagan.IsApplicable, d.BreuschPagan.P),
            ];
        }

        return result;
    }

    /// <summary>Unit <paramref name="u"/>: its noise draw, with the defect added, fitted by a straight line.</summary>
    private static (FitResult Fit, Sweep Sweep) Unit(int u, Defect? defect, double size)
    {
        var serial = string.Create(CultureInfo.InvariantCulture, $"GATES-{u}");
        var noise = new Xoshiro256StarStar(StreamSeed.Derive(Seed, serial, "noise"));
        var sweep = Simulation.UpDown(SetPoints, ref noise, serial: serial);
        if (defect is not null)
        {
            var pick = new Xoshiro256StarStar(StreamSeed.Derive(Seed, serial, "pick"));
            var x = sweep.Stimulus.ToArray();
            var y = sweep.Output.ToArray();
            var legs = sweep.Legs.ToArray();
            defect.Apply(x, y, legs, size, pick.NextBelow(2 * x.Length));
            sweep = new Sweep(sweep.Identity, sweep.Stimulus, [.. y], sweep.Legs, sweep.SourceLines, ImmutableArray<MetadataEntry>.Empty);
        }

        return (Simulation.Fit(sweep, Polynomial.OfDegree(1)), sweep);
    }

    /// <summary>Candidate floors: runs (stimulus), Durbin-Watson (acquisition), curvature, outliers.</summary>
    private static readonly double[][] Candidates =
    [
        [0.001, 0.001, 0.005, 0.002],
        [0.001, 0.001, 0.004, 0.002],
        [0.001, 0.001, 0.003, 0.003],
        [0.002, 0.002, 0.004, 0.002],
        [0.0025, 0.0025, 0.0025, 0.0025],
        [0.001, 0.001, 0.006, 0.001],
    ];

    private static readonly int[] CandidateGates = [0, 3, 7, 11];

    private static double AnyBelow(double[][] p, double[] floors) =>
        (double)p.Count(v => CandidateGates.Select((g, i) => v[g] < floors[i]).Any(b => b)) / p.Length;

    private static double Rate(double[][] p, int gate, double level) => (double)p.Count(v => v[gate] < level) / p.Length;

    private static double Se(double rate, int units) => 100 * Math.Sqrt(rate * (1 - rate) / units);
}
