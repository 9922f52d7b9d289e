using StandFit.Core.Ingest;
using StandFit.Core.Judging;
using StandFit.Core.Problems;

namespace StandFit.Core.Screening;

/// <summary>
/// The data-quality gates, before any fit. A sweep that fails one is not fitted: the unit is ruled
/// retest (the measurement, not the unit, is in doubt), with every gate's reason.
/// </summary>
public static class SweepScreen
{
    public static IReadOnlyList<Finding> Screen(Sweep sweep, SweepExpectations expect)
    {
        var findings = new List<Finding>();
        var n = sweep.Count;
        if (expect.MinPoints is { } minPoints && n < minPoints)
        {
            findings.Add(Make(ReasonCodes.SweepTooFewPoints, Messages.SweepTooFewPoints(n, minPoints)));
        }

        if (expect.SpanPercent is { } percent && expect.Range is { } range && n > 0)
        {
            var span = sweep.Stimulus.Max() - sweep.Stimulus.Min();
            var covered = 100.0 * span / (range.Max - range.Min);
            if (covered < percent)
            {
                findings.Add(Make(ReasonCodes.SweepSpanShort, Messages.SweepSpanShort(covered, percent, range.Min, range.Max)));
            }
        }

        foreach (var leg in expect.Legs)
        {
            if (!sweep.Legs.Contains(leg))
            {
                findings.Add(Make(ReasonCodes.SweepLegMissing, Messages.SweepLegMissing(leg == Leg.Up ? "up" : "down")));
            }
        }

        if (expect.MonotonicTolerance is { } tolerance && Reversal(sweep, tolerance) is { } reversal)
        {
            findings.Add(Make(ReasonCodes.SweepLegNotMonotonic, Messages.SweepLegNotMonotonic(reversal.Leg == Leg.Up ? "up" : "down", sweep.SourceLines[reversal.Index], reversal.From, reversal.To)));
        }

        if (expect.SaturationRun is { } runLength && n > 0 && SaturatedRun(sweep, runLength) is { } saturated)
        {
            findings.Add(Make(ReasonCodes.SweepOutputSaturated, Messages.SweepOutputSaturated(saturated.Count, saturated.Value)));
        }

        if (expect.RejectDuplicateRows && FirstDuplicate(sweep) is { } duplicate)
        {
            findings.Add(Make(ReasonCodes.SweepDuplicateRows, Messages.SweepDuplicateRows(sweep.SourceLines[duplicate.First], sweep.SourceLines[duplicate.Second])));
        }

        return findings;
    }

    private static (Leg Leg, int Index, double From, double To)? Reversal(Sweep sweep, double tolerance)
    {
        for (var i = 1; i < sweep.Count; i++)
        {
            var leg = sweep.Legs[i];
            if (leg == Leg.Unknown || sweep.Legs[i - 1] != leg)
            {
                continue;
            }

            var step = sweep.Stimulus[i] - sweep.Stimulus[i - 1];
            if ((leg == Leg.Up && step < -tolerance) || (leg == Leg.Down && step > tolerance))
            {
                return (leg, i, sweep.Stimulus[i - 1], sweep.Stimulus[i]);
            }
        }

        return null;
    }

    private static (int Count, double Value)? SaturatedRun(Sweep sweep, int runLength)
    {
        var lowest = sweep.Output.Min();
        var highest = sweep.Output.Max();
        var order = Diagnostics.ResidualOrders.ByStimulus(sweep.Stimulus.AsSpan());
        var run = 1;
        for (var k = 1; k < order.Length; k++)
        {
            var value = sweep.Output[order[k]];
            run = value == sweep.Output[order[k - 1]] ? run + 1 : 1;
            if (run >= runLength && (value == lowest || value == highest))
            {
                return (run, value);
            }
        }

        return null;
    }

    private static (int First, int Second)? FirstDuplicate(Sweep sweep)
    {
        var seen = new Dictionary<(double, double, Leg), int>();
        for (var i = 0; i < sweep.Count; i++)
        {
            var key = (sweep.Stimulus[i], sweep.Output[i], sweep.Legs[i]);
            if (!seen.TryAdd(key, i))
            {
                return (seen[key], i);
            }
        }

        return null;
    }

    private static Finding Make(ReasonCode code, string sentence) => new(code.Code, code.Kind, sentence);
}
