namespace StandFit.Core.Diagnostics;

/// <summary>Orders in which residuals are examined.</summary>
public static class ResidualOrders
{
    /// <summary>Point indices sorted by stimulus; ties keep acquisition order (a stable sort).</summary>
    public static int[] ByStimulus(ReadOnlySpan<double> stimulus)
    {
        var order = new int[stimulus.Length];
        for (var i = 0; i < order.Length; i++)
        {
            order[i] = i;
        }

        var keys = stimulus.ToArray();
        Array.Sort(order, (a, b) => keys[a] != keys[b] ? keys[a].CompareTo(keys[b]) : a.CompareTo(b));
        return order;
    }
}
