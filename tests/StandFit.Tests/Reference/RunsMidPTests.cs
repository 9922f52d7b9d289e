using System.Globalization;
using System.Numerics;
using StandFit.Core.Diagnostics;

namespace StandFit.Tests.Reference;

/// <summary>
/// The runs test's two-sided mid-p (Lancaster 1961, J. Amer. Statist. Assoc. 56: 223-234: P(T more
/// extreme) + P(T = t) / 2) and the stratified test within legs, against hand-computed small cases
/// and against a count of every arrangement of the signs (the distribution of the number of runs is
/// Swed and Eisenhart's 1943, Ann. Math. Statist. 14: 66-87; the counts here need no formula).
/// The two-sided mid-p is taken as twice the smaller one-sided mid-p, as the exact p is twice the
/// smaller tail (docs/diagnostics.md).
/// </summary>
public sealed class RunsMidPTests
{
    [Fact]
    public void Three_plus_and_three_minus_signs_give_the_hand_computed_exact_p_and_mid_p()
    {
        // The 20 arrangements of +++--- by their runs (written out by hand): 2 runs: 2 (+++---,
        // ---+++); 3: 4; 4: 8; 5: 4; 6: 2. R = 2: exact p = 2 * 2/20 = 0.2, mid-p = 2 * (0 + 1/20) = 0.1.
        // R = 3: exact 2 * 6/20 = 0.6, mid-p 2 * (2/20 + 2/20) = 0.4. R = 4 (the middle): both 1.
        var two = RunsTest.FromCounts(2, 3, 3);
        var three = RunsTest.FromCounts(3, 3, 3);
        var four = RunsTest.FromCounts(4, 3, 3);
        var six = RunsTest.FromCounts(6, 3, 3);

        Assert.Equal(0.2, two.P, 15);
        Assert.Equal(0.1, two.MidP, 15);
        Assert.Equal(0.6, three.P, 15);
        Assert.Equal(0.4, three.MidP, 15);
        Assert.Equal(1.0, four.P, 15);
        Assert.Equal(1.0, four.MidP, 15);
        Assert.Equal(0.1, six.MidP, 15); // the upper tail mirrors the lower for n1 = n2
    }

    [Theory]
    [InlineData(3, 3)]
    [InlineData(5, 4)]
    [InlineData(4, 7)]
    [InlineData(6, 5)]
    [InlineData(10, 10)]
    [InlineData(1, 5)]
    public void Every_mid_p_matches_a_count_of_all_arrangements(int n1, int n2)
    {
        var counts = CountArrangementsByRuns(n1, n2);
        double total = counts.Sum();
        for (var r = 2; r <= n1 + n2; r++)
        {
            if (counts[r] == 0)
            {
                continue;
            }

            double below = counts.Take(r).Sum(), here = counts[r], above = counts.Skip(r + 1).Sum();
            var expected = Math.Min(1.0, 2 * Math.Min(below + (here / 2), above + (here / 2)) / total);
            var result = RunsTest.FromCounts(r, n1, n2);
            Assert.Equal(RunsMethod.Exact, result.Method);
            Assert.True(
                Math.Abs(result.MidP - expected) <= 1e-13,
                string.Create(CultureInfo.InvariantCulture, $"n1 {n1}, n2 {n2}, R = {r}: mid-p {result.MidP:R}, counted {expected:R}"));

            // Where the exact p is below 1 the mid-p is it less P(R = r) (both are twice a tail).
            if (result.P < 1)
            {
                Assert.True(Math.Abs(result.P - result.MidP - (here / total)) <= 1e-13, $"R = {r}: P - mid-p = P(R = r)");
            }
        }
    }

    [Fact]
    public void Under_the_normal_approximation_the_mid_p_is_the_p_value()
    {
        var result = RunsTest.FromCounts(35, 40, 31);

        Assert.Equal(RunsMethod.Normal, result.Method);
        Assert.Equal(result.P, result.MidP);
    }

