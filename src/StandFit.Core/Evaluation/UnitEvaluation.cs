using System.Collections.Immutable;
using StandFit.Core.Diagnostics;
using StandFit.Core.Fitting;
using StandFit.Core.Ingest;
using StandFit.Core.Judging;
using StandFit.Core.Problems;
using StandFit.Core.Recipes;
using StandFit.Core.Uncertainty;

namespace StandFit.Core.Evaluation;

/// <summary>
/// Everything decided about one unit: who it is, what recipe judged it, the fit with its error bars,
/// the residual diagnostics and the verdict. A rejected unit has a <see cref="Problem"/> and may lack
/// the rest.
/// </summary>
public sealed class UnitEvaluation
{
    private UnitEvaluation(string sourceName, UnitIdentity? identity, Recipe? recipe, Sweep? sweep, IFitResult? fit, ImmutableArray<ParameterEstimate> parameters, ImmutableArray<ParameterEstimate> derived, RunsTestResult? runs, ImmutableDictionary<string, FigureValue> figures, Verdict verdict, Problem? problem)
    {
        Derived = derived;
        Figures = figures;
        SourceName = sourceName;
        Identity = identity;
        Recipe = recipe;
        Sweep = sweep;
        Fit = fit;
        Parameters = parameters;
        Runs = runs;
        Verdict = verdict;
        Problem = problem;
    }

    public string SourceName { get; }

    public UnitIdentity? Identity { get; }

    public Recipe? Recipe { get; }

    public Sweep? Sweep { get; }

    /// <summary>The fit: a <see cref="FitResult"/> or a converged <see cref="Fitting.Nonlinear.NonlinearFitResult"/>; null when the unit was not fitted or the fit was rejected.</summary>
    public IFitResult? Fit { get; }

    /// <summary>
    /// The Levenberg-Marquardt search of an expression model, kept also when it did not converge
    /// (the unit is then rejected and <see cref="Fit"/> is null): its status, iterations and stop
    /// reason go to the summary. Null for linear models.
    /// </summary>
    public Fitting.Nonlinear.NonlinearFitResult? Search { get; private init; }

    /// <summary>The recipe's derived figures of the curve (sensitivity, value, bands, inverse prediction), in recipe order; empty when there is no fit.</summary>
    public ImmutableArray<Curve.CurveFigure> Curve { get; private init; } = [];

    /// <summary>The parameters with their t-based intervals at the recipe's confidence (empty when rejected before the fit).</summary>
    public ImmutableArray<ParameterEstimate> Parameters { get; }

    /// <summary>The model's derived quantities (trade coefficients) with delta-method error bars (empty when the model has none or there is no fit).</summary>
    public ImmutableArray<ParameterEstimate> Derived { get; }

    public RunsTestResult? Runs { get; }

    /// <summary>The residual diagnostics and figures of merit (null when the unit was not fitted).</summary>
    public ResidualDiagnostics? Diagnostics { get; private init; }

    /// <summary>Every figure a limit can name (empty when the unit was not fitted).</summary>
    public ImmutableDictionary<string, FigureValue> Figures { get; }

    public Verdict Verdict { get; }

    /// <summary>Jackknife and bootstrap figures, when the recipe asks for them.</summary>
    public Uncertainty.Resampling.ResamplingResult? Resampling { get; private init; }

    /// <summary>Why the unit was rejected, when it was.</summary>
    public Problem? Problem { get; }

    public Ruling Ruling => Verdict.Ruling;

    public ParameterEstimate? Parameter(string name) => Parameters.FirstOrDefault(p => p.Name == name);

    internal static UnitEvaluation Judged(string sourceName, Recipe recipe, Sweep sweep, IFitResult fit, ImmutableArray<ParameterEstimate> parameters, ImmutableArray<ParameterEstimate> derived, RunsTestResult runs, ImmutableDictionary<string, FigureValue> figures, Verdict verdict, Uncertainty.Resampling.ResamplingResult? resampling = null, ResidualDiagnostics? diagnostics = null, ImmutableArray<Curve.CurveFigure> curve = default) =>
        new(sourceName, sweep.Identity, recipe, sweep, fit, parameters, derived, runs, figures, verdict, null)
        {
            Resampling = resampling,
            Diagnostics = diagnostics,
            Search = fit as Fitting.Nonlinear.NonlinearFitResult,
            Curve = curve.IsDefault ? [] : curve,
        };

    /// <summary>A unit whose nonlinear fit did not give a solution: rejected, with the search kept for the summary.</summary>
    internal static UnitEvaluation RejectedSearch(string sourceName, Problem problem, Recipe recipe, Sweep sweep, Fitting.Nonlinear.NonlinearFitResult search) =>
        new(sourceName, sweep.Identity, recipe, sweep, null, [], [], null, ImmutableDictionary<string, FigureValue>.Empty, Verdict.Rejected(problem), problem) { Search = search };

    /// <summary>A unit whose sweep failed a data-quality gate: not fitted, ruled retest.</summary>
    internal static UnitEvaluation Screened(string sourceName, Recipe recipe, Sweep sweep, Verdict verdict) =>
        new(sourceName, sweep.Identity, recipe, sweep, null, [], [], null, ImmutableDictionary<string, FigureValue>.Empty, verdict, null);

    /// <summary>A unit that cannot be judged; whatever is known of it is kept.</summary>
    public static UnitEvaluation Rejected(string sourceName, Problem problem, UnitIdentity? identity = null, Recipe? recipe = null, Sweep? sweep = null) =>
        new(sourceName, identity, recipe, sweep, null, [], [], null, ImmutableDictionary<string, FigureValue>.Empty, Verdict.Rejected(problem), problem);
}
