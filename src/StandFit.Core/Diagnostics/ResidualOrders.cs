using StandFit.Core.Ingest;

namespace StandFit.Core.Diagnostics;

/// <summary>
/// Orders in which residuals are examined: by stimulus (curvature shows as runs of one sign), by
/// acquisition (drift and autocorrelation in time; a sweep's points are held in acquisition order,
/// so this is index order), and per leg (the points of one approach direction, in acquisition order).
/// </summary>
public static class ResidualOrders
{
    /// <summary>Acquisition order: 0, 1, ..., n - 1 (a sweep holds its points in the order they were taken).</summary>
    public static int[] ByAcquisition(int count)
    {
        var order = new int[count];
        for (var i = 0; i < count; i++)
        {
            order[i] = i;
        }

        return order;
    }

    /// <summary>The indices of the points of one leg, in acquisition order (empty when the leg is absent).</summary>
    public static int[] OfLeg(ReadOnlySpan<Leg> legs, Leg leg)
    {
        var count = 0;
        foreach (var l in legs)
        {
            count += l == leg ? 1 : 0;
        }

        var order = new int[count];
        var k = 0;
        for (var i = 0; i < legs.Length; i++)
        {
            if (legs[i] == leg)
            {
                order[k++] = i;
            }
        }

        return order;
    }

    /// <summary>
    /// The legs of a sweep, each its points' indices in acquisition order: the up leg, then the down
    /// leg, then points without a leg label; legs without points are left out. A sweep without leg
    /// labels is one leg, its acquisition order.
    /// </summary>
    public static int[][] Legs(ReadOnlySpan<Leg> legs)
    {
        var result = new List<int[]>(3);
        foreach (var leg in (ReadOnlySpan<Leg>)[Leg.Up, Leg.Down, Leg.Unknown])
        {
            var indices = OfLeg(legs, leg);
            if (indices.Length > 0)
            {
                result.Add(indices);
            }
        }

        return [.. result];
    }

    /// <summary>Point indices sorted by stimulus; ties keep acquisition order (a stable sort).</summary>
    public static int[] ByStimulus(ReadOnlySpan<double> stimulus)
    {
        var keyed = new Keyed[stimulus.Length];
        for (var i = 0; i < keyed.Length; i++)
        {
            keyed[i] = new Keyed(stimulus[i], i);
        }

        // The index breaks ties, so the unstable sort gives the stable order.
        Array.Sort(keyed);
        var order = new int[keyed.Length];
        for (var i = 0; i < order.Length; i++)
        {
            order[i] = keyed[i].Index;
        }

        return order;
    }

    private readonly record struct Keyed(double Value, int Index) : IComparable<Keyed>
    {
        public int CompareTo(Keyed other)
        {
            var c = Value.CompareTo(other.Value);
            return c != 0 ? c : Index.CompareTo(other.Index);
        }
    }
}

/// <summary>The order in which a gate takes the residuals (<c>gates.runs_test.order</c>, <c>gates.durbin_watson.order</c>).</summary>
public enum ResidualOrder
{
    /// <summary>Sorted by stimulus, ties in acquisition order: curvature shows as runs of one sign.</summary>
    Stimulus,

    /// <summary>The order the points were taken: drift and autocorrelation in time.</summary>
    Acquisition,

    /// <summary>Each leg (approach direction) on its own, in acquisition order; the legs' results combined (docs/diagnostics.md).</summary>
    PerLeg,
}

/// <summary>The names of <see cref="ResidualOrder"/> as recipes and outputs write them.</summary>
public static class ResidualOrderNames
{
    public const string Stimulus = "stimulus";
    public const string Acquisition = "acquisition";
    public const string PerLeg = "per-leg";

    public static string Name(ResidualOrder order) => order switch
    {
        ResidualOrder.Stimulus => Stimulus,
        ResidualOrder.Acquisition => Acquisition,
        _ => PerLeg,
    };

    public static ResidualOrder? Parse(string text) => text switch
    {
        Stimulus => ResidualOrder.Stimulus,
        Acquisition => ResidualOrder.Acquisition,
        PerLeg => ResidualOrder.PerLeg,
        _ => null,
    };
}
