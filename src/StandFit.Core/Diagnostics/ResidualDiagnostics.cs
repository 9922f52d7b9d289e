using StandFit.Core.Fitting;
using StandFit.Core.Ingest;
using StandFit.Core.Merit;

namespace StandFit.Core.Diagnostics;

/// <summary>What the diagnostics need beyond the fit: how set points are told apart, and the nominal curve.</summary>
public sealed record DiagnosticsOptions
{
    public static DiagnosticsOptions Default { get; } = new();

    /// <summary>Stimulus values within this of their neighbour are one set point (0: exactly equal values only).</summary>
    public double SetPointTolerance { get; init; }

    /// <summary>The part's nominal transfer curve, for the errors against it; null: those figures are not computed.</summary>
    public NominalLine? Nominal { get; init; }

    /// <summary>
    /// The order a Durbin-Watson gate takes (<c>gates.durbin_watson.order</c>); the acquisition-order
    /// test is always computed, another order's beside it when asked for here.
    /// </summary>
    public ResidualOrder DurbinWatsonOrder { get; init; } = ResidualOrder.Acquisition;

    /// <summary>Orders whose Durbin-Watson test is computed besides that of <see cref="DurbinWatsonOrder"/> (a recipe limit on <c>dw_stimulus</c> or <c>dw_per_leg</c> asks for it).</summary>
    public System.Collections.Immutable.ImmutableArray<ResidualOrder> AlsoDurbinWatson { get; init; } = [];

    /// <summary>True when the Durbin-Watson test in <paramref name="order"/> is computed (acquisition always).</summary>
    public bool ComputesDurbinWatson(ResidualOrder order) =>
        order == ResidualOrder.Acquisition || order == DurbinWatsonOrder || AlsoDurbinWatson.Contains(order);
}

/// <summary>
/// Every residual diagnostic of one fit, computed once: the structure tests (runs in acquisition
/// order, Durbin-Watson, lag-1 autocorrelation, lack of fit, curvature, Breusch-Pagan, Shapiro-Wilk,
/// Anderson-Darling, moments), the per-point figures and the outlier test, the residual histogram,
/// and the figures of merit of the sweep. The runs test in stimulus order is the unit's existing
/// runs test and is not repeated here.
/// </summary>
public sealed record ResidualDiagnostics(
    RunsTestResult RunsByAcquisition,
    DurbinWatsonResult DurbinWatson,
    AutocorrelationResult Autocorrelation,
    SetPointGrouping SetPoints,
    LackOfFitResult LackOfFit,
    CurvatureResult Curvature,
    BreuschPaganResult BreuschPagan,
    ShapiroWilkResult ShapiroWilk,
    AndersonDarlingResult AndersonDarling,
    MomentsResult Moments,
    PointDiagnostics Points,
    OutlierTestResult Outliers,
    ResidualHistogram Histogram,
    FiguresOfMerit? Merit)
{
    /// <summary>The runs test on each leg in acquisition order, and the legs combined (Šidák, and the stratified test the per-leg gate judges).</summary>
    public PerLegRunsResult RunsPerLeg { get; init; } = PerLegRunsResult.NotApplicable;

    /// <summary>Durbin-Watson on the residuals in stimulus order; computed only when <see cref="DiagnosticsOptions.ComputesDurbinWatson"/> says so.</summary>
    public DurbinWatsonResult? DurbinWatsonByStimulus { get; init; }

    /// <summary>Durbin-Watson within legs (<see cref="Diagnostics.DurbinWatson.WithinLegs"/>); computed only when <see cref="DiagnosticsOptions.ComputesDurbinWatson"/> says so.</summary>
    public DurbinWatsonResult? DurbinWatsonPerLeg { get; init; }

    /// <summary>The Durbin-Watson test in <paramref name="order"/> (a bug when that order was not computed).</summary>
    public DurbinWatsonResult DurbinWatsonIn(ResidualOrder order) => order switch
    {
        ResidualOrder.Acquisition => DurbinWatson,
        ResidualOrder.Stimulus => DurbinWatsonByStimulus ?? throw new InvalidOperationException("The stimulus-order Durbin-Watson test was not computed: set DiagnosticsOptions.DurbinWatsonOrder."),
        _ => DurbinWatsonPerLeg ?? throw new InvalidOperationException("The per-leg Durbin-Watson test was not computed: set DiagnosticsOptions.DurbinWatsonOrder."),
    };

    /// <summary>All diagnostics of <paramref name="fit"/>; <paramref name="legs"/> are the sweep's (one per point).</summary>
    public static ResidualDiagnostics Compute(IFitResult fit, ReadOnlySpan<Leg> legs, DiagnosticsOptions options)
    {
        var residuals = fit.WeightedResiduals.AsSpan();
        var design = DesignBasis.Of(fit);
        var acquisition = ResidualOrders.ByAcquisition(fit.Count);
        var groups = Diagnostics.SetPoints.Group(fit.Stimulus.AsSpan(), options.SetPointTolerance);
        var points = Influence.Points(fit);
        return new ResidualDiagnostics(
            RunsTest.Compute(residuals, acquisition),
            Diagnostics.DurbinWatson.Compute(residuals, design, null),
            Diagnostics.Autocorrelation.Lag1(residuals),
            groups,
            Diagnostics.LackOfFit.Compute(fit, groups),
            fit is FitResult linear ? Diagnostics.Curvature.Compute(linear, design) : CurvatureResult.NotApplicable,
            Diagnostics.BreuschPagan.Compute(fit, design),
            Diagnostics.ShapiroWilk.Compute(residuals),
            Diagnostics.AndersonDarling.Compute(residuals),
            MomentsResult.Of(residuals),
            points,
            Influence.OutlierTest(fit, points),
            ResidualHistogram.FreedmanDiaconis(residuals),
            // The figures of merit describe an output against one stimulus: none for a model of several inputs.
            fit.InputCount == 1 ? FiguresOfMerit.Compute(fit.Stimulus.AsSpan(), fit.Output.AsSpan(), legs, groups, fit.ResidualSd, options.Nominal) : null)
        {
            RunsPerLeg = RunsTest.PerLeg(residuals, legs),
            DurbinWatsonByStimulus = options.ComputesDurbinWatson(ResidualOrder.Stimulus)
                ? Diagnostics.DurbinWatson.Compute(residuals, design, ResidualOrders.ByStimulus(fit.Stimulus.AsSpan()))
                : null,
            DurbinWatsonPerLeg = options.ComputesDurbinWatson(ResidualOrder.PerLeg)
                ? Diagnostics.DurbinWatson.WithinLegs(residuals, design, ResidualOrders.Legs(legs))
                : null,
        };
    }
}
