using System.Collections.Immutable;
using StandFit.Core.Diagnostics;
using StandFit.Core.Fitting;
using StandFit.Core.Judging;
using StandFit.Core.Recipes;
using StandFit.Core.Uncertainty;

namespace StandFit.Core.Evaluation;

/// <summary>
/// Every figure of a judged unit that a limit can name: the parameters (with standard errors), the
/// half-widths of their intervals, the derived figures of the recipe (with standard errors), and
/// the fit's diagnostics. <see cref="Names"/> says which exist for a model before any data is seen,
/// so recipes can be checked.
/// </summary>
public static class FigureTable
{
    /// <summary>Figures every fit has, without an uncertainty of their own.</summary>
    public static readonly ImmutableArray<string> FitFigures = ["residual_sd", "r_squared", "adj_r_squared", "condition_number", "runs_count", "runs_p", "runs_mid_p", "runs_z"];

    /// <summary>
    /// The residual diagnostics and figures of merit (docs/diagnostics.md, docs/figures-of-merit.md),
    /// without an uncertainty of their own, so only simple-rule limits apply. A figure the unit's fit
    /// cannot give (no replicates for lof_p, no down leg for hysteresis_pct ...) is absent for that unit.
    /// Every numeric diagnostic column of the summary is here under its column name (docs/outputs.md),
    /// but for the outlier's point and file line, which locate a point rather than measure the unit.
    /// </summary>
    public static readonly ImmutableArray<string> DiagnosticFigures =
    [
        "runs_acquisition_count", "runs_acquisition_z", "runs_acquisition_p", "runs_acquisition_mid_p",
        "runs_up_count", "runs_up_p", "runs_down_count", "runs_down_p", "runs_per_leg_p",
        "runs_within_legs_count", "runs_within_legs_z", "runs_within_legs_p", "runs_within_legs_mid_p",
        "dw", "dw_p", "dw_stimulus", "dw_stimulus_p", "dw_per_leg", "dw_per_leg_p",
        "lag1_autocorrelation", "ljung_box_q", "ljung_box_p", "set_points", "lof_f", "lof_df1", "lof_df2", "lof_p",
        "curvature_f", "curvature_df", "curvature_p", "bp", "bp_df", "bp_p", "bp_f", "bp_f_p",
        "sw_w", "sw_p", "ad_a2", "ad_astar", "ad_p", "skewness", "excess_kurtosis",
        "max_abs_rstudent", "outlier_p", "max_leverage", "max_cooks_distance",
        "fso", "nonlinearity_terminal_pct", "nonlinearity_ls_pct", "nonlinearity_minimax_pct", "hysteresis_pct", "nonrepeatability_pct", "llf",
    ];

    /// <summary>
    /// The Durbin-Watson orders besides acquisition that limits on <paramref name="figures"/> need
    /// computed (<c>dw_stimulus*</c>: stimulus; <c>dw_per_leg*</c>: per leg), so that a limit on
    /// them is evaluated whatever order the recipe's Durbin-Watson gate takes.
    /// </summary>
    public static IEnumerable<ResidualOrder> DurbinWatsonOrdersNamed(IEnumerable<string> figures)
    {
        var names = figures.ToList();
        if (names.Any(f => f is "dw_stimulus" or "dw_stimulus_p"))
        {
            yield return ResidualOrder.Stimulus;
        }

        if (names.Any(f => f is "dw_per_leg" or "dw_per_leg_p"))
        {
            yield return ResidualOrder.PerLeg;
        }
    }

    /// <summary>Figures of merit against the nominal curve: only with the recipe's <c>nominal</c>.</summary>
    public static readonly ImmutableArray<string> NominalFigures = ["zero_error_pct", "span_error_pct", "max_error_pct"];

    public const string HalfWidthSuffix = ".half_width";

    /// <summary>The half-width of a band figure's prediction band (<c>derived.&lt;name&gt;.band_at</c>).</summary>
    public const string PredictionHalfWidthSuffix = ".prediction_half_width";

    /// <summary>
    /// Figures that need a linear design and are refused at recipe load for an expression model
    /// (the curvature test adds the next power of a polynomial).
    /// </summary>
    public static readonly ImmutableArray<string> LinearOnlyFigures = ["curvature_f", "curvature_p"];

