using BenchmarkDotNet.Attributes;
using StandFit.Core.Fitting;
using StandFit.Core.Recipes;
using StandFit.Core.Uncertainty;
using StandFit.Core.Uncertainty.Resampling;

namespace StandFit.Benchmarks;

/// <summary>
/// One unit's resampling on one core: 1000 pairs resamples plus the delete-one jackknife, for a
/// 21-point straight line and a 21-point quadratic. <c>Kernel</c> is the resampling itself (the
/// factorisation made once per unit in setup, buffers reused); <c>Analysis</c> is everything the
/// evaluator does per unit: factorisation, jackknife, bootstrap and the percentile, basic and BCa
/// intervals and SEs of every figure. <c>KernelInverse</c> is <c>Kernel</c> with one inverse_at
/// figure besides the parameters (the output at mid-range): every deletion and resample also
/// finds the root of its curve (LinearInverse).
/// </summary>
public class ResamplingBenchmarks
{
    private const int B = 1000;
    private LinearResampler _kernel = null!;
    private LinearResampler _inverseKernel = null!;
    private double[] _inverseReplicates = null!;
    private double[] _inverseLeaveOut = null!;
    private FitResult _fit = null!;
    private StandFit.Core.Ingest.Sweep _sweep = null!;
    private Recipe _recipe = null!;
    private ResamplingPlan _plan = null!;
    private double[] _replicates = null!;
    private double[] _leaveOut = null!;
    private ResampleFailure[] _failures = null!;
    private int[] _own = null!;

    [Params(1, 2)]
    public int Degree { get; set; }

    [GlobalSetup]
    public void Setup()
    {
        var rng = new Xoshiro256StarStar(20261202);
        var model = Polynomial.OfDegree(Degree);
        _sweep = Simulation.Sweep(21, ref rng, c2: Degree == 2 ? 2e-6 : 0);
        _fit = Simulation.Fit(_sweep, model);
        var p = model.ParameterCount;
        var identity = new double[p * p];
        for (var j = 0; j < p; j++)
        {
            identity[(j * p) + j] = 1;
        }

        _kernel = new LinearResampler(_fit, identity);
        var y0 = _fit.Model.Evaluate(_fit.Estimates.AsSpan(), (_fit.InputMin[0] + _fit.InputMax[0]) / 2);
        _inverseKernel = new LinearResampler(_fit, identity, [y0]);
        _inverseReplicates = new double[(p + 1) * B];
        _inverseLeaveOut = new double[(p + 1) * 21];
        _replicates = new double[p * B];
        _leaveOut = new double[p * 21];
        _failures = new ResampleFailure[21];
        _own = [.. Enumerable.Range(0, 21)];
        _plan = new ResamplingPlan(12345) { Bootstrap = BootstrapScheme.Pairs, Resamples = B, ResamplesStated = true };
        _recipe = new Recipe("bench", "1", ["SIM"], new StandFit.Core.Ingest.ColumnMap("x", "y"), ColumnUnits.None, model, ConfidenceLevel.Default95, [], null, "", "bench.yaml") { Resampling = _plan };
    }

    [Benchmark]
    public int Kernel()
    {
        _kernel.LeaveOut(_own, 21, _leaveOut, _failures);
        var rng = new Xoshiro256StarStar(42);
        return _kernel.Bootstrap(BootstrapScheme.Pairs, B, ref rng, _replicates).Succeeded;
    }

    [Benchmark]
    public int KernelInverse()
    {
        _inverseKernel.LeaveOut(_own, 21, _inverseLeaveOut, _failures);
        var rng = new Xoshiro256StarStar(42);
        return _inverseKernel.Bootstrap(BootstrapScheme.Pairs, B, ref rng, _inverseReplicates).Succeeded;
    }

    [Benchmark]
    public double Analysis() => ResamplingAnalysis.Run(_fit, _sweep, _recipe, _plan, 42).Figures[^1].Bootstrap!.StandardError;
}
