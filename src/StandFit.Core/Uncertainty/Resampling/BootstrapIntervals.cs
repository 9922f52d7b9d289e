using MathNet.Numerics.Distributions;

namespace StandFit.Core.Uncertainty.Resampling;

/// <summary>An interval [Low, High] from resampling.</summary>
public readonly record struct ResampledInterval(double Low, double High);

/// <summary>
/// What B bootstrap replicates of one figure say: mean, bias and standard error, and the
/// percentile, basic and BCa intervals at a central coverage. Intervals that cannot be formed (too
/// few replicates, every replicate on one side of the estimate for BCa) are null.
/// </summary>
/// <param name="Estimate">theta_hat on the original data.</param>
/// <param name="Mean">Mean of the successful replicates.</param>
/// <param name="Bias">Mean - Estimate.</param>
/// <param name="StandardError">Standard deviation of the replicates (divisor B - 1).</param>
/// <param name="Z0">Bias-correction constant Phi^-1(#{theta* &lt; theta_hat} / B).</param>
/// <param name="Acceleration">BCa acceleration (from the delete-one jackknife), NaN when unknown.</param>
/// <param name="Coverage">The central coverage of the intervals, e.g. 0.95.</param>
/// <param name="Resamples">Successful replicates.</param>
/// <param name="Percentile">The percentile interval.</param>
/// <param name="Basic">The basic interval, 2 theta_hat minus the percentile ends.</param>
/// <param name="Bca">The BCa interval (null when z0 is infinite or the acceleration unknown).</param>
public sealed record BootstrapSummary(
    double Estimate,
    double Mean,
    double Bias,
    double StandardError,
    double Z0,
    double Acceleration,
    double Coverage,
    int Resamples,
    ResampledInterval? Percentile,
    ResampledInterval? Basic,
    ResampledInterval? Bca);

/// <summary>
/// Bootstrap intervals as Davison and Hinkley (1997, section 5.2-5.3) define them and R's boot
/// package computes them (<c>boot.ci</c> types "perc", "basic" and "bca"): the alpha quantile of B
/// replicates is the (B + 1) alpha-th order statistic, interpolated on the normal-quantile scale
/// between neighbours when (B + 1) alpha is not a whole number (boot's <c>norm.inter</c>). BCa
/// (Efron 1987; Efron and Tibshirani 1993, chapter 14) moves the tail levels to
/// Phi(z0 + (z0 + z_alpha) / (1 - a (z0 + z_alpha))).
/// </summary>
public static class BootstrapIntervals
{
    /// <summary>Summarises the replicates (reordered in place) of a figure with estimate <paramref name="estimate"/>.</summary>
    /// <param name="replicates">The successful replicates; this method permutes them (selection).</param>
    /// <param name="estimate">theta_hat.</param>
    /// <param name="coverage">Central coverage in (0, 1).</param>
    /// <param name="acceleration">The BCa acceleration, or NaN to leave BCa out.</param>
    public static BootstrapSummary Summarise(Span<double> replicates, double estimate, double coverage, double acceleration)
    {
        if (!(coverage is > 0 and < 1))
        {
            throw new ArgumentOutOfRangeException(nameof(coverage), coverage, "A coverage lies strictly between 0 and 1.");
        }

        var b = replicates.Length;
        if (b < 2)
        {
            return new BootstrapSummary(estimate, double.NaN, double.NaN, double.NaN, double.NaN, acceleration, coverage, b, null, null, null);
        }

        double mean = 0;
        var below = 0;
        foreach (var t in replicates)
        {
            mean += t;
            if (t < estimate)
            {
                below++;
            }
        }

        mean /= b;
        double ss = 0;
        foreach (var t in replicates)
        {
            var d = t - mean;
            ss += d * d;
        }

        var se = Math.Sqrt(ss / (b - 1));
        var lowTail = (1 - coverage) / 2;
        var highTail = (1 + coverage) / 2;
        var z0 = Normal.InvCDF(0, 1, (double)below / b);
        double bcaLow = double.NaN, bcaHigh = double.NaN;
        if (double.IsFinite(z0) && double.IsFinite(acceleration))
        {
            bcaLow = BcaLevel(z0, acceleration, Normal.InvCDF(0, 1, lowTail));
            bcaHigh = BcaLevel(z0, acceleration, Normal.InvCDF(0, 1, highTail));
        }

        var withBca = bcaLow is > 0 and < 1 && bcaHigh is > 0 and < 1;

        // Only the tails are ever read: put the order statistics every quantile needs in place
        // (two selections and two small sorts instead of a selection per order statistic).
        var lowest = Math.Max(Needed(b, lowTail), withBca ? Needed(b, bcaLow) : 0);
        var highest = Math.Min(Needed(b, highTail) - 2, withBca ? Needed(b, bcaHigh) - 2 : int.MaxValue);
        SortTails(replicates, Math.Min(lowest, b), Math.Max(highest, 0));
        var p = new ResampledInterval(QuantileOfSorted(replicates, lowTail), QuantileOfSorted(replicates, highTail));
        var basic = new ResampledInterval((2 * estimate) - p.High, (2 * estimate) - p.Low);
        ResampledInterval? bca = withBca ? new ResampledInterval(QuantileOfSorted(replicates, bcaLow), QuantileOfSorted(replicates, bcaHigh)) : null;

        return new BootstrapSummary(estimate, mean, mean - estimate, se, z0, acceleration, coverage, b, p, basic, bca);
    }

