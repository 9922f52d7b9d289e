using StandFit.Core.Problems;

namespace StandFit.Core.Judging;

/// <summary>Where an interval lies against a figure's limits.</summary>
public enum LimitZone
{
    Within,
    Above,
    Below,
    Straddles,
}

/// <summary>
/// Guarded acceptance with the confidence interval as the guard band (ILAC-G8:09/2019 non-binary
/// statement; JCGM 106:2012 guarded acceptance): the whole interval inside the limits is a pass,
/// wholly outside is a fail, an interval that contains a limit is undecided and ruled retest.
/// An interval that only touches a limit is inside (limits are inclusive).
/// </summary>
public static class GuardedAcceptance
{
    public static LimitZone Zone(double low, double high, FigureLimit limit)
    {
        if (low > high)
        {
            throw new ArgumentException("An interval's low end must not be above its high end.");
        }

        if (limit.Max is { } max && low > max)
        {
            return LimitZone.Above;
        }

        if (limit.Min is { } min && high < min)
        {
            return LimitZone.Below;
        }

        if ((limit.Max is { } upper && high > upper) || (limit.Min is { } lower && low < lower))
        {
            return LimitZone.Straddles;
        }

        return LimitZone.Within;
    }

    /// <summary>The finding for a figure's interval: code, ruling effect and a sentence with the numbers.</summary>
    public static Finding Judge(FigureLimit limit, double low, double high, string unit)
    {
        var zone = Zone(low, high, limit);
        var (template, relation) = zone switch
        {
            LimitZone.Above => (ReasonCodes.LimitAbove, "above"),
            LimitZone.Below => (ReasonCodes.LimitBelow, "below"),
            LimitZone.Straddles => (ReasonCodes.LimitStraddles, "straddles"),
            _ => (ReasonCodes.LimitWithin, "within"),
        };
        return new Finding(
            ReasonCodes.ForFigure(template, limit.Figure),
            template.Kind,
            Messages.LimitFinding(limit.Figure, unit, low, high, relation, limit.Min, limit.Max));
    }
}
