using StandFit.Core.Judging;
using StandFit.Core.Problems;

namespace StandFit.Tests.Judging;

public sealed class GuardedAcceptanceTests
{
    private const double Min = 0.1990;
    private const double Max = 0.2010;

    private static readonly FigureLimit Gain = new("gain", Min, Max);
    private static readonly FigureLimit UpperOnly = new("c2", null, 1.0);
    private static readonly FigureLimit LowerOnly = new("offset", -1.0, null);

    [Fact]
    public void An_interval_wholly_inside_the_limits_is_within()
    {
        Assert.Equal(LimitZone.Within, GuardedAcceptance.Zone(0.1995, 0.2005, Gain));
    }

    [Fact]
    public void An_interval_whose_high_end_touches_the_upper_limit_exactly_is_within_because_limits_are_inclusive()
    {
        Assert.Equal(LimitZone.Within, GuardedAcceptance.Zone(0.2000, Max, Gain));
    }

    [Fact]
    public void An_interval_whose_low_end_touches_the_lower_limit_exactly_is_within()
    {
        Assert.Equal(LimitZone.Within, GuardedAcceptance.Zone(Min, 0.2000, Gain));
    }

    [Fact]
    public void An_interval_spanning_exactly_from_limit_to_limit_is_within()
    {
        Assert.Equal(LimitZone.Within, GuardedAcceptance.Zone(Min, Max, Gain));
    }

    [Fact]
    public void An_interval_whose_low_end_sits_on_the_upper_limit_contains_that_limit_and_straddles()
    {
        // "Touching is inside" is about touching from the inside. An interval [max, max + d] holds
        // the conforming value max and values above it, so it contains the limit: undecided.
        Assert.Equal(LimitZone.Straddles, GuardedAcceptance.Zone(Max, 0.2015, Gain));
    }

    [Fact]
    public void An_interval_whose_high_end_sits_on_the_lower_limit_contains_that_limit_and_straddles()
    {
        Assert.Equal(LimitZone.Straddles, GuardedAcceptance.Zone(0.1985, Min, Gain));
    }

    [Fact]
    public void An_interval_with_its_low_end_just_above_the_upper_limit_is_above()
    {
        Assert.Equal(LimitZone.Above, GuardedAcceptance.Zone(Math.BitIncrement(Max), 0.2015, Gain));
    }

    [Fact]
    public void An_interval_with_its_high_end_just_below_the_lower_limit_is_below()
    {
        Assert.Equal(LimitZone.Below, GuardedAcceptance.Zone(0.1985, Math.BitDecrement(Min), Gain));
    }

    [Fact]
    public void An_interval_with_its_high_end_just_above_the_upper_limit_straddles()
    {
        Assert.Equal(LimitZone.Straddles, GuardedAcceptance.Zone(0.2005, Math.BitIncrement(Max), Gain));
    }

    [Fact]
    public void An_interval_with_its_low_end_just_below_the_lower_limit_straddles()
    {
        Assert.Equal(LimitZone.Straddles, GuardedAcceptance.Zone(Math.BitDecrement(Min), 0.2005, Gain));
    }

    [Theory]
    [InlineData(0.2005, 0.2015)]
    [InlineData(0.1985, 0.1995)]
    [InlineData(0.1980, 0.2020)]
    public void An_interval_containing_a_limit_straddles(double low, double high)
    {
        Assert.Equal(LimitZone.Straddles, GuardedAcceptance.Zone(low, high, Gain));
    }

    [Theory]
    [InlineData(-1e300, 0.5, LimitZone.Within)]
    [InlineData(0.5, 1.0, LimitZone.Within)]
    [InlineData(0.5, 1.5, LimitZone.Straddles)]
    [InlineData(1.0, 1.5, LimitZone.Straddles)]
    [InlineData(1.5, 2.0, LimitZone.Above)]
    public void An_upper_limit_alone_judges_only_the_high_side(double low, double high, LimitZone expected)
    {
        Assert.Equal(expected, GuardedAcceptance.Zone(low, high, UpperOnly));
    }

