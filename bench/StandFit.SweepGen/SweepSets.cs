using System.Globalization;

namespace StandFit.SweepGen;

/// <summary>
/// The demo set for test line 3 of the (invented) Kestrel Fen works, night of 2026-11-30, and the
/// bulk throughput set. Each demo file draws from its own stream, keyed by its serial number, so
/// one unit's redraws never shift another unit's numbers; bulk unit i uses stream i of the given
/// seed and does not depend on COUNT. Clear passes (demo and bulk) are redrawn until the
/// generator's own check rules them PASS with a comfortable margin.
/// </summary>
internal static class SweepSets
{
    public const ulong DemoSeed = 20261130UL;

    private const string Operator = "night shift B";
    private const string Lot = "26110";
    private const int NightSeconds = 8 * 3600;
    private const int MaxAttempts = 10000;
    private static readonly DateTime NightStart = new(2026, 11, 30, 22, 0, 0, DateTimeKind.Utc);

    private enum Kind
    {
        ClearPass,
        ClearPassCrlfBom,
        GainHigh,
        GainStraddle,
        OffsetLow,
        Curved,
        Outlier,
        GainLow,
        Hysteresis,
        Empty,
        NoRows,
        BadNumber,
        WrongColumnCount,
        MissingColumn,
        NoRecipe,
        StuckStimulus,
        NonFinite,
    }

    public static void WriteDemo(string outDir, TextWriter log)
    {
        Directory.CreateDirectory(outDir);
        foreach (IGrouping<string, Plan> station in DemoPlans().GroupBy(p => p.Part.Station))
        {
            List<Plan> ordered = [.. station.OrderBy(p => p.Number)];
            var clock = new Xoshiro(DemoSeed, Xoshiro.Fnv1a("clock " + station.Key));
            double slot = (double)NightSeconds / ordered.Count;
            for (int i = 0; i < ordered.Count; i++)
            {
                int seconds = (int)((i * slot) + 60.0 + (clock.NextDouble() * (slot - 120.0)));
                log.WriteLine(WriteUnit(outDir, ordered[i], NightStart.AddSeconds(seconds)));
            }
        }
    }

    public static void WriteBulk(string outDir, int count, ulong seed)
    {
        Directory.CreateDirectory(outDir);
        PartSpec part = PartSpec.Kp250;
        for (int i = 1; i <= count; i++)
        {
            var rng = new Xoshiro(seed, (ulong)i);
            Drawn drawn = Draw(part, rng, part.DrawClearUnit, null, f => IsClearPass(f, part));
            string id = i.ToString("D6", CultureInfo.InvariantCulture);
            DateTime start = NightStart.AddSeconds(10.0 * i);
            SweepWriter.ForUnit(part, "KP250-BENCH-" + id, part.Name, start, Operator, drawn.Points)
                .Save(Path.Combine(outDir, "unit-" + id + ".csv"));
        }
    }

    private static List<Plan> DemoPlans()
    {
        var kpDesigned = new Dictionary<int, Kind>
        {
            [5] = Kind.GainHigh,
            [11] = Kind.GainStraddle,
            [16] = Kind.OffsetLow,
            [19] = Kind.ClearPassCrlfBom,
            [22] = Kind.Curved,
            [27] = Kind.Outlier,
        };
        var lcDesigned = new Dictionary<int, Kind> { [4] = Kind.GainLow, [9] = Kind.Hysteresis };
        var plans = new List<Plan>();
        for (int n = 1; n <= 30; n++)
        {
            plans.Add(new Plan(PartSpec.Kp250, n, kpDesigned.GetValueOrDefault(n, Kind.ClearPass)));
        }

        for (int n = 1; n <= 12; n++)
        {
            plans.Add(new Plan(PartSpec.Lc5k, n, lcDesigned.GetValueOrDefault(n, Kind.ClearPass)));
        }

        plans.Add(new Plan(PartSpec.Kp250, 901, Kind.Empty));
        plans.Add(new Plan(PartSpec.Kp250, 902, Kind.NoRows));
        plans.Add(new Plan(PartSpec.Kp250, 903, Kind.BadNumber));
        plans.Add(new Plan(PartSpec.Kp250, 904, Kind.WrongColumnCount));
        plans.Add(new Plan(PartSpec.Kp250, 905, Kind.MissingColumn));
        plans.Add(new Plan(PartSpec.Lc5k, 906, Kind.NoRecipe));
        plans.Add(new Plan(PartSpec.Kp250, 907, Kind.StuckStimulus));
        plans.Add(new Plan(PartSpec.Kp250, 908, Kind.NonFinite));
        return plans;
    }

