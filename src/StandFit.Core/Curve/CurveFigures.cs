using System.Collections.Immutable;
using StandFit.Core.Evaluation;
using StandFit.Core.Fitting;
using StandFit.Core.Recipes;
using StandFit.Core.Uncertainty;

namespace StandFit.Core.Curve;

/// <summary>How a derived figure of the curve came out for one unit.</summary>
public enum CurveFigureStatus
{
    /// <summary>The figure and its uncertainty are finite numbers.</summary>
    Ok,

    /// <summary>Inverse prediction: no stimulus in the calibrated range gives the output.</summary>
    OutsideRange,

    /// <summary>Inverse prediction: several stimuli in the calibrated range give the output.</summary>
    NotMonotonic,

    /// <summary>The curve or its uncertainty is not finite there (outside the model's domain).</summary>
    NonFinite,
}

/// <summary>
/// One derived figure of a unit's fitted curve (the recipe's <c>derived</c>), computed once: its
/// value and standard error on df = n - p, the t interval at the recipe's confidence, and for a
/// band the prediction band, for an inverse prediction the slope there and the inverse
/// (Fieller-type) interval, each end null when it does not close inside the calibrated range. A
/// figure whose <see cref="Status"/> is not <see cref="CurveFigureStatus.Ok"/> has no value (NaN)
/// and no limit can use it.
/// </summary>
public sealed record CurveFigure(
    string Name,
    DerivedKind Kind,
    double At,
    CurveFigureStatus Status,
    double Value,
    double StandardError,
    double Low,
    double High,
    double? PredictionLow = null,
    double? PredictionHigh = null,
    double? Slope = null,
    double? IntervalLow = null,
    double? IntervalHigh = null)
{
    public bool IsOk => Status == CurveFigureStatus.Ok;

    /// <summary>t · SE: half the width of the t interval (the confidence band for a value, the Wald interval for an inverse prediction).</summary>
    public double HalfWidth => (High - Low) / 2;

    /// <summary>Half the width of the prediction band of a band figure; null for the other kinds.</summary>
    public double? PredictionHalfWidth => PredictionHigh is { } hi && PredictionLow is { } lo ? (hi - lo) / 2 : null;

    /// <summary>The status as outputs write it: ok, outside-range, not-monotonic, non-finite.</summary>
    public string StatusCode => Status switch
    {
        CurveFigureStatus.Ok => "ok",
        CurveFigureStatus.OutsideRange => "outside-range",
        CurveFigureStatus.NotMonotonic => "not-monotonic",
        _ => "non-finite",
    };
}

/// <summary>
/// The recipe's derived figures of a fitted curve (sensitivity, value, bands, inverse prediction),
/// each a pure function of the fit (<see cref="CurveUse"/>, <see cref="InversePrediction"/>). For a
/// weighted fit the new reading's standard uncertainty comes from the recipe's weight rule at the
/// reading (the fitted value for a band, the given output for an inverse prediction).
/// </summary>
public static class CurveFigures
{
    public static ImmutableArray<CurveFigure> Compute(IFitResult fit, Recipe recipe)
    {
        ArgumentNullException.ThrowIfNull(fit);
        ArgumentNullException.ThrowIfNull(recipe);
        if (recipe.Derived.IsEmpty)
        {
            return [];
        }

        var level = recipe.Confidence;
        var builder = ImmutableArray.CreateBuilder<CurveFigure>(recipe.Derived.Length);
        foreach (var d in recipe.Derived)
        {
            builder.Add(Checked(Compute(fit, recipe, d, level)));
        }

        return builder.MoveToImmutable();
    }

    private static CurveFigure Compute(IFitResult fit, Recipe recipe, DerivedFigure d, ConfidenceLevel level)
    {
        switch (d.Kind)
        {
            case DerivedKind.SensitivityAt:
                {
                    var s = CurveUse.SensitivityAt(fit, [d.At], level);
                    return new CurveFigure(d.Name, d.Kind, d.At, CurveFigureStatus.Ok, s.Value, s.StandardError, s.Low, s.High);
                }

            case DerivedKind.ValueAt:
            case DerivedKind.BandAt:
                {
                    double? u0 = null;
                    if (fit.IsWeighted && d.Kind == DerivedKind.BandAt)
                    {
                        Span<double> gradient = stackalloc double[fit.ParameterCount];
                        u0 = NewReadingUncertainty(recipe, fit.ValueAt([d.At], gradient));
                        if (u0 is null)
                        {
                            return NonFinite(d);
                        }
                    }

                    var band = fit.IsWeighted && d.Kind == DerivedKind.ValueAt
                        ? CurveUse.BandAt(fit, [d.At], level, 1.0)
                        : CurveUse.BandAt(fit, [d.At], level, u0);
                    return d.Kind == DerivedKind.ValueAt
                        ? new CurveFigure(d.Name, d.Kind, d.At, CurveFigureStatus.Ok, band.Fitted, band.MeanStandardError, band.ConfidenceLow, band.ConfidenceHigh)
                        : new CurveFigure(d.Name, d.Kind, d.At, CurveFigureStatus.Ok, band.Fitted, band.MeanStandardError, band.ConfidenceLow, band.ConfidenceHigh, band.PredictionLow, band.PredictionHigh);
                }

            default:
                {
                    double? u0 = null;
                    if (fit.IsWeighted)
                    {
                        u0 = NewReadingUncertainty(recipe, d.At);
                        if (u0 is null)
                        {
                            return NonFinite(d);
                        }
                    }

                    var inverse = InversePrediction.Solve(fit, d.At, level, 1, u0);
                    return inverse.Status switch
                    {
                        InverseStatus.Solved => new CurveFigure(d.Name, d.Kind, d.At, CurveFigureStatus.Ok, inverse.Stimulus, inverse.StandardError, inverse.WaldLow, inverse.WaldHigh, Slope: inverse.Slope, IntervalLow: inverse.IntervalLow, IntervalHigh: inverse.IntervalHigh),
                        InverseStatus.OutsideRange => Missing(d, CurveFigureStatus.OutsideRange),
                        _ => Missing(d, CurveFigureStatus.NotMonotonic),
                    };
                }
        }
    }

    /// <summary>u0 of a new reading from the recipe's weight rule; null when the rule gives none above 0.</summary>
    private static double? NewReadingUncertainty(Recipe recipe, double reading)
    {
        var u = recipe.Weights?.UncertaintyOf(reading);
        return u is { } v && v > 0 && double.IsFinite(v) ? v : null;
    }

    /// <summary>A figure with a value or an uncertainty that is not finite becomes non-finite, never a number to judge.</summary>
    private static CurveFigure Checked(CurveFigure f)
    {
        if (!f.IsOk)
        {
            return f;
        }

        var finite = double.IsFinite(f.Value) && double.IsFinite(f.StandardError) && double.IsFinite(f.Low) && double.IsFinite(f.High)
            && (f.PredictionLow is null || double.IsFinite(f.PredictionLow.Value)) && (f.PredictionHigh is null || double.IsFinite(f.PredictionHigh.Value))
            && (f.Slope is null || double.IsFinite(f.Slope.Value));
        return finite ? f : NonFinite(new DerivedFigure(f.Name, f.Kind, f.At));
    }

    private static CurveFigure NonFinite(DerivedFigure d) => Missing(d, CurveFigureStatus.NonFinite);

    private static CurveFigure Missing(DerivedFigure d, CurveFigureStatus status) =>
        new(d.Name, d.Kind, d.At, status, double.NaN, double.NaN, double.NaN, double.NaN);
}
