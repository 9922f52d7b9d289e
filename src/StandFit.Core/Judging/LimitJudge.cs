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
}
