using System.Collections.Immutable;
using MathNet.Numerics;
using MathNet.Numerics.Distributions;
using StandFit.Core.Ingest;

namespace StandFit.Core.Diagnostics;

/// <summary>How a runs-test p-value was computed.</summary>
public enum RunsMethod
{
    /// <summary>No sign of one kind, or fewer than three signs in all: the test does not apply.</summary>
    NotApplicable,

    /// <summary>The exact distribution of the number of runs given n+ and n-.</summary>
    Exact,

    /// <summary>The normal approximation with the Wald-Wolfowitz mean and variance.</summary>
    Normal,
}

/// <summary>
/// Wald-Wolfowitz runs test outcome. <see cref="Z"/> = (R - E) / sqrt(Var) is always reported;
/// <see cref="P"/> is two-sided, from <see cref="Method"/>.
/// </summary>
public sealed record RunsTestResult(int Runs, int Positive, int Negative, double Expected, double Variance, double Z, double P, RunsMethod Method)
{
    public bool IsApplicable => Method != RunsMethod.NotApplicable;

    /// <summary>
    /// The two-sided mid-p value (Lancaster 1961), the p-value the runs gates judge: for the exact
    /// method, twice the smaller of P(R &lt; r) + P(R = r) / 2 and P(R &gt; r) + P(R = r) / 2; for the
    /// normal approximation, which is continuous, <see cref="P"/> itself.
    /// </summary>
    public double MidP { get; init; } = P;
}

/// <summary>
/// The runs test on each leg of a sweep on its own (each leg's residuals in acquisition order), and
/// the legs combined: <see cref="P"/> is Šidák's adjustment of the smallest leg p-value,
/// 1 - (1 - min p)^k over the k legs where the test applies (exact for independent legs, and never
/// below the smallest p). Not applicable when it applies to no leg.
/// </summary>
public sealed record PerLegRunsResult(ImmutableArray<Leg> Legs, ImmutableArray<RunsTestResult> Results, double MinP, double P, int Applicable)
{
    public bool IsApplicable => Applicable > 0;

    public static PerLegRunsResult NotApplicable { get; } = new([], [], double.NaN, double.NaN, 0);

    /// <summary>
    /// The stratified test within legs (<see cref="RunsTest.Stratified"/>): the legs' run counts
    /// summed; its mid-p is what the per-leg runs gate judges.
    /// </summary>
    public RunsTestResult WithinLegs { get; init; } = new(0, 0, 0, double.NaN, double.NaN, double.NaN, 1.0, RunsMethod.NotApplicable);

    /// <summary>The test on one leg, or null when the sweep has no such leg.</summary>
    public RunsTestResult? Of(Leg leg)
    {
        var i = Legs.IndexOf(leg);
        return i < 0 ? null : Results[i];
    }

    /// <summary>Šidák's adjustment of the smallest of <paramref name="k"/> p-values: 1 - (1 - p)^k, computed without cancellation.</summary>
    public static double Sidak(double minP, int k)
    {
        if (minP >= 1)
        {
            return 1.0;
        }

        // log(1 - p) and 1 - exp(q) by their series where the direct forms would cancel (terms past
        // the third are below 1e-16 relative for |x| < 1e-4).
        var log = minP < 1e-4 ? -minP * (1 + (minP * ((1.0 / 2) + (minP / 3)))) : Math.Log(1 - minP);
        var q = k * log;
        var adjusted = q > -1e-4 ? -q * (1 + (q * ((1.0 / 2) + (q / 6)))) : 1 - Math.Exp(q);
        return Math.Min(1.0, adjusted);
    }
}

/// <summary>
/// The runs test on the signs of values (residuals) taken in a given order. Zero values carry no
/// sign and are left out (common practice). With n+ and n- both at most
/// <see cref="ExactLimit"/> the p-value is exact; above, the normal approximation is used.
/// </summary>
public static class RunsTest
{
    /// <summary>Largest count of either sign for which the exact distribution is used.</summary>
    public const int ExactLimit = 30;