    [Theory]
    [InlineData(-0.5, 1e300, LimitZone.Within)]
    [InlineData(-1.0, 0.0, LimitZone.Within)]
    [InlineData(-1.5, -0.5, LimitZone.Straddles)]
    [InlineData(-1.5, -1.0, LimitZone.Straddles)]
    [InlineData(-2.0, -1.5, LimitZone.Below)]
    public void A_lower_limit_alone_judges_only_the_low_side(double low, double high, LimitZone expected)
    {
        Assert.Equal(expected, GuardedAcceptance.Zone(low, high, LowerOnly));
    }

    [Theory]
    [InlineData(Max, LimitZone.Within)]
    [InlineData(Min, LimitZone.Within)]
    [InlineData(0.2000, LimitZone.Within)]
    [InlineData(0.2011, LimitZone.Above)]
    [InlineData(0.1989, LimitZone.Below)]
    public void A_zero_width_interval_is_judged_as_a_point_and_a_point_on_a_limit_is_within(double point, LimitZone expected)
    {
        Assert.Equal(expected, GuardedAcceptance.Zone(point, point, Gain));
    }

    [Fact]
    public void A_zero_width_interval_on_a_min_equal_to_max_limit_is_within()
    {
        var exact = new FigureLimit("gain", 0.2, 0.2);

        Assert.Equal(LimitZone.Within, GuardedAcceptance.Zone(0.2, 0.2, exact));
        Assert.Equal(LimitZone.Straddles, GuardedAcceptance.Zone(0.19, 0.21, exact));
    }

    [Fact]
    public void An_interval_with_its_low_end_above_its_high_end_is_a_bug_at_the_caller()
    {
        Assert.Throws<ArgumentException>(() => GuardedAcceptance.Zone(0.2005, 0.2000, Gain));
    }

    [Fact]
    public void A_limit_needs_a_bound_and_min_not_above_max()
    {
        Assert.Throws<ArgumentException>(() => new FigureLimit("gain", null, null));
        Assert.Throws<ArgumentException>(() => new FigureLimit("gain", 0.3, 0.2));
        Assert.Throws<ArgumentException>(() => new FigureLimit(" ", 0.1, 0.2));
    }

    [Fact]
    public void An_interval_above_the_limit_is_a_fail_with_code_gain_above_limit_and_digits_that_tell_it_from_the_limit()
    {
        var finding = GuardedAcceptance.Judge(Gain, 0.20105, 0.20112, "mV/kPa");

        Assert.Equal("gain.above_limit", finding.Code);
        Assert.Equal(ReasonKind.Fail, finding.Kind);
        Assert.Equal("gain CI [0.20105, 0.20112] mV/kPa lies above the upper limit 0.201", finding.Sentence);
    }

    [Fact]
    public void An_interval_just_above_the_limit_is_printed_with_enough_digits_to_differ_from_it()
    {
        var finding = GuardedAcceptance.Judge(Gain, 0.2010001, 0.2010002, "mV/kPa");

        Assert.Equal("gain.above_limit", finding.Code);
        Assert.Contains("[0.2010001, 0.2010002]", finding.Sentence, StringComparison.Ordinal);
        Assert.EndsWith("upper limit 0.201", finding.Sentence, StringComparison.Ordinal);
    }

    [Fact]
    public void An_interval_one_ulp_above_the_limit_is_printed_with_all_the_digits_needed_to_differ_from_it()
    {
        var low = Math.BitIncrement(Max);

        var sentence = GuardedAcceptance.Judge(Gain, low, low, "").Sentence;

        var interval = sentence[(sentence.IndexOf('[', StringComparison.Ordinal) + 1)..sentence.IndexOf(',', StringComparison.Ordinal)];
        var limit = sentence[(sentence.LastIndexOf(' ') + 1)..];
        Assert.NotEqual(limit, interval);
        Assert.Equal(low, double.Parse(interval, System.Globalization.CultureInfo.InvariantCulture));
    }

