using System.Collections.Immutable;
using StandFit.Core.Curve;
using StandFit.Core.Evaluation;
using StandFit.Core.Fitting;
using StandFit.Core.Fitting.Nonlinear;
using StandFit.Core.Ingest;
using StandFit.Core.Judging;
using StandFit.Core.Problems;
using StandFit.Core.Recipes;

namespace StandFit.Core.Uncertainty.Resampling;

/// <summary>The resampling figures of one figure (a parameter or a derived figure).</summary>
/// <param name="Figure">The figure's name.</param>
/// <param name="Estimate">Its value on all the data.</param>
/// <param name="DeleteOne">The delete-one jackknife (null when a deletion cannot be fitted).</param>
/// <param name="Jackknife">The recipe's jackknife (delete-one, or by leg or cycle); null when unavailable.</param>
/// <param name="JackknifeInterval">estimate +/- t(level, g - 1) SE of <paramref name="Jackknife"/>.</param>
/// <param name="Bootstrap">The bootstrap summary, when the recipe asks for a bootstrap.</param>
public sealed record FigureResampling(string Figure, double Estimate, JackknifeSummary? DeleteOne, JackknifeSummary? Jackknife, ResampledInterval? JackknifeInterval, BootstrapSummary? Bootstrap);

/// <summary>The point whose deletion moves the gain most (delete-one jackknife).</summary>
public sealed record InfluentialPoint(string Figure, int Index, int SourceLine, double Stimulus, double Shift, double ShiftInSe);

/// <summary>Everything resampling found for one unit; immutable.</summary>
public sealed class ResamplingResult
{
    internal ResamplingResult(ResamplingPlan plan, ulong streamSeed, double coverage, ImmutableArray<FigureResampling> figures, BootstrapCounts? bootstrap, int jackknifeDeletions, InfluentialPoint? influential, ImmutableArray<Finding> findings)
    {
        Plan = plan;
        StreamSeed = streamSeed;
        Coverage = coverage;
        Figures = figures;
        Bootstrap = bootstrap;
        JackknifeDeletions = jackknifeDeletions;
        Influential = influential;
        Findings = findings;
    }

    public ResamplingPlan Plan { get; }

    /// <summary>The seed of this unit's stream (<see cref="StreamSeed"/>).</summary>
    public ulong StreamSeed { get; }

    /// <summary>The central coverage of every interval (the recipe's confidence).</summary>
    public double Coverage { get; }

    public ImmutableArray<FigureResampling> Figures { get; }

    /// <summary>Counts of the bootstrap, when there is one.</summary>
    public BootstrapCounts? Bootstrap { get; }

    /// <summary>g of the recipe's jackknife: points, legs or cycles.</summary>
    public int JackknifeDeletions { get; }

    public InfluentialPoint? Influential { get; }

    /// <summary>Findings for the ruling: the influential point (pass kind), too many failed resamples (retest).</summary>
    public ImmutableArray<Finding> Findings { get; }

    public FigureResampling? For(string figure) => Figures.FirstOrDefault(f => f.Figure == figure);

    /// <summary>The figures with their resampling intervals attached, so guarded limits can use them.</summary>
    public ImmutableDictionary<string, FigureValue> Attach(ImmutableDictionary<string, FigureValue> figures)
    {
        ArgumentNullException.ThrowIfNull(figures);
        var builder = figures.ToBuilder();
        var jackknifeName = ResamplingPlan.JackknifeName(Plan.Jackknife);
        foreach (var f in Figures)
        {
            if (!figures.TryGetValue(f.Figure, out var value))
            {
                continue;
            }

            var intervals = ImmutableArray.CreateBuilder<FigureInterval>();
            if (f.JackknifeInterval is { } j)
            {
                intervals.Add(new FigureInterval(IntervalSource.Jackknife, j.Low, j.High, Messages.IntervalBasisJackknife(jackknifeName, JackknifeDeletions, Coverage)));
            }

            if (f.Bootstrap is { } b && Bootstrap is { } counts)
            {
                var scheme = ResamplingPlan.SchemeName(Plan.Bootstrap!.Value);
                if (b.Percentile is { } p)
                {
                    intervals.Add(new FigureInterval(IntervalSource.BootstrapPercentile, p.Low, p.High, Messages.IntervalBasisBootstrap("percentile", scheme, counts.Succeeded, Coverage)));
                }

                if (b.Basic is { } basic)
                {
                    intervals.Add(new FigureInterval(IntervalSource.BootstrapBasic, basic.Low, basic.High, Messages.IntervalBasisBootstrap("basic", scheme, counts.Succeeded, Coverage)));
                }

                if (b.Bca is { } bca)
                {
                    intervals.Add(new FigureInterval(IntervalSource.BootstrapBca, bca.Low, bca.High, Messages.IntervalBasisBootstrap("BCa", scheme, counts.Succeeded, Coverage)));
                }
            }

            builder[f.Figure] = value with { Intervals = intervals.ToImmutable() };
        }

        return builder.ToImmutable();
    }
}