    /// <summary>Every figure name a recipe with this model and these derived figures can limit, and whether it has an uncertainty.</summary>
    public static ImmutableDictionary<string, bool> Names(CurveModel model, IEnumerable<DerivedFigure> derived)
    {
        var names = ImmutableDictionary.CreateBuilder<string, bool>(StringComparer.Ordinal);
        foreach (var p in model.ParameterNames.Concat(model.DerivedNames))
        {
            names[p] = true;
            names[p + HalfWidthSuffix] = false;
        }

        foreach (var d in derived)
        {
            names[d.Name] = true;
            names[d.Name + HalfWidthSuffix] = false;
            if (d.Kind == DerivedKind.BandAt)
            {
                names[d.Name + PredictionHalfWidthSuffix] = false;
            }
        }

        foreach (var f in FitFigures.Concat(DiagnosticFigures).Concat(NominalFigures))
        {
            names[f] = false;
        }

        return names.ToImmutable();
    }

    public static ImmutableDictionary<string, FigureValue> Compute(IFitResult fit, ImmutableArray<ParameterEstimate> parameters, ImmutableArray<ParameterEstimate> modelDerived, RunsTestResult runs, Recipe recipe, ResidualDiagnostics? diagnostics = null) =>
        Compute(fit, parameters, modelDerived, Curve.CurveFigures.Compute(fit, recipe), runs, recipe, diagnostics);

    public static ImmutableDictionary<string, FigureValue> Compute(IFitResult fit, ImmutableArray<ParameterEstimate> parameters, ImmutableArray<ParameterEstimate> modelDerived, ImmutableArray<Curve.CurveFigure> curve, RunsTestResult runs, Recipe recipe, ResidualDiagnostics? diagnostics = null)
    {
        var figures = ImmutableDictionary.CreateBuilder<string, FigureValue>(StringComparer.Ordinal);
        foreach (var p in parameters.Concat(modelDerived))
        {
            var unit = recipe.UnitOf(p.Name);
            figures[p.Name] = new FigureValue(p.Name, p.Estimate, p.StandardError, fit.DegreesOfFreedom, unit);
            figures[p.Name + HalfWidthSuffix] = new FigureValue(p.Name + HalfWidthSuffix, (p.High - p.Low) / 2, null, null, unit);
        }

        // A derived figure that could not be computed for this unit (an inverse prediction outside
        // the calibrated range, a value outside the model's domain) is absent: a limit on it is not evaluated.
        foreach (var d in curve.Where(c => c.IsOk))
        {
            var unit = d.Kind switch
            {
                DerivedKind.SensitivityAt => recipe.UnitOfSensitivity(),
                DerivedKind.InverseAt => recipe.Units.Stimulus,
                _ => recipe.Units.Output,
            };
            figures[d.Name] = new FigureValue(d.Name, d.Value, d.StandardError, fit.DegreesOfFreedom, unit);
            figures[d.Name + HalfWidthSuffix] = new FigureValue(d.Name + HalfWidthSuffix, d.HalfWidth, null, null, unit);
            if (d.PredictionHalfWidth is { } prediction)
            {
                figures[d.Name + PredictionHalfWidthSuffix] = new FigureValue(d.Name + PredictionHalfWidthSuffix, prediction, null, null, unit);
            }
        }

        // A fit figure that is not a number (R^2 of an output without scatter about its mean) is absent.
        foreach (var (name, value, unit) in new[] { ("residual_sd", fit.ResidualSd, recipe.Units.Output), ("r_squared", fit.RSquared, ""), ("adj_r_squared", fit.AdjustedRSquared, ""), ("condition_number", fit.ConditionNumber, "") })
        {
            if (!double.IsNaN(value))
            {
                figures[name] = new FigureValue(name, value, null, null, unit);
            }
        }

        figures["runs_count"] = new FigureValue("runs_count", runs.Runs, null, null, "");
        if (runs.IsApplicable)
        {
            figures["runs_p"] = new FigureValue("runs_p", runs.P, null, null, "");
            figures["runs_mid_p"] = new FigureValue("runs_mid_p", runs.MidP, null, null, "");
            figures["runs_z"] = new FigureValue("runs_z", runs.Z, null, null, "");
        }

        if (diagnostics is not null)
        {
            AddDiagnostics(figures, diagnostics, recipe.Units.Output);
        }

        return figures.ToImmutable();
    }

