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