/// <summary>
/// Jackknife and bootstrap error bars for every parameter and derived figure of a unit: by the
/// exact update of the fit's QR factors for a model linear in its parameters
/// (<see cref="LinearResampler"/>), by a refit of every resample from the full-data estimate for an
/// expression model (<see cref="NonlinearResampler"/>); the summaries, intervals and findings are the
/// same code for both. Deterministic: the bootstrap draws
/// come from one xoshiro256** stream per unit, seeded by <see cref="StreamSeed"/>; the figures are
/// reduced in resample order on one thread, so the result never depends on how many units are
/// judged at once.
/// </summary>
public static class ResamplingAnalysis
{
    /// <summary>The figure whose most influential point is named in the findings.</summary>
    public const string InfluenceFigure = "gain";

    public static ResamplingResult Run(FitResult fit, Sweep sweep, Recipe recipe, ResamplingPlan plan, ulong streamSeed)
    {
        ArgumentNullException.ThrowIfNull(fit);
        ArgumentNullException.ThrowIfNull(sweep);
        ArgumentNullException.ThrowIfNull(recipe);
        ArgumentNullException.ThrowIfNull(plan);
        var (names, units, gradients, inverse) = Figures(fit, recipe);
        var kernel = new LinearResampler(fit, gradients, inverse);
        return Run(kernel, names, units, sweep, plan, streamSeed, recipe.Confidence);
    }

    /// <summary>Resampling of a converged expression-model fit: every resample refitted from the fit's estimates (<see cref="NonlinearResampler"/>).</summary>
    public static ResamplingResult Run(NonlinearFitResult fit, ExpressionModel model, Sweep sweep, Recipe recipe, ResamplingPlan plan, ulong streamSeed)
    {
        ArgumentNullException.ThrowIfNull(fit);
        ArgumentNullException.ThrowIfNull(model);
        ArgumentNullException.ThrowIfNull(sweep);
        ArgumentNullException.ThrowIfNull(recipe);
        ArgumentNullException.ThrowIfNull(plan);
        var (names, units, derived) = Figures(fit, model, recipe);
        var kernel = new NonlinearResampler(fit, model, derived);
        return Run(kernel, names, units, sweep, plan, streamSeed, recipe.Confidence);
    }

    /// <summary>
    /// The figures an expression model's resampling reports: every parameter, then every derived
    /// figure in the recipe's order. An inverse prediction (inverse_at) is the root of each refitted
    /// curve; one that the fit itself does not solve (its output outside the curve's range, or
    /// reached more than once) has no figure to resample and is left out, and a limit that judges
    /// its resampling interval is not evaluated, as for its t interval.
    /// </summary>
    public static (ImmutableArray<string> Names, ImmutableArray<string> Units, ImmutableArray<DerivedFigure> Derived) Figures(NonlinearFitResult fit, ExpressionModel model, Recipe recipe)
    {
        ArgumentNullException.ThrowIfNull(fit);
        ArgumentNullException.ThrowIfNull(model);
        ArgumentNullException.ThrowIfNull(recipe);
        var derived = Resampled(fit, recipe);
        var names = ImmutableArray.CreateBuilder<string>();
        var units = ImmutableArray.CreateBuilder<string>();
        foreach (var name in model.ParameterNames)
        {
            names.Add(name);
            units.Add(recipe.UnitOf(name));
        }

        foreach (var d in derived)
        {
            names.Add(d.Name);
            units.Add(UnitOf(d, recipe));
        }

        return (names.ToImmutable(), units.ToImmutable(), derived);
    }

    /// <summary>The unit of a derived figure: the sensitivity's, the stimulus's for an inverse prediction, else the output's.</summary>
    private static string UnitOf(DerivedFigure d, Recipe recipe) => d.Kind switch
    {
        DerivedKind.SensitivityAt => recipe.UnitOfSensitivity(),
        DerivedKind.InverseAt => recipe.Units.Stimulus,
        _ => recipe.Units.Output,
    };

