using StandFit.Core.Problems;
using StandFit.Core.Uncertainty;

namespace StandFit.Core.Judging;

/// <summary>Applies a limit's decision rule to a figure and says why, with the numbers.</summary>
public static class LimitJudge
{
    /// <param name="limit">The limit and its rule.</param>
    /// <param name="figure">The figure's value and uncertainty.</param>
    /// <param name="recipeLevel">The recipe's confidence level, for guarded limits without their own guard band.</param>
    public static Finding Judge(FigureLimit limit, FigureValue figure, ConfidenceLevel recipeLevel)
    {
        if (limit.Rule == DecisionRule.Guarded && limit.Interval != IntervalSource.T)
        {
            return JudgeOnInterval(limit, figure);
        }

        double expanded = 0;
        string basis;
        if (limit.Rule == DecisionRule.Guarded)
        {
            if (figure.StandardUncertainty is not { } u)
            {
                throw new ArgumentException($"Figure {figure.Name} has no uncertainty; a guarded limit cannot judge it.", nameof(figure));
            }

            var guard = limit.Guard ?? GuardBand.AtConfidence(recipeLevel);
            expanded = guard.Multiplier(figure.DegreesOfFreedom) * u;
            basis = guard.Kind == GuardKind.CoverageFactor
                ? Messages.GuardByCoverage(guard.Value)
                : Messages.GuardByConfidence(guard.Value, figure.DegreesOfFreedom);
        }
        else
        {
            basis = Messages.SimpleAcceptance();
        }

        var low = figure.Value - expanded;
        var high = figure.Value + expanded;
        var zone = GuardedAcceptance.Zone(low, high, limit);
        string? conditional = null;
        if (zone == LimitZone.Straddles)
        {
            var inside = (limit.Min is not { } min || figure.Value >= min) && (limit.Max is not { } max || figure.Value <= max);
            conditional = inside ? "pass" : "fail";
        }

        var template = zone switch
        {
            LimitZone.Above => ReasonCodes.LimitAbove,
            LimitZone.Below => ReasonCodes.LimitBelow,
            LimitZone.Straddles => ReasonCodes.LimitStraddles,
            _ => ReasonCodes.LimitWithin,
        };
        var result = new LimitResult(figure.Name, figure.Value, expanded, low, high, limit.Min, limit.Max, limit.Rule, zone, conditional);
        return new Finding(ReasonCodes.ForFigure(template, limit.Figure), template.Kind, Messages.LimitDecision(result, figure.Unit, basis)) { Limit = result };
    }

    /// <summary>
    /// A guarded limit on a resampling interval [low, high] (possibly asymmetric about the value): the
    /// zones as for the t interval; U is the larger distance from the value to an end. A figure
    /// without that interval (no resampling, too few successful resamples) cannot be decided.
    /// </summary>
    private static Finding JudgeOnInterval(FigureLimit limit, FigureValue figure)
    {
        var interval = figure.Intervals.FirstOrDefault(i => i.Source == limit.Interval);
        if (interval is null || !double.IsFinite(interval.Low) || !double.IsFinite(interval.High))
        {
            return new Finding(ReasonCodes.LimitNotEvaluated.Code, ReasonCodes.LimitNotEvaluated.Kind, Messages.LimitIntervalMissing(limit.Figure, IntervalSources.Name(limit.Interval)));
        }

        var low = interval.Low;
        var high = interval.High;
        var expanded = Math.Max(Math.Max(figure.Value - low, high - figure.Value), 0);
        var zone = GuardedAcceptance.Zone(low, high, limit);
        string? conditional = null;
        if (zone == LimitZone.Straddles)
        {
            var inside = (limit.Min is not { } min || figure.Value >= min) && (limit.Max is not { } max || figure.Value <= max);
            conditional = inside ? "pass" : "fail";
        }

        var template = zone switch
        {
            LimitZone.Above => ReasonCodes.LimitAbove,
            LimitZone.Below => ReasonCodes.LimitBelow,
            LimitZone.Straddles => ReasonCodes.LimitStraddles,
            _ => ReasonCodes.LimitWithin,
        };
        var result = new LimitResult(figure.Name, figure.Value, expanded, low, high, limit.Min, limit.Max, limit.Rule, zone, conditional) { Interval = limit.Interval };
        return new Finding(ReasonCodes.ForFigure(template, limit.Figure), template.Kind, Messages.LimitDecisionOnInterval(result, figure.Unit, interval.Basis)) { Limit = result };
    }
}