    /// <summary>Runs test of <paramref name="values"/> in the order <paramref name="order"/> (indices into values).</summary>
    public static RunsTestResult Compute(ReadOnlySpan<double> values, ReadOnlySpan<int> order)
    {
        int positive = 0, negative = 0, runs = 0, lastSign = 0;
        foreach (var index in order)
        {
            var v = values[index];
            var sign = v > 0 ? 1 : v < 0 ? -1 : 0;
            if (sign == 0)
            {
                continue;
            }

            if (sign > 0)
            {
                positive++;
            }
            else
            {
                negative++;
            }

            if (sign != lastSign)
            {
                runs++;
                lastSign = sign;
            }
        }

        return FromCounts(runs, positive, negative);
    }

    /// <summary>The runs test of each leg of <paramref name="values"/> (one leg label per value; see <see cref="ResidualOrders.Legs"/>) and the legs combined.</summary>
    public static PerLegRunsResult PerLeg(ReadOnlySpan<double> values, ReadOnlySpan<Leg> legs)
    {
        var segments = ResidualOrders.Legs(legs);
        var names = ImmutableArray.CreateBuilder<Leg>(segments.Length);
        var results = ImmutableArray.CreateBuilder<RunsTestResult>(segments.Length);
        var minP = 1.0;
        var applicable = 0;
        foreach (var segment in segments)
        {
            var result = Compute(values, segment);
            names.Add(legs[segment[0]]);
            results.Add(result);
            if (result.IsApplicable)
            {
                applicable++;
                minP = Math.Min(minP, result.P);
            }
        }

        var all = results.MoveToImmutable();
        return applicable == 0
            ? new PerLegRunsResult(names.MoveToImmutable(), all, double.NaN, double.NaN, 0)
            : new PerLegRunsResult(names.MoveToImmutable(), all, minP, PerLegRunsResult.Sidak(minP, applicable), applicable)
            {
                WithinLegs = Stratified(all.AsSpan()),
            };
    }

    /// <summary>The test from the counts: <paramref name="runs"/> runs among n1 + n2 signs.</summary>
    public static RunsTestResult FromCounts(int runs, int n1, int n2)
    {
        var n = (double)(n1 + n2);
        if (n1 < 1 || n2 < 1 || n < 3)
        {
            return new RunsTestResult(runs, n1, n2, double.NaN, double.NaN, double.NaN, 1.0, RunsMethod.NotApplicable);
        }

        var expected = (2.0 * n1 * n2 / n) + 1.0;
        var variance = 2.0 * n1 * n2 * ((2.0 * n1 * n2) - n1 - n2) / (n * n * (n - 1));
        var z = variance > 0 ? (runs - expected) / Math.Sqrt(variance) : 0.0;
        if (n1 <= ExactLimit && n2 <= ExactLimit)
        {
            var (exact, mid) = ExactTwoSided(runs, n1, n2);
            return new RunsTestResult(runs, n1, n2, expected, variance, z, exact, RunsMethod.Exact) { MidP = mid };
        }

        var p = 2.0 * Normal.CDF(0, 1, -Math.Abs(z));
        return new RunsTestResult(runs, n1, n2, expected, variance, z, Math.Min(1.0, p), RunsMethod.Normal);
    }

    /// <summary>P(R = r) for n1 and n2 signs in random order.</summary>
    public static double Probability(int r, int n1, int n2)
    {
        if (r < 2)
        {
            return 0;
        }

        var logTotal = LogBinomial(n1 + n2, n1);
        if (r % 2 == 0)
        {
            var k = r / 2;
            return 2.0 * Math.Exp(LogBinomial(n1 - 1, k - 1) + LogBinomial(n2 - 1, k - 1) - logTotal);
        }
        else
        {
            var k = (r - 1) / 2;
            return Math.Exp(LogBinomial(n1 - 1, k) + LogBinomial(n2 - 1, k - 1) - logTotal)
                 + Math.Exp(LogBinomial(n1 - 1, k - 1) + LogBinomial(n2 - 1, k) - logTotal);
        }
    }