    /// <summary>The recipe's derived figures that resampling reports: all but an inverse prediction that the fit itself does not solve.</summary>
    private static ImmutableArray<DerivedFigure> Resampled(IFitResult fit, Recipe recipe) =>
        [.. recipe.Derived.Where(d => d.Kind != DerivedKind.InverseAt || (fit.InputCount == 1 && InversePrediction.RootOf(fit, d.At).Status == InverseStatus.Solved))];

    /// <summary>
    /// The figures resampled: every parameter, then every derived figure linear in the parameters
    /// (sensitivity_at, value_at, band_at) with its gradient (f x p), then every inverse prediction
    /// that the fit solves (its output y0 in <c>Inverse</c>: the root of each resample's curve).
    /// </summary>
    public static (ImmutableArray<string> Names, ImmutableArray<string> Units, double[] Gradients, double[] Inverse) Figures(FitResult fit, Recipe recipe)
    {
        ArgumentNullException.ThrowIfNull(fit);
        ArgumentNullException.ThrowIfNull(recipe);
        var model = fit.Model;
        var p = model.ParameterCount;
        var all = Resampled(fit, recipe);
        var resampled = all.Where(d => d.Kind != DerivedKind.InverseAt).ToImmutableArray();
        var inverse = all.Where(d => d.Kind == DerivedKind.InverseAt).ToImmutableArray();
        var names = ImmutableArray.CreateBuilder<string>();
        var units = ImmutableArray.CreateBuilder<string>();
        var gradients = new double[(p + resampled.Length) * p];
        for (var j = 0; j < p; j++)
        {
            names.Add(model.ParameterNames[j]);
            units.Add(recipe.UnitOf(model.ParameterNames[j]));
            gradients[(j * p) + j] = 1.0;
        }

        for (var d = 0; d < resampled.Length; d++)
        {
            var derived = resampled[d];
            var row = gradients.AsSpan((p + d) * p, p);
            if (derived.Kind == DerivedKind.SensitivityAt)
            {
                model.FillBasisDerivative([derived.At], 0, row);
                units.Add(recipe.UnitOfSensitivity());
            }
            else
            {
                model.FillBasis([derived.At], row);
                units.Add(recipe.Units.Output);
            }

            names.Add(derived.Name);
        }

        foreach (var d in inverse)
        {
            names.Add(d.Name);
            units.Add(UnitOf(d, recipe));
        }

        return (names.ToImmutable(), units.ToImmutable(), gradients, [.. inverse.Select(d => d.At)]);
    }

