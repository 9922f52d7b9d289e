using System.Collections.Immutable;
using StandFit.Core.Fitting;
using StandFit.Core.Ingest;
using StandFit.Core.Uncertainty.Resampling;

namespace StandFit.Benchmarks;

/// <summary>Simulated straight-line and quadratic sweeps with known truth (seeded xoshiro256**, Gaussian noise by the polar method).</summary>
internal static class Simulation
{
    public const double Offset = 0.01;
    public const double Gain = 0.2;
    public const double Sigma = 0.005;

    public static Sweep Sweep(int n, ref Xoshiro256StarStar rng, double c2 = 0.0, string serial = "SIM")
    {
        var x = new double[n];
        var y = new double[n];
        var legs = new Leg[n];
        var lines = new int[n];
        for (var i = 0; i < n; i++)
        {
            x[i] = 250.0 * i / (n - 1);
            y[i] = Offset + (Gain * x[i]) + (c2 * x[i] * x[i]) + (Sigma * Gaussian(ref rng));
            legs[i] = i < (n + 1) / 2 ? Leg.Up : Leg.Down;
            lines[i] = i + 7;
        }

        return new Sweep(new UnitIdentity(serial, "SIM", null, null), [.. x], [.. y], [.. legs], [.. lines], ImmutableArray<MetadataEntry>.Empty);
    }

    /// <summary>
    /// An up/down sweep: <paramref name="setPoints"/> set points evenly over 0-250 taken upscale, then
    /// the same set points but the top one downscale (2 setPoints - 1 points), y = offset + gain x
    /// (+ c2 x^2) + sigma N(0, 1), in acquisition order; source lines from 7. The stimulus is the
    /// reference's reading: the set point plus <paramref name="stimulusSigma"/> N(0, 1) (0.002 kPa,
    /// as the demo's gauge scatters), so no two designs are exactly alike.
    /// </summary>
    public static Sweep UpDown(int setPoints, ref Xoshiro256StarStar rng, double c2 = 0.0, string serial = "SIM", double stimulusSigma = 0.002)
    {
        var n = (2 * setPoints) - 1;
        var x = new double[n];
        var y = new double[n];
        var legs = new Leg[n];
        var lines = new int[n];
        for (var i = 0; i < n; i++)
        {
            var k = i < setPoints ? i : n - 1 - i;
            var truth = 250.0 * k / (setPoints - 1);
            x[i] = truth + (stimulusSigma * Gaussian(ref rng));
            y[i] = Offset + (Gain * truth) + (c2 * truth * truth) + (Sigma * Gaussian(ref rng));
            legs[i] = i < setPoints ? Leg.Up : Leg.Down;
            lines[i] = i + 7;
        }

        return new Sweep(new UnitIdentity(serial, "SIM", null, null), [.. x], [.. y], [.. legs], [.. lines], ImmutableArray<MetadataEntry>.Empty);
    }

    public static FitResult Fit(Sweep sweep, LinearModel model)
    {
        var fit = LeastSquaresFitter.Fit(model, sweep.Stimulus, sweep.Output);
        return fit.IsSuccess ? fit.Value : throw new InvalidOperationException("The simulated sweep could not be fitted.");
    }

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
}
