using System.Globalization;
using StandFit.Core.Uncertainty.Resampling;
using StandFit.Edges.Outputs;

namespace StandFit.Tests.Support;

/// <summary>
/// A generated output folder of many units, written through the real summary and point writer:
/// two parts on three stations over one day, seeded (xoshiro256**), with about 85 % pass, 6 % fail,
/// 4 % retest and 5 % rejected, 21-point up/down sweeps for the fitted units, and a slow drift of
/// the gain halfway through the day (so the control charts have something to flag).
/// </summary>
public static class SyntheticOutput
{
    private static readonly DateTime Start = new(2026, 12, 1, 0, 0, 0, DateTimeKind.Utc);

    public static async Task WriteAsync(string outputFolder, int units, ulong seed, int batchSize = 1000)
    {
        var writer = new ParquetSummaryWriter(outputFolder, "run-20261202T060000000-synthetic-1", "synthetic");
        var random = new Xoshiro256StarStar(seed);
        var records = new List<SummaryRecord>(batchSize);
        var points = new List<PointRecord>(batchSize * 21);
        for (var i = 0; i < units; i++)
        {
            var (record, rows) = Unit(i, units, ref random);
            records.Add(record);
            points.AddRange(rows);
            if (records.Count == batchSize || i == units - 1)
            {
                await writer.WriteAsync(records, points, CancellationToken.None);
                records.Clear();
                points.Clear();
            }
        }
    }

