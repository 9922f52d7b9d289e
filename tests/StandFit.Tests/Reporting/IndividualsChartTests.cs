using StandFit.Core.Reporting;

namespace StandFit.Tests.Reporting;

/// <summary>
/// The individuals chart's centre, moving range and limits, and its three pattern rules, on a
/// published worked example and on hand-made sequences whose answers are worked out by hand in the
/// comments.
/// </summary>
public sealed class IndividualsChartTests
{
    /// <summary>
    /// NIST/SEMATECH e-Handbook of Statistical Methods, "Individuals Control Charts" (section 6.3.1.2,
    /// page pmc312 in the stored copy), example: "A new process was studied in order to monitor
    /// flowrate. The first 10 batches resulted in" a table, and "On both charts the process is in
    /// control". The table and the parameters are images in the stored copy: the values below are
    /// the handbook's as remembered (not confirmed against the image), and they check themselves: the
    /// mean 50.81 and mean moving range 1.8778 remembered with them follow from them exactly. The
    /// limits 55.80 and 45.82 (from 3 / 1.128) are remembered too, and are hand-computed below.
    /// </summary>
    private static readonly double[] Flowrate = [49.6, 47.6, 49.9, 51.3, 47.8, 51.2, 52.6, 52.4, 53.6, 52.1];

    [Fact]
    public void The_handbook_flow_rate_example_gives_the_handbooks_centre_moving_range_and_limits()
    {
        var chart = IndividualsChart.Compute(Flowrate)!;

        // By hand: sum 508.1, mean 50.81; moving ranges 2.0 2.3 1.4 3.5 3.4 1.4 0.2 1.2 1.5, sum 16.9, mean 16.9 / 9.
        Assert.Equal(50.81, chart.Centre, 12);
        Assert.Equal(16.9 / 9, chart.MeanMovingRange, 12);
        Assert.Equal(1.8778, chart.MeanMovingRange, 4);

        // 50.81 ± 2.66 · 1.877778 = 50.81 ± 4.994889: 55.804889 and 45.815111 (the handbook rounds them to 55.80 and 45.82).
        Assert.Equal(55.804889, chart.Upper, 6);
        Assert.Equal(45.815111, chart.Lower, 6);
        Assert.Equal(55.80, Math.Round(chart.Upper, 2));
        Assert.Equal(45.82, Math.Round(chart.Lower, 2));

        // The moving-range chart's limit 3.267 · 1.877778 = 6.1347 (the handbook's 6.13).
        Assert.Equal(6.13, Math.Round(chart.MovingRangeUpper, 2));

        // "On both charts the process is in control": no point beyond the limits; no run of 8 or trend of 6 either.
        Assert.Empty(chart.Signals);
    }

    [Fact]
    public void A_point_beyond_the_upper_limit_is_flagged_and_no_other()
    {
        // Mean 127 / 10 = 12.7; moving ranges 3 (eight times) and 15: mean 39 / 9; UCL 12.7 + 2.66 · 4.3333 = 24.226667.
        // The points zigzag about the centre: no run, no trend; only the last point, 25, is beyond.
        var chart = IndividualsChart.Compute([10, 13, 10, 13, 10, 13, 10, 13, 10, 25])!;

        Assert.Equal(24.226667, chart.Upper, 5);
        Assert.Equal(1.173333, chart.Lower, 5);
        var signal = Assert.Single(chart.Signals);
        Assert.Equal(new ChartSignal(ChartRule.BeyondLimits, 9, 9), signal);
        Assert.True(chart.IsFlagged(9));
        Assert.False(chart.IsFlagged(8));
    }

