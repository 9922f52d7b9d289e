using System.Collections.Immutable;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;

namespace StandFit.Core.Diagnostics;

/// <summary>
/// The set points of a sweep: points whose stimulus values lie within a tolerance of their neighbour
/// (in stimulus order) belong to one set point. Tolerance 0 groups exactly equal values only.
/// Groups are numbered from 0 in increasing stimulus.
/// </summary>
public sealed record SetPointGrouping(ImmutableArray<int> GroupOf, int Count, double Tolerance)
{
    /// <summary>The number of points in each group.</summary>
    public int[] Sizes()
    {
        var sizes = new int[Count];
        foreach (var g in GroupOf)
        {
            sizes[g]++;
        }

        return sizes;
    }
}

/// <summary>Groups stimulus values into set points.</summary>
public static class SetPoints
{
    /// <summary>
    /// Sorted by stimulus (ties in acquisition order), a point starts a new set point when it lies
    /// more than <paramref name="tolerance"/> above the previous point (single linkage: a chain of
    /// readings each within the tolerance of the next is one set point).
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public static SetPointGrouping Group(ReadOnlySpan<double> stimulus, double tolerance)
    {
        if (!(tolerance >= 0) || double.IsInfinity(tolerance))
        {
            throw new ArgumentOutOfRangeException(nameof(tolerance), tolerance, "A set-point tolerance is zero or more.");
        }

        var order = ResidualOrders.ByStimulus(stimulus);
        var groups = new int[stimulus.Length];
        var id = 0;
        for (var k = 1; k < order.Length; k++)
        {
            if (stimulus[order[k]] - stimulus[order[k - 1]] > tolerance)
            {
                id++;
            }

            groups[order[k]] = id;
        }

        return new SetPointGrouping(ImmutableCollectionsMarshal.AsImmutableArray(groups), stimulus.Length == 0 ? 0 : id + 1, tolerance);
    }
}
