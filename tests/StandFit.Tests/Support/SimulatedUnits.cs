using System.Collections.Immutable;
using StandFit.Core.Evaluation;
using StandFit.Core.Fitting;
using StandFit.Core.Ingest;
using StandFit.Core.Judging;
using StandFit.Core.Recipes;
using StandFit.Core.Uncertainty;
using StandFit.Core.Uncertainty.Resampling;

namespace StandFit.Tests.Support;

/// <summary>Simulated sweeps with known truth: set points across a range, Gaussian noise from a seeded xoshiro256** stream.</summary>
internal static class SimulatedUnits
{
    /// <summary>n set points evenly from 0 to 250, y = offset + gain x (+ c2 x^2) + sigma N(0, 1); legs up then down (first half up).</summary>
    public static Sweep Line(int n, ulong seed, double offset = 0.01, double gain = 0.2, double sigma = 0.005, double c2 = 0.0, string serial = "SIM-1")
    {
        var rng = new Xoshiro256StarStar(seed);
        var x = new double[n];
        var y = new double[n];
        var legs = new Leg[n];
        var lines = new int[n];
        for (var i = 0; i < n; i++)
        {
            x[i] = 250.0 * i / (n - 1);
            y[i] = offset + (gain * x[i]) + (c2 * x[i] * x[i]) + (sigma * Gaussian(ref rng));
            legs[i] = i < (n + 1) / 2 ? Leg.Up : Leg.Down;
            lines[i] = i + 7;
        }

        return new Sweep(new UnitIdentity(serial, "SIM", "EOL-T", null), [.. x], [.. y], [.. legs], [.. lines], []);
    }

    /// <summary>A standard normal deviate (Marsaglia polar method).</summary>
    public static double Gaussian(ref Xoshiro256StarStar rng)
    {
        while (true)
        {
            var u = (2 * rng.NextDouble()) - 1;
            var v = (2 * rng.NextDouble()) - 1;
            var w = (u * u) + (v * v);
            if (w is > 0 and < 1)
            {
                return u * Math.Sqrt(-2 * Math.Log(w) / w);
            }
        }
    }

    public static Recipe Recipe(ResamplingPlan? plan, LinearModel? model = null, double confidence = 0.95, ImmutableArray<FigureLimit> limits = default, ImmutableArray<DerivedFigure> derived = default) =>
        new("simulated", "1", ["SIM"], new ColumnMap("x", "y", "leg", null), new ColumnUnits("kPa", "mV"), model ?? Polynomial.StraightLine, ConfidenceLevel.Of(confidence), limits.IsDefault ? [] : limits, null, new string('0', 64), "simulated.yaml")
        {
            Resampling = plan,
            Derived = derived.IsDefault ? [] : derived,
        };

    public static FitResult Fit(Sweep sweep, LinearModel? model = null)
    {
        var fit = LeastSquaresFitter.Fit(model ?? Polynomial.StraightLine, sweep.Stimulus, sweep.Output);
        Assert.True(fit.IsSuccess);
        return fit.Value;
    }
}