    private static string WriteUnit(string outDir, Plan plan, DateTime start)
    {
        PartSpec part = plan.Part;
        string serial = plan.Serial;
        string path = Path.Combine(outDir, serial + ".csv");
        var rng = new Xoshiro(DemoSeed, Xoshiro.Fnv1a(serial));

        if (plan.Kind == Kind.Empty)
        {
            SweepWriter.WriteEmpty(path);
            return serial + " | Empty | REJECTED input.empty";
        }

        if (plan.Kind == Kind.StuckStimulus)
        {
            List<SweepPoint> stuck = part.Simulate(part.DrawClearUnit(rng), rng, stuckAtZero: true);
            SweepWriter.ForUnit(part, serial, part.Name, start, Operator, stuck).Save(path);
            return serial + " | StuckStimulus | REJECTED fit.zero_stimulus_spread";
        }

        Drawn drawn = plan.Kind switch
        {
            Kind.GainHigh => Draw(part, rng, r => part.DrawClearUnit(r) with { Gain = 0.2030 }, null, f => Only(f, part, "gain.above_limit")),
            Kind.GainStraddle => Draw(
                part,
                rng,
                r => part.DrawClearUnit(r) with { Gain = part.GainMax },
                null,
                f => Only(f, part, "gain.straddles_limit") && Math.Abs(f.Gain.Estimate - part.GainMax) <= 0.5 * f.Gain.HalfWidth),
            Kind.OffsetLow => Draw(part, rng, r => part.DrawClearUnit(r) with { Offset = -0.25 }, null, f => Only(f, part, "offset.below_limit")),
            Kind.Curved => Draw(part, rng, part.DrawClearUnit, (_, _, x) => Bow(x), f => f.RunsP <= 0.001 && Robust(f, part)),
            Kind.Outlier => Draw(
                part,
                rng,
                r => part.DrawClearUnit(r) with { Gain = 0.2000, Offset = 0.03 },
                (step, _, _) => step == 6 ? 0.5 : 0.0,
                f => Only(f, part, "offset.straddles_limit")),
            Kind.GainLow => Draw(part, rng, r => part.DrawClearUnit(r) with { Gain = 0.3970 }, null, f => Only(f, part, "gain.below_limit")),
            Kind.Hysteresis => Draw(part, rng, part.DrawClearUnit, (_, down, x) => Hysteresis(down, x), f => f.RunsP <= 0.001 && Robust(f, part)),
            _ => Draw(part, rng, part.DrawClearUnit, null, f => IsClearPass(f, part)),
        };

        var writer = SweepWriter.ForUnit(part, serial, plan.Kind == Kind.NoRecipe ? "LC-9K" : part.Name, start, Operator, drawn.Points);
        string note = drawn.Fit.Ruling + " " + string.Join(';', drawn.Fit.Reasons);
        switch (plan.Kind)
        {
            case Kind.NoRows:
                writer.ClearRows();
                note = "REJECTED input.no_rows";
                break;
            case Kind.BadNumber:
                writer.ReplaceRow(6, SweepWriter.Cells(drawn.Points[5], part) + ",n/a");
                note = "REJECTED input.bad_number (line 12)";
                break;
            case Kind.WrongColumnCount:
                writer.ReplaceRow(10, SweepWriter.Cells(drawn.Points[9], part));
                note = "REJECTED input.wrong_column_count (line 16)";
                break;
            case Kind.MissingColumn:
                writer.ReplaceHeader("step,leg," + part.StimulusColumn + ",out_mV");
                note = "REJECTED input.missing_column";
                break;
            case Kind.NoRecipe:
                note = "REJECTED input.no_recipe";
                break;
            case Kind.NonFinite:
                writer.ReplaceRow(15, SweepWriter.Cells(drawn.Points[14], part) + ",NaN");
                note = "REJECTED input.non_finite (line 21)";
                break;
            default:
                break;
        }

        if (plan.Kind == Kind.ClearPassCrlfBom)
        {
            writer.Save(path, "\r\n", byteOrderMark: true, trailingBlankLines: 2);
        }
        else
        {
            writer.Save(path);
        }

        FitOutcome f = drawn.Fit;
        return string.Create(
            CultureInfo.InvariantCulture,
            $"{serial} | {plan.Kind} | {note} | true gain {drawn.Unit.Gain:R} offset {drawn.Unit.Offset:R} c2 {drawn.Unit.Curvature:R} | gain {f.Gain.Estimate:G7} [{f.Gain.Low:G7}, {f.Gain.High:G7}] | offset {f.Offset.Estimate:G5} [{f.Offset.Low:G5}, {f.Offset.High:G5}] | runs {f.Runs} ({f.Positives}+/{f.Negatives}-) z {f.RunsZ:F3} p {f.RunsP:G4} | attempts {drawn.Attempts}");
    }

