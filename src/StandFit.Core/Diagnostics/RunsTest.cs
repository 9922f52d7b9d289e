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

        return applicable == 0
            ? new PerLegRunsResult(names.MoveToImmutable(), results.MoveToImmutable(), double.NaN, double.NaN, 0)
            : new PerLegRunsResult(names.MoveToImmutable(), results.MoveToImmutable(), minP, PerLegRunsResult.Sidak(minP, applicable), applicable);
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
            return new RunsTestResult(runs, n1, n2, expected, variance, z, ExactTwoSided(runs, n1, n2), RunsMethod.Exact);
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
    /// Two-sided exact p-value: twice the smaller tail, at most 1. The probabilities of
    /// <see cref="Probability"/>, from binomial coefficients by their recurrence C(a, k + 1) =
    /// C(a, k) (a - k) / (k + 1) (exact integers below 2^53 for counts up to <see cref="ExactLimit"/>).
    /// </summary>
    private static double ExactTwoSided(int runs, int n1, int n2)
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

        double lower = 0, upper = 0;
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

            var pr = ways / total;
            if (r <= runs)
            {
                lower += pr;
            }

            if (r >= runs)
            {
                upper += pr;
            }
        }

        return Math.Min(1.0, 2.0 * Math.Min(lower, upper));
    }

    private static double LogBinomial(int n, int k) =>
        k < 0 || k > n ? double.NegativeInfinity : SpecialFunctions.BinomialLn(n, k);
}
