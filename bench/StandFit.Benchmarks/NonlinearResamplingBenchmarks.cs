using System.Collections.Immutable;
using BenchmarkDotNet.Attributes;
using StandFit.Core.Fitting;
using StandFit.Core.Fitting.Expressions;
using StandFit.Core.Fitting.Nonlinear;
using StandFit.Core.Ingest;
using StandFit.Core.Recipes;
using StandFit.Core.Uncertainty;
using StandFit.Core.Uncertainty.Resampling;

namespace StandFit.Benchmarks;

/// <summary>
/// One unit's resampling of a three-parameter nonlinear model on one core: the exponential rise
/// y0 + span (1 - exp(-x / tau)) (an expression model, fitted by Levenberg-Marquardt) over a
/// 21-point sweep (0 to 100 % in 5 % steps, truth 0.5, 4, 30, noise SD 2 mV), 1000 pairs resamples
/// plus the delete-one jackknife, every resample refitted from the full-data estimate.
/// <c>Kernel</c> is the refits alone (the resampler built once in setup, its buffers reused);
/// <c>Analysis</c> is everything the evaluator does per unit: the resampler, jackknife, bootstrap
/// and the percentile, basic and BCa intervals and SEs of every figure. <c>KernelInverse</c> is
/// <c>Kernel</c> with one inverse_at figure (the stimulus giving 3 V): every refit also scans its
/// curve over the calibrated range and finds its root (NonlinearInverse).
/// </summary>
public class NonlinearResamplingBenchmarks
{
    public const string Expression = "y0 + span*(1 - exp(-x/tau))";
    private const int B = 1000;
    private const int Points = 21;

    private NonlinearResampler _kernel = null!;
    private NonlinearResampler _inverseKernel = null!;
    private double[] _inverseReplicates = null!;
    private double[] _inverseLeaveOut = null!;
    private NonlinearFitResult _fit = null!;
    private ExpressionModel _model = null!;
    private Sweep _sweep = null!;
    private Recipe _recipe = null!;
    private ResamplingPlan _plan = null!;
    private double[] _replicates = null!;
    private double[] _leaveOut = null!;
    private ResampleFailure[] _failures = null!;
    private int[] _own = null!;

    /// <summary>The benchmark's model and its fit to the seeded sweep.</summary>
    public static (ExpressionModel Model, NonlinearFitResult Fit, Sweep Sweep) Unit(ulong seed = 20261205)
    {
        var rng = new Xoshiro256StarStar(seed);
        var x = new double[Points];
        var y = new double[Points];
        for (var i = 0; i < Points; i++)
        {
            x[i] = 5.0 * i;
            y[i] = 0.5 + (4.0 * (1 - Math.Exp(-x[i] / 30))) + (0.002 * Simulation.Gaussian(ref rng));
        }

        var parsed = ExpressionParser.Parse(Expression, ["x"], ["y0", "span", "tau"]);
        var model = new ExpressionModel(parsed.Expression, [new("y0", 0), new("span", 3), new("tau", 20)]);
        var outcome = NonlinearFitter.Fit(model, new FitData([.. x], [.. y]));
        if (outcome.Problem is not null)
        {
            throw new InvalidOperationException("The benchmark sweep could not be fitted: " + outcome.Problem.Message);
        }

        var sweep = new Sweep(new UnitIdentity("SIM-NL", "SIM", null, null), [.. x], [.. y], [.. x.Select(_ => Leg.Unknown)], [.. Enumerable.Range(7, Points)], ImmutableArray<MetadataEntry>.Empty);
        return (model, outcome.Search!, sweep);
    }

    [GlobalSetup]
    public void Setup()
    {
        (_model, _fit, _sweep) = Unit();
        _kernel = new NonlinearResampler(_fit, _model, []);

        // KernelInverse: one inverse_at figure besides the parameters, the stimulus that gives 3 V (about 29 %).
        _inverseKernel = new NonlinearResampler(_fit, _model, [new StandFit.Core.Evaluation.DerivedFigure("at_3V", StandFit.Core.Evaluation.DerivedKind.InverseAt, 3.0)]);
        _inverseReplicates = new double[4 * B];
        _inverseLeaveOut = new double[4 * Points];
        _replicates = new double[3 * B];
        _leaveOut = new double[3 * Points];
        _failures = new ResampleFailure[Points];
        _own = [.. Enumerable.Range(0, Points)];
        _plan = new ResamplingPlan(12345) { Bootstrap = BootstrapScheme.Pairs, Resamples = B, ResamplesStated = true };
        _recipe = new Recipe("bench", "1", ["SIM"], new ColumnMap("x", "y"), ColumnUnits.None, _model, ConfidenceLevel.Default95, [], null, "", "bench.yaml") { Resampling = _plan };
    }

    [Benchmark]
    public int Kernel()
    {
        _kernel.LeaveOut(_own, Points, _leaveOut, _failures);
        var rng = new Xoshiro256StarStar(42);
        return _kernel.Bootstrap(BootstrapScheme.Pairs, B, ref rng, _replicates).Succeeded;
    }

    [Benchmark]
    public int KernelInverse()
    {
        _inverseKernel.LeaveOut(_own, Points, _inverseLeaveOut, _failures);
        var rng = new Xoshiro256StarStar(42);
        return _inverseKernel.Bootstrap(BootstrapScheme.Pairs, B, ref rng, _inverseReplicates).Succeeded;
    }

    [Benchmark]
    public double Analysis() => ResamplingAnalysis.Run(_fit, _model, _sweep, _recipe, _plan, 42).Figures[^1].Bootstrap!.StandardError;

    /// <summary>Refits the full search took over in one <see cref="Kernel"/> call (a diagnostic, not timed).</summary>
    public int HandedOverPerKernel()
    {
        var before = _kernel.HandedOver;
        Kernel();
        return _kernel.HandedOver - before;
    }
}
