using BenchmarkDotNet.Attributes;
using StandFit.Core.Diagnostics;
using StandFit.Core.Fitting;
using StandFit.Core.Ingest;
using StandFit.Core.Uncertainty.Resampling;

namespace StandFit.Benchmarks;

/// <summary>
/// One unit's residual diagnostics on one core (docs/diagnostics.md, "Speed"): a 41-point up/down
/// sweep (21 set points 0-250 kPa up, 20 back down) fitted by a straight line and by a quadratic.
/// <c>Compute</c> is everything <see cref="ResidualDiagnostics.Compute"/> does per unit; the others
/// are its most expensive parts alone, for profiling.
/// </summary>
public class DiagnosticsBenchmarks
{
    private FitResult _fit = null!;
    private Sweep _sweep = null!;
    private DiagnosticsOptions _options = null!;

    [Params(1, 2)]
    public int Degree { get; set; }

    [GlobalSetup]
    public void Setup()
    {
        var rng = new Xoshiro256StarStar(20261202);
        _sweep = Simulation.UpDown(21, ref rng, c2: Degree == 2 ? 2e-6 : 0);
        _fit = Simulation.Fit(_sweep, Polynomial.OfDegree(Degree));
        _options = new DiagnosticsOptions { SetPointTolerance = 1.0, Nominal = new StandFit.Core.Merit.NominalLine(Simulation.Offset, Simulation.Gain) };
    }

    [Benchmark]
    public double Compute() => ResidualDiagnostics.Compute(_fit, _sweep.Legs.AsSpan(), _options).DurbinWatson.P;

    [Benchmark]
    public double DurbinWatsonExact() => DurbinWatson.Compute(_fit).P;

    [Benchmark]
    public double ShapiroWilkW() => ShapiroWilk.Compute(_fit.WeightedResiduals.AsSpan()).P;

    [Benchmark]
    public double InfluenceAndOutlier() => Influence.OutlierTest(_fit, Influence.Points(_fit)).P;
}