    [Fact]
    public void Eight_points_in_a_row_on_each_side_of_the_centre_make_two_runs()
    {
        // Mean exactly 0; moving ranges 1 (fourteen times) and 3: mean 17 / 15, limits ±3.015: nothing beyond; no trend (it zigzags).
        var chart = IndividualsChart.Compute([1, 2, 1, 2, 1, 2, 1, 2, -1, -2, -1, -2, -1, -2, -1, -2])!;

        Assert.Equal(0, chart.Centre);
        Assert.Equal(
            [new ChartSignal(ChartRule.RunOnOneSide, 0, 7), new ChartSignal(ChartRule.RunOnOneSide, 8, 15)],
            chart.Signals.ToArray());
    }

    [Fact]
    public void Seven_points_in_a_row_on_one_side_are_not_a_run()
    {
        var chart = IndividualsChart.Compute([1, 2, 1, 2, 1, 2, 1, -1, -2, -1, -2, -1, -2, -1])!;

        Assert.Equal(0, chart.Centre);
        Assert.Empty(chart.Signals);
    }

    [Fact]
    public void A_point_on_the_centre_line_ends_a_run()
    {
        // Sum 12 − 12 = 0, so the centre is exactly 0 and the fifth point lies on it: above, 4 and 4 points (no run); below, 8 (a run).
        var chart = IndividualsChart.Compute([1, 2, 1, 2, 0, 2, 1, 2, 1, -1, -2, -1, -2, -1, -2, -1, -2])!;

        Assert.Equal(0, chart.Centre);
        Assert.Equal([new ChartSignal(ChartRule.RunOnOneSide, 9, 16)], chart.Signals.ToArray());
    }

    [Fact]
    public void Six_points_each_higher_than_the_one_before_make_a_trend()
    {
        // 1 2 3 4 5 6 rise (points 1 to 6); 3 → 1 and 6 → 2 fall. Mean 3.25, moving ranges 2 1 1 1 1 1 4: mean 11 / 7, limits 3.25 ± 4.18.
        var chart = IndividualsChart.Compute([3, 1, 2, 3, 4, 5, 6, 2])!;

        Assert.Equal([new ChartSignal(ChartRule.Trend, 1, 6)], chart.Signals.ToArray());
    }

    [Fact]
    public void Six_points_each_lower_than_the_one_before_make_a_trend_too()
    {
        var chart = IndividualsChart.Compute([2, 6, 5, 4, 3, 2, 1, 3])!;

        Assert.Equal([new ChartSignal(ChartRule.Trend, 1, 6)], chart.Signals.ToArray());
    }

    [Fact]
    public void Five_rising_points_are_not_a_trend()
    {
        var chart = IndividualsChart.Compute([3, 1, 2, 3, 4, 5, 2])!;

        Assert.DoesNotContain(chart.Signals, s => s.Rule == ChartRule.Trend);
    }

    [Fact]
    public void An_equal_value_ends_a_trend()
    {
        // 1 2 3 then 3 4 5 6 7: three rising points, a tie, then five; seven without the tie would be a trend.
        var chart = IndividualsChart.Compute([1, 2, 3, 3, 4, 5, 6, 7])!;
        var without = IndividualsChart.Compute([1, 2, 3, 4, 5, 6, 7, 8])!;

        Assert.DoesNotContain(chart.Signals, s => s.Rule == ChartRule.Trend);
        Assert.Contains(new ChartSignal(ChartRule.Trend, 0, 7), without.Signals);
    }

    [Fact]
    public void Fewer_than_two_values_or_a_value_that_is_not_finite_give_no_chart()
    {
        Assert.Null(IndividualsChart.Compute([]));
        Assert.Null(IndividualsChart.Compute([1.0]));
        Assert.Null(IndividualsChart.Compute([1.0, double.NaN, 2.0]));
    }

    [Fact]
    public void Equal_values_give_limits_on_the_centre_and_no_flag()
    {
        var chart = IndividualsChart.Compute([5.0, 5.0, 5.0, 5.0, 5.0, 5.0, 5.0, 5.0, 5.0])!;

        Assert.Equal(5.0, chart.Centre);
        Assert.Equal(0.0, chart.MeanMovingRange);
        Assert.Equal(5.0, chart.Upper);
        Assert.Empty(chart.Signals);
    }
}