    /// <summary>
    /// The exact two-sided p-value and mid-p of <paramref name="runs"/> runs among n1 + n2 signs
    /// (<see cref="TwoSided"/>), from the distribution of <see cref="Distribution"/>.
    /// </summary>
    private static (double P, double MidP) ExactTwoSided(int runs, int n1, int n2)
    {
        Span<double> probabilities = stackalloc double[n1 + n2 + 1];
        Distribution(n1, n2, probabilities);
        return TwoSided(probabilities, runs);
    }

    /// <summary>
    /// Of the distribution P(T = t) = <paramref name="probabilities"/>[t]: twice the smaller tail at
    /// <paramref name="observed"/>, at most 1; and the two-sided mid-p, twice the smaller of the
    /// tails with half the observed value's probability each (the two add to 1, so it is at most 1).
    /// </summary>
    private static (double P, double MidP) TwoSided(ReadOnlySpan<double> probabilities, int observed)
    {
        double lower = 0, upper = 0;
        for (var t = 0; t < probabilities.Length; t++)
        {
            var pr = probabilities[t];
            if (t <= observed)
            {
                lower += pr;
            }

            if (t >= observed)
            {
                upper += pr;
            }
        }

        // The mid-p's tails without the observed value's probability, which each takes half of.
        double below = 0, above = 0;
        for (var t = 0; t < observed; t++)
        {
            below += probabilities[t];
        }

        for (var t = probabilities.Length - 1; t > observed; t--)
        {
            above += probabilities[t];
        }

        return (Math.Min(1.0, 2.0 * Math.Min(lower, upper)), MidP(below, probabilities[observed], above));
    }

    private static double MidP(double below, double here, double above) =>
        Math.Min(1.0, 2.0 * Math.Min(below + (0.5 * here), above + (0.5 * here)));

    /// <summary>
    /// The stratified runs test over the legs where the test applies: T, the sum of the legs' run
    /// counts, against its distribution when each leg's signs are in random order given its own sign
    /// counts and the legs are independent. With every leg's counts at most <see cref="ExactLimit"/>
    /// the distribution is exact, the convolution of the legs' distributions (Swed and Eisenhart
    /// 1943), with the exact two-sided p (twice the smaller tail) and the two-sided mid-p (Lancaster
    /// 1961); otherwise the normal approximation with the summed Wald-Wolfowitz means and variances
    /// (common practice). <see cref="RunsTestResult.Runs"/>, <see cref="RunsTestResult.Positive"/>,
    /// <see cref="RunsTestResult.Negative"/>, <see cref="RunsTestResult.Expected"/> and
    /// <see cref="RunsTestResult.Variance"/> are the legs' sums. Not applicable when no leg is.
    /// </summary>
    public static RunsTestResult Stratified(ReadOnlySpan<RunsTestResult> legs)
    {
        int runs = 0, positive = 0, negative = 0, top = 0;
        double expected = 0, variance = 0;
        var exact = true;
        var applicable = 0;
        foreach (var leg in legs)
        {
            if (!leg.IsApplicable)
            {
                continue;
            }

            applicable++;
            runs += leg.Runs;
            positive += leg.Positive;
            negative += leg.Negative;
            expected += leg.Expected;
            variance += leg.Variance;
            top += leg.Positive + leg.Negative;
            exact &= leg.Method == RunsMethod.Exact;
        }

        if (applicable == 0)
        {
            return new RunsTestResult(runs, positive, negative, double.NaN, double.NaN, double.NaN, 1.0, RunsMethod.NotApplicable);
        }

        var z = variance > 0 ? (runs - expected) / Math.Sqrt(variance) : 0.0;
        if (!exact)
        {
            var normal = Math.Min(1.0, 2.0 * Normal.CDF(0, 1, -Math.Abs(z)));
            return new RunsTestResult(runs, positive, negative, expected, variance, z, normal, RunsMethod.Normal);
        }

        // P(T = t), t = 0 .. top, leg by leg; an exact leg has at most 2 ExactLimit signs.
        Span<double> one = stackalloc double[(2 * ExactLimit) + 1];
        Span<double> sum = top < 256 ? stackalloc double[top + 1] : new double[top + 1];
        Span<double> next = top < 256 ? stackalloc double[top + 1] : new double[top + 1];
        sum.Clear();
        sum[0] = 1.0;
        var reach = 0;
        foreach (var leg in legs)
        {
            if (!leg.IsApplicable)
            {
                continue;
            }

            var size = leg.Positive + leg.Negative;
            var distribution = one[..(size + 1)];
            Distribution(leg.Positive, leg.Negative, distribution);
            next[..(reach + size + 1)].Clear();
            for (var a = 0; a <= reach; a++)
            {
                var weight = sum[a];
                if (weight == 0)
                {
                    continue;
                }

                for (var r = 2; r <= size; r++)
                {
                    next[a + r] += weight * distribution[r];
                }
            }

            reach += size;
            next[..(reach + 1)].CopyTo(sum);
        }

        var (p, mid) = TwoSided(sum[..(reach + 1)], runs);
        return new RunsTestResult(runs, positive, negative, expected, variance, z, p, RunsMethod.Exact) { MidP = mid };
    }

