using System.Globalization;
using System.Numerics;
using StandFit.Core.Diagnostics;

namespace StandFit.Tests.Reference;

/// <summary>
/// The Wald-Wolfowitz runs test against the worked example in shared/notes/trade-reference.md and
/// against a brute-force count of every arrangement of n1 plus and n2 minus signs.
/// </summary>
public sealed class RunsTestWorkedExampleTests
{
    // trade-reference.md, "Runs test (Wald-Wolfowitz)": n1 = 15, n2 = 10, R = 8 gives E = 13.
    [Fact]
    public void The_worked_example_expects_thirteen_runs()
    {
        var result = RunsTest.FromCounts(8, 15, 10);
        Assert.Equal(13.0, result.Expected, 12);
    }

    // trade-reference.md quotes z = -2.15 for the worked example (its source is not named; an online
    // calculator page prints the same). The note's own variance formula gives
    // Var = 2*150*(300 - 25) / (25^2 * 24) = 5.5 exactly and z = (8 - 13) / sqrt(5.5) = -2.1320,
    // so the example is checked against the formula: -2.13 to two decimals, not -2.15.
    [Fact]
    public void The_worked_example_z_follows_from_the_wald_wolfowitz_variance()
    {
        var result = RunsTest.FromCounts(8, 15, 10);
        Assert.Equal(5.5, result.Variance, 12);
        Assert.Equal(-5.0 / Math.Sqrt(5.5), result.Z, 12);
        Assert.Equal(-2.13, Math.Round(result.Z, 2, MidpointRounding.AwayFromZero));
    }

    [Fact]
    public void The_worked_example_p_value_is_exact_and_matches_a_count_of_all_arrangements()
    {
        var result = RunsTest.FromCounts(8, 15, 10);
        var counts = CountArrangementsByRuns(15, 10);
        var total = counts.Sum();
        long lower = 0, upper = 0;
        for (var r = 0; r < counts.Length; r++)
        {
            lower += r <= 8 ? counts[r] : 0;
            upper += r >= 8 ? counts[r] : 0;
        }

        var expected = Math.Min(1.0, 2.0 * Math.Min(lower, upper) / total);
        Assert.Equal(RunsMethod.Exact, result.Method);
        Assert.True(
            Math.Abs(result.P - expected) <= 1e-12 * expected,
            string.Create(CultureInfo.InvariantCulture, $"P = {result.P:R}, counted {expected:R} ({lower} of {total} arrangements with at most 8 runs)"));
    }

    [Theory]
    [InlineData(1, 5)]
    [InlineData(2, 2)]
    [InlineData(5, 4)]
    [InlineData(10, 10)]
    [InlineData(15, 10)]
    [InlineData(30, 1)]
    [InlineData(30, 30)]
    public void The_exact_distribution_of_the_number_of_runs_sums_to_one(int n1, int n2)
    {
        var sum = 0.0;
        for (var r = 0; r <= n1 + n2 + 1; r++)
        {
            sum += RunsTest.Probability(r, n1, n2);
        }

        Assert.True(Math.Abs(sum - 1.0) <= 1e-12, string.Create(CultureInfo.InvariantCulture, $"n1 {n1}, n2 {n2}: sum {sum:R}"));
    }

    [Theory]
    [InlineData(5, 4)]
    [InlineData(4, 4)]
    [InlineData(4, 5)]
    [InlineData(6, 2)]
    [InlineData(1, 3)]
    [InlineData(3, 7)]
    [InlineData(8, 8)]
    public void Every_run_probability_matches_a_count_of_all_arrangements(int n1, int n2)
    {
        var counts = CountArrangementsByRuns(n1, n2);
        var total = counts.Sum();
        Assert.Equal((long)Binomial(n1 + n2, n1), total);
        for (var r = 0; r < counts.Length; r++)
        {
            var counted = (double)counts[r] / total;
            var p = RunsTest.Probability(r, n1, n2);
            Assert.True(
                Math.Abs(p - counted) <= 1e-13,
                string.Create(CultureInfo.InvariantCulture, $"n1 {n1}, n2 {n2}, R = {r}: Probability {p:R}, counted {counts[r]}/{total} = {counted:R}"));
        }
    }

    /// <summary>
    /// Arrangements of n1 plus (bit set) and n2 minus signs, counted by their number of runs (index 0
    /// to n1 + n2 + 1). Every n-bit word with n1 bits set is visited once (Gosper's next-combination).
    /// </summary>
    private static long[] CountArrangementsByRuns(int n1, int n2)
    {
        var n = n1 + n2;
        var counts = new long[n + 2];
        var pairs = (1L << (n - 1)) - 1; // the n - 1 adjacent pairs
        var word = (1L << n1) - 1;
        var end = 1L << n;
        while (word < end)
        {
            counts[1 + BitOperations.PopCount((ulong)((word ^ (word >> 1)) & pairs))]++;
            var lowest = word & -word;
            var ripple = word + lowest;
            word = ripple | (((word ^ ripple) >> 2) / lowest);
        }

        return counts;
    }

    private static double Binomial(int n, int k)
    {
        var result = 1.0;
        for (var i = 1; i <= k; i++)
        {
            result = result * (n - k + i) / i;
        }

        return result;
    }
}