    private static void AddDiagnostics(ImmutableDictionary<string, FigureValue>.Builder figures, ResidualDiagnostics d, string outputUnit)
    {
        void Add(string name, double? value, string unit = "")
        {
            if (value is { } v && !double.IsNaN(v))
            {
                figures[name] = new FigureValue(name, v, null, null, unit);
            }
        }

        void AddRuns(string prefix, RunsTestResult? runs, bool full)
        {
            if (runs is { IsApplicable: true } r)
            {
                Add(prefix + "_count", r.Runs);
                Add(prefix + "_p", r.P);
                if (full)
                {
                    Add(prefix + "_z", r.Z);
                    Add(prefix + "_mid_p", r.MidP);
                }
            }
        }

        // The summary's columns, by the same rules (SummaryRecordFactory): a test that does not apply gives no figure.
        AddRuns("runs_acquisition", d.RunsByAcquisition, full: true);
        AddRuns("runs_up", d.RunsPerLeg.Of(Ingest.Leg.Up), full: false);
        AddRuns("runs_down", d.RunsPerLeg.Of(Ingest.Leg.Down), full: false);
        if (d.RunsPerLeg.IsApplicable)
        {
            Add("runs_per_leg_p", d.RunsPerLeg.P);
            AddRuns("runs_within_legs", d.RunsPerLeg.WithinLegs, full: true);
        }

        if (d.DurbinWatson.IsApplicable)
        {
            Add("dw", d.DurbinWatson.Statistic);
            Add("dw_p", d.DurbinWatson.P);
        }

        if (d.DurbinWatsonByStimulus is { IsApplicable: true } byStimulus)
        {
            Add("dw_stimulus", byStimulus.Statistic);
            Add("dw_stimulus_p", byStimulus.P);
        }

        if (d.DurbinWatsonPerLeg is { IsApplicable: true } perLeg)
        {
            Add("dw_per_leg", perLeg.Statistic);
            Add("dw_per_leg_p", perLeg.P);
        }

        if (d.Autocorrelation.IsApplicable)
        {
            Add("lag1_autocorrelation", d.Autocorrelation.Lag1);
            Add("ljung_box_q", d.Autocorrelation.LjungBoxQ);
            Add("ljung_box_p", d.Autocorrelation.P);
        }

        Add("set_points", d.SetPoints.Count);
        if (d.LackOfFit.IsApplicable)
        {
            Add("lof_f", d.LackOfFit.F);
            Add("lof_df1", d.LackOfFit.LackDf);
            Add("lof_df2", d.LackOfFit.PureErrorDf);
            Add("lof_p", d.LackOfFit.P);
        }

        if (d.Curvature.IsApplicable)
        {
            Add("curvature_f", d.Curvature.F);
            Add("curvature_df", d.Curvature.Df);
            Add("curvature_p", d.Curvature.P);
        }

        if (d.BreuschPagan.IsApplicable)
        {
            Add("bp", d.BreuschPagan.Statistic);
            Add("bp_df", d.BreuschPagan.Df);
            Add("bp_p", d.BreuschPagan.P);
            if (double.IsFinite(d.BreuschPagan.F))
            {
                Add("bp_f", d.BreuschPagan.F);
            }

            Add("bp_f_p", d.BreuschPagan.FP);
        }

        if (d.ShapiroWilk.IsApplicable)
        {
            Add("sw_w", d.ShapiroWilk.W);
            Add("sw_p", d.ShapiroWilk.P);
        }

        if (d.AndersonDarling.IsApplicable)
        {
            Add("ad_a2", d.AndersonDarling.A2);
            Add("ad_astar", d.AndersonDarling.AStar);
            Add("ad_p", d.AndersonDarling.P);
        }

        Add("skewness", d.Moments.Skewness);
        Add("excess_kurtosis", d.Moments.ExcessKurtosis);
        if (d.Outliers.IsApplicable)
        {
            Add("max_abs_rstudent", d.Outliers.MaxAbsStudentized);
            Add("outlier_p", d.Outliers.P);
        }

        Add("max_leverage", PointDiagnostics.MaxFinite(d.Points.Leverage));
        Add("max_cooks_distance", PointDiagnostics.MaxFinite(d.Points.CooksDistance));
        if (d.Merit is { } m)
        {
            Add("fso", m.FullScaleOutput, outputUnit);
            Add("nonlinearity_terminal_pct", m.NonlinearityTerminalPct, "%");
            Add("nonlinearity_ls_pct", m.NonlinearityLeastSquaresPct, "%");
            Add("nonlinearity_minimax_pct", m.NonlinearityMinimaxPct, "%");
            Add("hysteresis_pct", m.HysteresisPct, "%");
            Add("nonrepeatability_pct", m.NonrepeatabilityPct, "%");
            Add("zero_error_pct", m.ZeroErrorPct, "%");
            Add("span_error_pct", m.SpanErrorPct, "%");
            Add("max_error_pct", m.MaxErrorPct, "%");
            Add("llf", m.LowerLimitFactor, outputUnit);
        }
    }
}