    /// <summary>
    /// P(R = r) for r = 0 .. n1 + n2 into <paramref name="probabilities"/> (n1 + n2 + 1 values, 0
    /// where r is impossible), for 1 &lt;= n1, n2 &lt;= <see cref="ExactLimit"/>: the even counts
    /// 2 C(n1 - 1, k - 1) C(n2 - 1, k - 1) and the odd C(n1 - 1, k) C(n2 - 1, k - 1) + C(n1 - 1, k - 1)
    /// C(n2 - 1, k) over C(n1 + n2, n1) (Swed and Eisenhart 1943, Ann. Math. Statist. 14: 66-87).
    /// </summary>
    internal static void Distribution(int n1, int n2, Span<double> probabilities)
    {
        var maxRuns = n1 == n2 ? 2 * n1 : (2 * Math.Min(n1, n2)) + 1;
        var top = Math.Max(n1, n2);
        Span<double> a = stackalloc double[top + 1]; // a[k] = C(n1 - 1, k)
        Span<double> b = stackalloc double[top + 1]; // b[k] = C(n2 - 1, k)
        a[0] = b[0] = 1;
        for (var k = 0; k < top; k++)
        {
            a[k + 1] = a[k] * (n1 - 1 - k) / (k + 1);
            b[k + 1] = b[k] * (n2 - 1 - k) / (k + 1);
        }

        // C(n1 + n2, n1) as a product of ratios.
        var total = 1.0;
        for (var i = 1; i <= n1; i++)
        {
            total = total * (n2 + i) / i;
        }

        probabilities.Clear();
        for (var r = 2; r <= maxRuns; r++)
        {
            var k = r / 2;
            double ways;
            if (r % 2 == 0)
            {
                ways = 2 * a[k - 1] * b[k - 1];
            }
            else
            {
                // a[k] = C(n1 - 1, k) is 0 once k > n1 - 1: the recurrence reaches 0 exactly there.
                ways = (a[k] * b[k - 1]) + (a[k - 1] * b[k]);
            }

            probabilities[r] = ways / total;
        }
    }

    private static double LogBinomial(int n, int k) =>
        k < 0 || k > n ? double.NegativeInfinity : SpecialFunctions.BinomialLn(n, k);
}