    [Fact]
    public void The_stratified_test_of_two_small_legs_gives_the_hand_computed_distribution()
    {
        // Leg 1, 2+ and 2-: ++-- --++ (2 runs), +--+ -++- (3), +-+- -+-+ (4): 1/3 each.
        // Leg 2, 2+ and 1-: ++- -++ (2 runs), +-+ (3): 2/3 and 1/3.
        // T = R1 + R2: P(4) = 4/18, P(5) = 6/18, P(6) = 6/18, P(7) = 2/18.
        // T = 4: exact p = 2 * 4/18, mid-p = 2 * (2/18). T = 5: exact 1, mid-p = 2 * (4/18 + 3/18) = 14/18.
        // T = 7: exact 2 * 2/18, mid-p 2 * 1/18.
        var atFour = RunsTest.Stratified([RunsTest.FromCounts(2, 2, 2), RunsTest.FromCounts(2, 2, 1)]);
        var atFive = RunsTest.Stratified([RunsTest.FromCounts(3, 2, 2), RunsTest.FromCounts(2, 2, 1)]);
        var atSeven = RunsTest.Stratified([RunsTest.FromCounts(4, 2, 2), RunsTest.FromCounts(3, 2, 1)]);

        Assert.Equal(4, atFour.Runs);
        Assert.Equal((4, 3), (atFour.Positive, atFour.Negative));
        Assert.Equal(RunsMethod.Exact, atFour.Method);
        Assert.Equal(8.0 / 18, atFour.P, 14);
        Assert.Equal(4.0 / 18, atFour.MidP, 14);
        Assert.Equal(1.0, atFive.P, 14);
        Assert.Equal(14.0 / 18, atFive.MidP, 14);
        Assert.Equal(4.0 / 18, atSeven.P, 14);
        Assert.Equal(2.0 / 18, atSeven.MidP, 14);
        Assert.Equal(RunsTest.FromCounts(2, 2, 2).Expected + RunsTest.FromCounts(2, 2, 1).Expected, atFour.Expected, 14);
    }

    [Fact]
    public void The_stratified_test_matches_a_count_of_every_pair_of_arrangements()
    {
        // Legs of 4+/3- and 3+/3-: every pair of arrangements (35 x 20) counted by its summed runs.
        var first = CountArrangementsByRuns(4, 3);
        var second = CountArrangementsByRuns(3, 3);
        var sum = new long[first.Length + second.Length];
        for (var a = 0; a < first.Length; a++)
        {
            for (var b = 0; b < second.Length; b++)
            {
                sum[a + b] += first[a] * second[b];
            }
        }

        double total = sum.Sum();
        for (var r1 = 2; r1 <= 7; r1++)
        {
            for (var r2 = 2; r2 <= 6; r2++)
            {
                if (first[r1] == 0 || second[r2] == 0)
                {
                    continue;
                }

                var t = r1 + r2;
                double below = sum.Take(t).Sum(), here = sum[t], above = sum.Skip(t + 1).Sum();
                var result = RunsTest.Stratified([RunsTest.FromCounts(r1, 4, 3), RunsTest.FromCounts(r2, 3, 3)]);
                Assert.True(Math.Abs(result.P - Math.Min(1.0, 2 * Math.Min(below + here, above + here) / total)) <= 1e-13, $"T = {t}: exact p");
                Assert.True(Math.Abs(result.MidP - Math.Min(1.0, 2 * Math.Min(below + (here / 2), above + (here / 2)) / total)) <= 1e-13, $"T = {t}: mid-p");
            }
        }
    }

    [Fact]
    public void The_stratified_test_of_one_leg_is_that_legs_test_and_of_none_does_not_apply()
    {
        var leg = RunsTest.FromCounts(4, 6, 5);
        var oneSign = RunsTest.FromCounts(1, 4, 0);

        var one = RunsTest.Stratified([leg, oneSign]);

        Assert.Equal(leg.P, one.P, 14);
        Assert.Equal(leg.MidP, one.MidP, 14);
        Assert.False(RunsTest.Stratified([oneSign]).IsApplicable);
    }

    [Fact]
    public void A_leg_past_the_exact_limit_makes_the_stratified_test_normal()
    {
        var result = RunsTest.Stratified([RunsTest.FromCounts(30, 31, 30), RunsTest.FromCounts(5, 5, 5)]);

        Assert.Equal(RunsMethod.Normal, result.Method);
        Assert.Equal(result.P, result.MidP);
        Assert.Equal(2 * StandFit.Core.Diagnostics.Probability.NormalCdf(-Math.Abs(result.Z)), result.P, 12);
    }

    /// <summary>Arrangements of n1 plus and n2 minus signs counted by their number of runs (index 0 to n1 + n2 + 1), every n-bit word with n1 bits set visited once.</summary>
    private static long[] CountArrangementsByRuns(int n1, int n2)
    {
        var n = n1 + n2;
        var counts = new long[n + 2];
        var pairs = (1L << (n - 1)) - 1;
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
}
