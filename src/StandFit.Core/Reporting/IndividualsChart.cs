using System.Collections.Immutable;

namespace StandFit.Core.Reporting;

/// <summary>The patterns an individuals chart flags.</summary>
public enum ChartRule
{
    /// <summary>A point above the upper or below the lower control limit.</summary>
    BeyondLimits,

    /// <summary>A run of <see cref="IndividualsChart.RunLength"/> or more points in a row on one side of the centre line.</summary>
    RunOnOneSide,

    /// <summary>A trend of <see cref="IndividualsChart.TrendLength"/> or more points in a row, each higher (or each lower) than the one before.</summary>
    Trend,
}

/// <summary>One flagged pattern: its rule and the points it spans (0-based, inclusive).</summary>
public sealed record ChartSignal(ChartRule Rule, int First, int Last)
{
    public int Length => Last - First + 1;
}

/// <summary>
/// An individuals chart (X chart of an individuals and moving-range chart, ISO 7870-2): the values
/// in order, the centre line at their mean, and control limits at mean ± 2.66 · MR̄, where MR̄ is the
/// mean of the moving ranges |x_i − x_(i−1)| (2.66 ≈ 3 / d2, d2 = 1.128 for ranges of two). Three
/// patterns are flagged: a point beyond a limit (strictly outside); a run of 8 or more points in a
/// row strictly on one side of the centre line (a point on the line ends a run); a trend of 6 or
/// more points in a row each strictly higher, or each strictly lower, than the one before (an equal
/// value ends a trend). A run or a trend is reported once, over its whole length. The limits are
/// computed from the same values they judge (a retrospective chart of the period).
/// </summary>
public sealed record IndividualsChart(
    ImmutableArray<double> Values,
    double Centre,
    double MeanMovingRange,
    double Lower,
    double Upper,
    ImmutableArray<ChartSignal> Signals)
{
    /// <summary>3 / d2 for moving ranges of two points, as the standard's tables round it.</summary>
    public const double E2 = 2.66;

    /// <summary>D4 for ranges of two points: the moving-range chart's upper limit is D4 · MR̄.</summary>
    public const double UpperMovingRangeFactor = 3.267;

    public const int RunLength = 8;

    public const int TrendLength = 6;

    /// <summary>The moving-range chart's upper limit D4 · MR̄ (its lower limit is 0).</summary>
    public double MovingRangeUpper => UpperMovingRangeFactor * MeanMovingRange;

    /// <summary>The chart of <paramref name="values"/>; null when there are fewer than two (no moving range) or a value is not finite.</summary>
    public static IndividualsChart? Compute(ReadOnlySpan<double> values)
    {
        var n = values.Length;
        if (n < 2)
        {
            return null;
        }

        var sum = 0.0;
        var ranges = 0.0;
        for (var i = 0; i < n; i++)
        {
            if (!double.IsFinite(values[i]))
            {
                return null;
            }

            sum += values[i];
            if (i > 0)
            {
                ranges += Math.Abs(values[i] - values[i - 1]);
            }
        }

        var centre = sum / n;
        var mr = ranges / (n - 1);
        var lower = centre - (E2 * mr);
        var upper = centre + (E2 * mr);
        var signals = ImmutableArray.CreateBuilder<ChartSignal>();
        for (var i = 0; i < n; i++)
        {
            if (values[i] > upper || values[i] < lower)
            {
                signals.Add(new ChartSignal(ChartRule.BeyondLimits, i, i));
            }
        }

        // Runs on one side of the centre line.
        var start = 0;
        for (var i = 1; i <= n; i++)
        {
            if (i == n || Side(values[i], centre) != Side(values[start], centre) || Side(values[i], centre) == 0)
            {
                if (Side(values[start], centre) != 0 && i - start >= RunLength)
                {
                    signals.Add(new ChartSignal(ChartRule.RunOnOneSide, start, i - 1));
                }

                start = i;
            }
        }

        // Trends: maximal stretches of strict rises (or strict falls) covering TrendLength points or more.
        start = 0;
        var direction = 0;
        for (var i = 1; i <= n; i++)
        {
            var step = i == n ? 0 : Math.Sign(values[i] - values[i - 1]);
            if (i < n && step != 0 && (direction == 0 || step == direction))
            {
                direction = step;
                continue;
            }

            if (direction != 0 && i - start >= TrendLength)
            {
                signals.Add(new ChartSignal(ChartRule.Trend, start, i - 1));
            }

            // A change of direction starts the new trend at the turning point; a tie starts it at this point.
            start = step == 0 ? i : i - 1;
            direction = step;
        }

        var ordered = signals.OrderBy(s => s.First).ThenBy(s => s.Rule).ToImmutableArray();
        return new IndividualsChart(values.ToImmutableArray(), centre, mr, lower, upper, ordered);
    }

    /// <summary>Whether point <paramref name="index"/> is part of any flagged pattern.</summary>
    public bool IsFlagged(int index) => Signals.Any(s => s.First <= index && index <= s.Last);

    private static int Side(double value, double centre) => Math.Sign(value - centre);
}
