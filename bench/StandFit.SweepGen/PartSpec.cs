namespace StandFit.SweepGen;

/// <summary>One recorded sweep row: the commanded set point, the reference reading and the unit output.</summary>
internal sealed record SweepPoint(int Step, string Leg, double SetPoint, double Stimulus, double Output);

/// <summary>The true transfer curve of a simulated unit: output = Offset + Gain x + Curvature x^2.</summary>
internal sealed record TrueUnit(double Gain, double Offset, double Curvature);

/// <summary>An injected systematic error added to the ideal output (before noise).</summary>
internal delegate double Disturbance(int step, bool down, double setPoint);

/// <summary>A part type on the line: sweep plan, noise model, unit-to-unit spread and recipe limits.</summary>
internal sealed class PartSpec
{
    public static PartSpec Kp250 { get; } = new()
    {
        Name = "KP-250",
        SerialPrefix = "KP250",
        Station = "EOL-3A",
        StimulusColumn = "pressure_kPa",
        OutputColumn = "output_mV",
        SetPoints = Sweep(25.0, 10),
        UpCount = 11,
        Degree = 1,
        NominalGain = 0.2,
        GainSd = 0.0002,
        OffsetSd = 0.02,
        NominalCurvature = 0.0,
        CurvatureSd = 0.0,
        ReferenceSd = 0.002,
        OutputSd = 0.004,
        StimulusDecimals = 4,
        OutputDecimals = 5,
        GainMin = 0.1990,
        GainMax = 0.2010,
        OffsetMin = -0.10,
        OffsetMax = 0.10,
        PassGainBand = 0.0005,
        PassOffsetBand = 0.04,
    };

    public static PartSpec Lc5k { get; } = new()
    {
        Name = "LC-5K",
        SerialPrefix = "LC5K",
        Station = "EOL-3B",
        StimulusColumn = "force_kN",
        OutputColumn = "output_mVV",
        SetPoints = Sweep(0.5, 10),
        UpCount = 11,
        Degree = 2,
        NominalGain = 0.4,
        GainSd = 0.0002,
        OffsetSd = 0.0005,
        NominalCurvature = -0.0004,
        CurvatureSd = 0.00002,
        ReferenceSd = 0.0,
        OutputSd = 0.00004,
        StimulusDecimals = 3,
        OutputDecimals = 6,
        GainMin = 0.3990,
        GainMax = 0.4010,
        OffsetMin = -0.002,
        OffsetMax = 0.002,
        PassGainBand = 0.0005,
        PassOffsetBand = 0.001,
    };

    public required string Name { get; init; }

    public required string SerialPrefix { get; init; }

    public required string Station { get; init; }

    public required string StimulusColumn { get; init; }

    public required string OutputColumn { get; init; }

    /// <summary>Set points in sweep order: the up leg (UpCount points) then the down leg.</summary>
    public required IReadOnlyList<double> SetPoints { get; init; }

    public required int UpCount { get; init; }

    /// <summary>Polynomial degree the recipe fits (1 = straight line, 2 = quadratic).</summary>
    public required int Degree { get; init; }

    public required double NominalGain { get; init; }

    public required double GainSd { get; init; }

    public required double OffsetSd { get; init; }

    public required double NominalCurvature { get; init; }

    public required double CurvatureSd { get; init; }

    public required double ReferenceSd { get; init; }

    public required double OutputSd { get; init; }

    public required int StimulusDecimals { get; init; }

    public required int OutputDecimals { get; init; }

    public required double GainMin { get; init; }

    public required double GainMax { get; init; }

    public required double OffsetMin { get; init; }

    public required double OffsetMax { get; init; }

    /// <summary>Clear-pass units have |gain - nominal| below this.</summary>
    public required double PassGainBand { get; init; }

    /// <summary>Clear-pass units have |offset| below this.</summary>
    public required double PassOffsetBand { get; init; }

    public string Header => "step,leg," + StimulusColumn + "," + OutputColumn;

    /// <summary>Rounds to a fixed number of decimals (ties to even); never returns negative zero.</summary>
    public static double Quantize(double value, int decimals)
    {
        double scale = Pow10(decimals);
        return (Math.Round(value * scale) / scale) + 0.0;
    }

    public static double Pow10(int decimals)
    {
        double scale = 1.0;
        for (int i = 0; i < decimals; i++)
        {
            scale *= 10.0;
        }

        return scale;
    }

    /// <summary>A unit drawn from the production spread, truncated to the clear-pass band.</summary>
    public TrueUnit DrawClearUnit(Xoshiro rng) => new(DrawClearGain(rng), DrawClearOffset(rng), DrawCurvature(rng));

    public double DrawClearGain(Xoshiro rng) => NominalGain + Truncated(rng, GainSd, PassGainBand);

    public double DrawClearOffset(Xoshiro rng) => Truncated(rng, OffsetSd, PassOffsetBand);

    public double DrawCurvature(Xoshiro rng) => NominalCurvature + (CurvatureSd * rng.NextGaussian());

    /// <summary>
    /// Simulates one sweep. The stand applies each set point; the reference reads it with noise; the
    /// unit responds to the applied stimulus. A part with no reference noise (the LC-5K frame) records
    /// the exact set point, so its up and down legs tie and keep file order in the runs test. A stuck
    /// stand applies and reads exactly zero throughout.
    /// </summary>
    public List<SweepPoint> Simulate(TrueUnit unit, Xoshiro rng, Disturbance? disturbance = null, bool stuckAtZero = false)
    {
        var points = new List<SweepPoint>(SetPoints.Count);
        for (int i = 0; i < SetPoints.Count; i++)
        {
            int step = i + 1;
            bool down = i >= UpCount;
            double applied = stuckAtZero ? 0.0 : SetPoints[i];
            double reading = stuckAtZero || ReferenceSd == 0.0 ? applied : applied + (ReferenceSd * rng.NextGaussian());
            double ideal = unit.Offset + (unit.Gain * applied) + (unit.Curvature * applied * applied);
            if (disturbance is not null)
            {
                ideal += disturbance(step, down, applied);
            }

            double output = ideal + (OutputSd * rng.NextGaussian());
            points.Add(new SweepPoint(
                step,
                down ? "down" : "up",
                applied,
                Quantize(reading, StimulusDecimals),
                Quantize(output, OutputDecimals)));
        }

        return points;
    }

    private static double Truncated(Xoshiro rng, double sd, double band)
    {
        while (true)
        {
            double value = sd * rng.NextGaussian();
            if (Math.Abs(value) < band)
            {
                return value;
            }
        }
    }

    private static double[] Sweep(double increment, int intervals)
    {
        var points = new double[(2 * intervals) + 1];
        for (int i = 0; i <= intervals; i++)
        {
            points[i] = i * increment;
        }

        for (int i = 1; i <= intervals; i++)
        {
            points[intervals + i] = (intervals - i) * increment;
        }

        return points;
    }
}