    /// <summary>The number of smallest order statistics the alpha quantile reads: k + 1 with k = floor((B + 1) alpha), within 1..B.</summary>
    private static int Needed(int b, double alpha) => Math.Clamp((int)Math.Truncate((b + 1) * alpha) + 1, 1, b);

    /// <summary>
    /// Puts the <paramref name="low"/> smallest values, sorted, at the front and the values from
    /// position <paramref name="high"/> (0-based) on, sorted, at the back; the middle stays unordered.
    /// Falls back to a full sort when the tails meet.
    /// </summary>
    private static void SortTails(Span<double> values, int low, int high)
    {
        if (low >= high)
        {
            values.Sort();
            return;
        }

        OrderStatistics.Select(values, low);
        values[..low].Sort();
        var upper = values[low..];
        OrderStatistics.Select(upper, high - low + 1);
        upper[(high - low)..].Sort();
    }

    /// <summary>The quantile of <see cref="Quantile"/>, reading order statistics by position from values whose tails are in sorted place.</summary>
    private static double QuantileOfSorted(ReadOnlySpan<double> values, double alpha)
    {
        var r = values.Length;
        var rk = (r + 1) * alpha;
        var k = (int)Math.Truncate(rk);
        if (k <= 0)
        {
            return values[0];
        }

        if (k >= r)
        {
            return values[r - 1];
        }

        var tk = values[k - 1];
        if (k == rk)
        {
            return tk;
        }

        var tk1 = values[k];
        var z = Normal.InvCDF(0, 1, alpha);
        var zk = Normal.InvCDF(0, 1, (double)k / (r + 1));
        var zk1 = Normal.InvCDF(0, 1, (double)(k + 1) / (r + 1));
        return tk + ((z - zk) / (zk1 - zk) * (tk1 - tk));
    }

    /// <summary>The BCa tail level Phi(z0 + (z0 + z) / (1 - a (z0 + z))) for the normal quantile z of a tail.</summary>
    public static double BcaLevel(double z0, double acceleration, double z)
    {
        var s = z0 + z;
        return Normal.CDF(0, 1, z0 + (s / (1 - (acceleration * s))));
    }

    /// <summary>
    /// The <paramref name="alpha"/> quantile of the values, as boot's <c>norm.inter</c>: k = floor((B + 1) alpha);
    /// the k-th order statistic when (B + 1) alpha = k; the first or last when k is 0 or B; otherwise
    /// t_(k) + (z_alpha - z_k) / (z_(k+1) - z_k) (t_(k+1) - t_(k)) with z_j = Phi^-1(j / (B + 1)).
    /// <paramref name="values"/> is permuted (selection), never copied.
    /// </summary>
    public static double Quantile(Span<double> values, double alpha)
    {
        var r = values.Length;
        ArgumentOutOfRangeException.ThrowIfLessThan(r, 1, nameof(values));
        var rk = (r + 1) * alpha;
        var k = (int)Math.Truncate(rk);
        if (k <= 0)
        {
            return OrderStatistics.Select(values, 1);
        }

        if (k >= r)
        {
            return OrderStatistics.Select(values, r);
        }

        var tk = OrderStatistics.Select(values, k);
        if (k == rk)
        {
            return tk;
        }

        var tk1 = OrderStatistics.Select(values, k + 1);
        var z = Normal.InvCDF(0, 1, alpha);
        var zk = Normal.InvCDF(0, 1, (double)k / (r + 1));
        var zk1 = Normal.InvCDF(0, 1, (double)(k + 1) / (r + 1));
        return tk + ((z - zk) / (zk1 - zk) * (tk1 - tk));
    }
}

/// <summary>Order statistics by selection (Hoare's quickselect with a median-of-three pivot): O(B), no allocation.</summary>
public static class OrderStatistics
{
    /// <summary>The <paramref name="k"/>-th smallest value (1-based) of <paramref name="values"/>, which is permuted.</summary>
    public static double Select(Span<double> values, int k)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(k, 1);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(k, values.Length);
        var target = k - 1;
        int lo = 0, hi = values.Length - 1;
        while (hi > lo)
        {
            var mid = lo + ((hi - lo) / 2);
            if (values[mid] < values[lo])
            {
                (values[mid], values[lo]) = (values[lo], values[mid]);
            }

            if (values[hi] < values[lo])
            {
                (values[hi], values[lo]) = (values[lo], values[hi]);
            }

            if (values[hi] < values[mid])
            {
                (values[hi], values[mid]) = (values[mid], values[hi]);
            }

            var pivot = values[mid];
            int i = lo, j = hi;
            while (i <= j)
            {
                while (values[i] < pivot)
                {
                    i++;
                }

                while (values[j] > pivot)
                {
                    j--;
                }

                if (i <= j)
                {
                    (values[i], values[j]) = (values[j], values[i]);
                    i++;
                    j--;
                }
            }

            if (target <= j)
            {
                hi = j;
            }
            else if (target >= i)
            {
                lo = i;
            }
            else
            {
                return values[target];
            }
        }

        return values[target];
    }
}