    [Fact]
    public void An_interval_below_the_limit_is_a_fail_with_code_gain_below_limit()
    {
        var finding = GuardedAcceptance.Judge(Gain, 0.19880, 0.19899, "mV/kPa");

        Assert.Equal("gain.below_limit", finding.Code);
        Assert.Equal(ReasonKind.Fail, finding.Kind);
        Assert.Equal("gain CI [0.1988, 0.19899] mV/kPa lies below the lower limit 0.199", finding.Sentence);
    }

    [Fact]
    public void An_interval_straddling_the_upper_limit_is_a_retest_with_code_gain_straddles_limit()
    {
        var finding = GuardedAcceptance.Judge(Gain, 0.2005, 0.2015, "mV/kPa");

        Assert.Equal("gain.straddles_limit", finding.Code);
        Assert.Equal(ReasonKind.Retest, finding.Kind);
        Assert.Equal("gain CI [0.2005, 0.2015] mV/kPa straddles a limit of [0.199, 0.201]: the measurement cannot decide", finding.Sentence);
    }

    [Fact]
    public void An_interval_straddling_the_upper_limit_closely_prints_its_ends_apart_from_the_limit()
    {
        var finding = GuardedAcceptance.Judge(Gain, 0.2009999, 0.2010001, "mV/kPa");

        Assert.Contains("[0.2009999, 0.2010001]", finding.Sentence, StringComparison.Ordinal);
    }

    [Fact]
    public void An_interval_straddling_the_lower_limit_closely_prints_its_ends_apart_from_the_limit()
    {
        var finding = GuardedAcceptance.Judge(Gain, 0.1989999, 0.1990001, "mV/kPa");

        Assert.Equal("gain.straddles_limit", finding.Code);
        Assert.Contains("[0.1989999, 0.1990001]", finding.Sentence, StringComparison.Ordinal);
    }

    [Fact]
    public void An_interval_inside_the_limits_is_a_pass_with_code_gain_within_limits()
    {
        var finding = GuardedAcceptance.Judge(Gain, 0.1995, 0.2005, "mV/kPa");

        Assert.Equal("gain.within_limits", finding.Code);
        Assert.Equal(ReasonKind.Pass, finding.Kind);
        Assert.Equal("gain CI [0.1995, 0.2005] mV/kPa lies inside the limits [0.199, 0.201]", finding.Sentence);
    }

    [Fact]
    public void A_one_sided_limit_prints_its_open_side_as_an_infinity_and_an_empty_unit_adds_no_space()
    {
        var upper = GuardedAcceptance.Judge(UpperOnly, 0.25, 0.5, "");
        var lower = GuardedAcceptance.Judge(LowerOnly, -0.5, 0.25, "mV");

        Assert.Equal("c2 CI [0.25, 0.5] lies inside the limits [-inf, 1]", upper.Sentence);
        Assert.Equal("offset CI [-0.5, 0.25] mV lies inside the limits [-1, +inf]", lower.Sentence);
        Assert.Equal("c2.within_limits", upper.Code);
    }

    [Fact]
    public void Every_limit_code_is_the_figure_name_followed_by_the_zone()
    {
        Assert.Equal("offset.within_limits", GuardedAcceptance.Judge(LowerOnly, 5, 6, "mV").Code);
        Assert.Equal("offset.below_limit", GuardedAcceptance.Judge(LowerOnly, -3, -2, "mV").Code);
        Assert.Equal("c2.above_limit", GuardedAcceptance.Judge(UpperOnly, 2, 3, "").Code);
        Assert.Equal("c2.straddles_limit", GuardedAcceptance.Judge(UpperOnly, 0, 3, "").Code);
    }
}