    private static ResamplingResult Run(IResampler kernel, ImmutableArray<string> names, ImmutableArray<string> units, Sweep sweep, ResamplingPlan plan, ulong streamSeed, ConfidenceLevel level)
    {
        var n = kernel.Points;
        var f = kernel.Figures;
        var findings = ImmutableArray.CreateBuilder<Finding>();

        // Delete-one: always (the influence of each point and the BCa acceleration come from it).
        var own = new int[n];
        for (var i = 0; i < n; i++)
        {
            own[i] = i;
        }

        var leaveOne = new double[f * n];
        var leaveOneFailures = new ResampleFailure[n];
        kernel.LeaveOut(own, n, leaveOne, leaveOneFailures);
        var firstFailed = Array.FindIndex(leaveOneFailures, x => x != ResampleFailure.None);
        var deleteOne = new JackknifeSummary?[f];
        if (firstFailed < 0)
        {
            for (var k = 0; k < f; k++)
            {
                deleteOne[k] = Jackknife.Summarise(kernel.Estimates[k], leaveOne.AsSpan(k * n, n));
            }
        }
        else
        {
            var message = leaveOneFailures[firstFailed] is ResampleFailure.NoRootInRange or ResampleFailure.SeveralRoots
                ? Messages.JackknifeNoInverse(sweep.SourceLines[firstFailed], leaveOneFailures[firstFailed] == ResampleFailure.SeveralRoots)
                : Messages.JackknifeUnavailable(InfluenceFigure, sweep.SourceLines[firstFailed]);
            findings.Add(new Finding(ReasonCodes.ResamplingJackknifeUnavailable.Code, ReasonCodes.ResamplingJackknifeUnavailable.Kind, message));
        }

        // The recipe's jackknife, when it deletes groups.
        var reported = deleteOne;
        var deletions = n;
        if (plan.Jackknife != JackknifeGroups.DeleteOne)
        {
            var (groupOf, groups) = Groups(sweep, plan.Jackknife);
            deletions = groups;
            reported = new JackknifeSummary?[f];
            if (groups >= 2)
            {
                var leaveGroup = new double[f * groups];
                var groupFailures = new ResampleFailure[groups];
                kernel.LeaveOut(groupOf, groups, leaveGroup, groupFailures);
                if (Array.TrueForAll(groupFailures, x => x == ResampleFailure.None))
                {
                    for (var k = 0; k < f; k++)
                    {
                        reported[k] = Jackknife.Summarise(kernel.Estimates[k], leaveGroup.AsSpan(k * groups, groups));
                    }
                }
            }
        }

        // Bootstrap.
        BootstrapCounts? counts = null;
        var summaries = new BootstrapSummary?[f];
        if (plan.Bootstrap is { } scheme)
        {
            var b = plan.Resamples;
            var replicates = new double[f * b];
            var rng = new Xoshiro256StarStar(streamSeed);
            var run = kernel.Bootstrap(scheme, b, ref rng, replicates);
            counts = run;
            for (var k = 0; k < f; k++)
            {
                var acceleration = deleteOne[k]?.Acceleration ?? double.NaN;
                summaries[k] = BootstrapIntervals.Summarise(replicates.AsSpan(k * b, run.Succeeded), kernel.Estimates[k], level.Value, acceleration);
            }

            if (plan.MaxFailedPercent is { } maxPercent)
            {
                var percent = 100.0 * run.Failed / run.Requested;
                if (percent > maxPercent)
                {
                    findings.Add(new Finding(
                        ReasonCodes.ResamplingTooManyFailures.Code,
                        ReasonCodes.ResamplingTooManyFailures.Kind,
                        Messages.TooManyFailedResamples(run.Failed, run.Requested, percent, maxPercent, run.DegenerateStimulus, run.RankDeficient, run.NonFinite, run.NotConverged, run.AtBound, run.NoRootInRange, run.SeveralRoots)));
                }
            }
        }

        var figures = ImmutableArray.CreateBuilder<FigureResampling>(f);
        for (var k = 0; k < f; k++)
        {
            ResampledInterval? jackknifeInterval = null;
            if (reported[k] is { } jk && deletions >= 2)
            {
                var t = StudentT.TwoSidedCritical(level, deletions - 1);
                jackknifeInterval = new ResampledInterval(kernel.Estimates[k] - (t * jk.StandardError), kernel.Estimates[k] + (t * jk.StandardError));
            }

            figures.Add(new FigureResampling(names[k], kernel.Estimates[k], deleteOne[k], reported[k], jackknifeInterval, summaries[k]));
        }

        // The point that moves the gain most.
        InfluentialPoint? influential = null;
        var gain = names.IndexOf(InfluenceFigure);
        if (gain >= 0 && deleteOne[gain] is { } gainJack)
        {
            var best = 0;
            var bestShift = 0.0;
            for (var i = 0; i < n; i++)
            {
                var shift = leaveOne[(gain * n) + i] - kernel.Estimates[gain];
                if (Math.Abs(shift) > Math.Abs(bestShift))
                {
                    best = i;
                    bestShift = shift;
                }
            }

            var inSe = gainJack.StandardError > 0 ? bestShift / gainJack.StandardError : 0.0;
            influential = new InfluentialPoint(InfluenceFigure, best, sweep.SourceLines[best], sweep.Stimulus[best], bestShift, inSe);
            findings.Add(new Finding(
                ReasonCodes.ResamplingInfluentialPoint.Code,
                ReasonCodes.ResamplingInfluentialPoint.Kind,
                Messages.InfluentialPoint(InfluenceFigure, influential.SourceLine, influential.Stimulus, bestShift, units[gain], inSe, n)));
        }

        return new ResamplingResult(plan, streamSeed, level.Value, figures.MoveToImmutable(), counts, deletions, influential, findings.ToImmutable());
    }

    /// <summary>
    /// Each point's group: legs are maximal runs of one leg label in acquisition order (points
    /// without a label form runs of their own); a cycle is legs 1 and 2, 3 and 4, and so on.
    /// </summary>
    public static (int[] GroupOf, int Groups) Groups(Sweep sweep, JackknifeGroups kind)
    {
        ArgumentNullException.ThrowIfNull(sweep);
        var n = sweep.Count;
        var groupOf = new int[n];
        if (kind == JackknifeGroups.DeleteOne)
        {
            for (var i = 0; i < n; i++)
            {
                groupOf[i] = i;
            }

            return (groupOf, n);
        }

        var leg = -1;
        for (var i = 0; i < n; i++)
        {
            if (i == 0 || sweep.Legs[i] != sweep.Legs[i - 1])
            {
                leg++;
            }

            groupOf[i] = kind == JackknifeGroups.DeleteLeg ? leg : leg / 2;
        }

        var groups = n == 0 ? 0 : groupOf[n - 1] + 1;
        return (groupOf, groups);
    }
}