    private static Drawn Draw(PartSpec part, Xoshiro rng, Func<Xoshiro, TrueUnit> truth, Disturbance? disturbance, Func<FitOutcome, bool> accept)
    {
        for (int attempt = 1; attempt <= MaxAttempts; attempt++)
        {
            TrueUnit unit = truth(rng);
            List<SweepPoint> points = part.Simulate(unit, rng, disturbance);
            FitOutcome fit = SweepFit.Evaluate(points, part);
            if (accept(fit))
            {
                return new Drawn(unit, points, fit, attempt);
            }
        }

        throw new InvalidOperationException("no acceptable draw for a " + part.Name + " unit");
    }

    /// <summary>A pass with the runs test well clear of its floor (p at least 0.05, not just 0.01).</summary>
    private static bool IsClearPass(FitOutcome f, PartSpec part) => f.Ruling == "PASS" && f.RunsP >= 0.05 && Robust(f, part);

    /// <summary>Exactly one reason, the runs test comfortably clean and no interval edge near a limit.</summary>
    private static bool Only(FitOutcome f, PartSpec part, string reason) =>
        f.Reasons.Count == 1 && f.Reasons[0] == reason && f.RunsP >= 0.05 && Robust(f, part);

    /// <summary>No interval end lies within a quarter of its half-width of a limit, so the ruling is not marginal.</summary>
    private static bool Robust(FitOutcome f, PartSpec part) =>
        Clear(f.Gain, part.GainMin, part.GainMax) && Clear(f.Offset, part.OffsetMin, part.OffsetMax);

    private static bool Clear(Interval ci, double min, double max)
    {
        double margin = 0.25 * ci.HalfWidth;
        return Math.Abs(min - ci.Low) >= margin && Math.Abs(min - ci.High) >= margin
            && Math.Abs(max - ci.Low) >= margin && Math.Abs(max - ci.High) >= margin;
    }

    /// <summary>KP-250 under-fit: a parabolic sag of 0.08 mV at mid-scale, zero at both ends.</summary>
    private static double Bow(double setPoint)
    {
        double t = setPoint / 250.0;
        return -0.08 * 4.0 * t * (1.0 - t);
    }

    /// <summary>LC-5K hysteresis: the down leg reads high by 0.004 mV/V * sin(pi F / 5).</summary>
    private static double Hysteresis(bool down, double setPoint) =>
        down ? 0.004 * SinPi(setPoint / 5.0) : 0.0;

    /// <summary>sin(pi t) for t in [0, 1] by a fixed Taylor series (platform independent).</summary>
    private static double SinPi(double t)
    {
        double a = Math.PI * Math.Min(t, 1.0 - t);
        double term = a;
        double sum = a;
        for (int k = 1; k <= 12; k++)
        {
            term *= -a * a / ((2.0 * k) * ((2.0 * k) + 1.0));
            sum += term;
        }

        return sum;
    }

    private sealed record Plan(PartSpec Part, int Number, Kind Kind)
    {
        public string Serial => Part.SerialPrefix + "-" + Lot + "-" + Number.ToString("D4", CultureInfo.InvariantCulture);
    }

    private sealed record Drawn(TrueUnit Unit, List<SweepPoint> Points, FitOutcome Fit, int Attempts);
}
