using System.Collections.Immutable;
using StandFit.Core.Diagnostics;

namespace StandFit.Core.Reporting;

/// <summary>
/// The normal curve drawn over a residual histogram: N(mean, sd²) scaled to the histogram's counts,
/// so that the area under the curve over a bin is the count a normal sample of the same size would
/// put in it. With equal bins of width w and n points, the curve's height at x is
/// n · w · φ((x − mean) / sd) / sd.
/// </summary>
public static class NormalCurve
{
    /// <summary>The expected count in each bin [edges[k], edges[k+1]): n · (Φ(b) − Φ(a)) on the standardised ends.</summary>
    public static ImmutableArray<double> ExpectedCounts(ReadOnlySpan<double> edges, int n, double mean, double sd)
    {
        if (edges.Length < 2 || !(sd > 0))
        {
            return [];
        }

        var counts = new double[edges.Length - 1];
        for (var k = 0; k < counts.Length; k++)
        {
            counts[k] = n * (Probability.NormalCdf((edges[k + 1] - mean) / sd) - Probability.NormalCdf((edges[k] - mean) / sd));
        }

        return [.. counts];
    }

    /// <summary>
    /// <paramref name="samples"/> points (x, height) of the scaled curve, evenly spaced from
    /// <paramref name="from"/> to <paramref name="to"/>, for a histogram of n points in bins of
    /// width <paramref name="binWidth"/>. Empty when sd is not above 0.
    /// </summary>
    public static ImmutableArray<(double X, double Y)> Curve(double from, double to, int samples, int n, double binWidth, double mean, double sd)
    {
        if (!(sd > 0) || samples < 2 || !(to > from))
        {
            return [];
        }

        var points = ImmutableArray.CreateBuilder<(double, double)>(samples);
        for (var i = 0; i < samples; i++)
        {
            var x = from + ((to - from) * i / (samples - 1));
            var z = (x - mean) / sd;
            points.Add((x, n * binWidth * Math.Exp(-0.5 * z * z) / (sd * Math.Sqrt(2 * Math.PI))));
        }

        return points.MoveToImmutable();
    }
}
