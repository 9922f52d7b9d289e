using System.Collections.Immutable;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;

namespace StandFit.Core.Diagnostics;

/// <summary>
/// A histogram of the residuals, kept for plots: <see cref="Edges"/> (bins + 1 values, from the
/// smallest to the largest residual) and <see cref="Counts"/>. Bins are [a, b), the last one
/// closed [a, b].
/// </summary>
public sealed record ResidualHistogram(ImmutableArray<double> Edges, ImmutableArray<int> Counts)
{
    /// <summary>More bins than this are not drawn: the width is widened to fit (a very long-tailed sample).</summary>
    public const int MaxBins = 200;

    public static ResidualHistogram Empty { get; } = new([], []);

    /// <summary>
    /// Freedman-Diaconis: bin width 2 IQR n^(-1/3), the IQR from type-7 quantiles (R's default:
    /// the quantile at p is x_(k) + h (x_(k+1) - x_(k)) with k + h = 1 + (n - 1) p, on the sorted
    /// sample); ceiling(range / width) equal bins (at least 1, at most <see cref="MaxBins"/>) from
    /// min to max. A zero IQR gives one bin.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public static ResidualHistogram FreedmanDiaconis(ReadOnlySpan<double> values)
    {
        var n = values.Length;
        if (n == 0)
        {
            return Empty;
        }

        Span<double> sorted = n <= 512 ? stackalloc double[n] : new double[n];
        values.CopyTo(sorted);
        sorted.Sort();
        var iqr = Quantile7(sorted, 0.75) - Quantile7(sorted, 0.25);
        var width = 2 * iqr * Math.Pow(n, -1.0 / 3.0);
        var lo = sorted[0];
        var hi = sorted[n - 1];
        var bins = width > 0 ? (int)Math.Min(MaxBins, Math.Max(1, Math.Ceiling((hi - lo) / width))) : 1;
        var step = (hi - lo) / bins;
        var edges = new double[bins + 1];
        for (var k = 0; k <= bins; k++)
        {
            edges[k] = lo + (k * step);
        }

        edges[bins] = hi;
        var counts = new int[bins];
        var bin = 0;
        foreach (var v in sorted)
        {
            while (bin < bins - 1 && v >= edges[bin + 1])
            {
                bin++;
            }

            counts[bin]++;
        }

        return new ResidualHistogram(ImmutableCollectionsMarshal.AsImmutableArray(edges), ImmutableCollectionsMarshal.AsImmutableArray(counts));
    }

    /// <summary>R's type-7 quantile of a sorted sample: (1 - h) x_lo + h x_hi at index 1 + (n - 1) p.</summary>
    public static double Quantile7(ReadOnlySpan<double> sorted, double probability)
    {
        var index = (sorted.Length - 1) * probability;
        var lo = (int)Math.Floor(index);
        var hi = (int)Math.Ceiling(index);
        var h = index - lo;
        return h == 0 || sorted[hi] == sorted[lo] ? sorted[lo] : ((1 - h) * sorted[lo]) + (h * sorted[hi]);
    }
}
