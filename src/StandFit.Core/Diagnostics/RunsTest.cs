using MathNet.Numerics;
using MathNet.Numerics.Distributions;

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