    private static (SummaryRecord, List<PointRecord>) Unit(int i, int units, ref Xoshiro256StarStar random)
    {
        var kp = i % 10 < 7;
        var part = kp ? "KP-250" : "LC-5K";
        var serial = (kp ? "KP250-SYN-" : "LC5K-SYN-") + i.ToString("D6", CultureInfo.InvariantCulture);
        var testStart = Start.AddSeconds(86_000.0 * i / units);
        var sha = Convert.ToHexStringLower(System.Security.Cryptography.SHA256.HashData(System.Text.Encoding.UTF8.GetBytes(serial)));
        var key = sha + ":" + new string('r', 64);
        var u = random.NextDouble();
        var ruling = u < 0.05 ? "rejected" : u < 0.11 ? "fail" : u < 0.15 ? "retest" : "pass";
        var record = new SummaryRecord
        {
            UnitKey = key,
            Serial = serial,
            Part = part,
            Station = "EOL-3" + (char)('A' + (i % 3)),
            TestStart = new DateTime(testStart.Ticks - (testStart.Ticks % TimeSpan.TicksPerMillisecond), DateTimeKind.Utc),
            SourceFile = serial + ".csv",
            SourceSha256 = sha,
            Ruling = ruling,
            ProcessedAt = Start.AddDays(1).AddHours(6),
            ToolVersion = "0.1.0-synthetic",
        };
        if (ruling == "rejected")
        {
            record.ReasonCodes = ["input.bad_number"];
            record.Reasons = [serial + ".csv:12:4: 'n/a' in column 'output_mV' is not a number (numbers use a decimal point, no thousands separator). Fix the row or re-export."];
            return (record, []);
        }

        var nominal = kp ? 0.2 : 0.4;
        var drift = i > units / 2 ? 0.00004 * (i - (units / 2)) / units : 0;
        var gain = nominal + (Normal(ref random) * 0.0002) + drift;
        var offset = Normal(ref random) * (kp ? 0.01 : 0.0005);
        var sd = kp ? 0.003 : 0.00003;
        var span = kp ? 250.0 : 5.0;
        var unitText = kp ? ("mV", "mV/kPa") : ("mV/V", "mV/V/kN");
        record.RecipeName = part + " synthetic";
        record.RecipeVersion = "2026.12-s";
        record.RecipeHash = new string('r', 64);
        record.Model = "straight-line";
        record.Confidence = 0.95;
        record.Points = 21;
        record.DegreesOfFreedom = 19;
        record.Weighted = false;
        record.GainEstimate = gain;
        record.GainCiLow = gain - 0.00003;
        record.GainCiHigh = gain + 0.00003;
        record.OffsetEstimate = offset;
        record.OffsetCiLow = offset - (2 * sd);
        record.OffsetCiHigh = offset + (2 * sd);
        record.ResidualSd = sd;
        record.Parameters =
        [
            new ParameterRecord { Name = "offset", Unit = unitText.Item1, Estimate = offset, StandardError = sd, CiLow = offset - (2 * sd), CiHigh = offset + (2 * sd) },
            new ParameterRecord { Name = "gain", Unit = unitText.Item2, Estimate = gain, StandardError = 0.000015, CiLow = gain - 0.00003, CiHigh = gain + 0.00003 },
        ];
        record.HistogramEdges = [-2 * sd, -sd, 0, sd, 2 * sd];
        record.HistogramCounts = [3, 7, 8, 3];
        var (codes, reasons) = ruling switch
        {
            "fail" => (new List<string> { "gain.above_limit", "offset.within_limits", "residuals.runs_ok" }, new List<string> { Sentence("gain", gain, "lies above the upper limit " + (nominal + 0.001).ToString("R", CultureInfo.InvariantCulture)), Sentence("offset", offset, "lies inside the limits"), "runs test in stimulus order: 11 runs of 10+/11- signs (expected 11.48, z = -0.235), p = 0.814 (normal) is at or above the floor 0.01" }),
            "retest" => (new List<string> { "gain.straddles_limit", "offset.within_limits", "residuals.runs_ok" }, new List<string> { Sentence("gain", gain, "straddles a limit: undecided, conditional pass"), Sentence("offset", offset, "lies inside the limits"), "runs test in stimulus order: 12 runs of 11+/10- signs (expected 11.48, z = 0.235), p = 0.814 (normal) is at or above the floor 0.01" }),
            _ => (new List<string> { "gain.within_limits", "offset.within_limits", "residuals.runs_ok" }, new List<string> { Sentence("gain", gain, "lies inside the limits"), Sentence("offset", offset, "lies inside the limits"), "runs test in stimulus order: 11 runs, p = 0.8 is at or above the floor 0.01" }),
        };
        record.ReasonCodes = codes;
        record.Reasons = reasons;
        record.LimitResults =
        [
            new LimitResultRecord { Figure = "gain", Value = gain, ExpandedUncertainty = 0.00003, Low = gain - 0.00003, High = gain + 0.00003, Min = nominal - 0.001, Max = nominal + 0.001, Rule = "guarded", Zone = ruling == "fail" ? "above" : ruling == "retest" ? "straddles" : "within" },
            new LimitResultRecord { Figure = "offset", Value = offset, ExpandedUncertainty = 2 * sd, Low = offset - (2 * sd), High = offset + (2 * sd), Min = -0.1, Max = 0.1, Rule = "guarded", Zone = "within" },
        ];

        var rows = new List<PointRecord>(21);
        for (var k = 0; k < 21; k++)
        {
            var up = k <= 10;
            var x = (up ? k : 20 - k) * span / 10;
            var fitted = offset + (gain * x);
            var residual = Normal(ref random) * sd;
            rows.Add(new PointRecord
            {
                UnitKey = key,
                Point = k + 1,
                SourceLine = 7 + k,
                Leg = up ? "up" : "down",
                Stimulus = x,
                Output = fitted + residual,
                Response = fitted + residual,
                Fitted = fitted,
                Residual = residual,
                BandLow = fitted - (0.6 * sd),
                BandHigh = fitted + (0.6 * sd),
                Leverage = 0.1,
                StudentizedResidual = residual / sd,
                CooksDistance = 0.01,
            });
        }

        return (record, rows);
    }

    private static string Sentence(string figure, double value, string verdict) =>
        string.Create(CultureInfo.InvariantCulture, $"{figure} {value:G6} +/- 3E-05 = [{value - 0.00003:G6}, {value + 0.00003:G6}] {verdict} (guarded, U = t(95 %, 19 df) u)");

    /// <summary>A standard normal draw (Box-Muller on two uniforms).</summary>
    private static double Normal(ref Xoshiro256StarStar random)
    {
        var u1 = 1.0 - random.NextDouble();
        var u2 = random.NextDouble();
        return Math.Sqrt(-2 * Math.Log(u1)) * Math.Cos(2 * Math.PI * u2);
    }
}
