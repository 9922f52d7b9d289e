using StandFit.Core.Reporting;

namespace StandFit.Tests.Reporting;

/// <summary>The report's SVG geometry: number formatting, scales, round ticks, compact paths, the histogram's normal curve, and HTML escaping.</summary>
public sealed class SvgGeometryTests
{
    [Theory]
    [InlineData(12.0, "12")]
    [InlineData(1.25, "1.3")]
    [InlineData(-1.25, "-1.3")]
    [InlineData(0.04, "0")]
    [InlineData(-0.04, "0")]
    [InlineData(123.456, "123.5")]
    [InlineData(1e6, "1000000")]
    public void Coordinates_have_one_decimal_no_trailing_zero_and_never_minus_zero(double value, string expected)
    {
        Assert.Equal(expected, SvgPath.Number(value));
    }

    [Fact]
    public void A_scale_maps_the_domain_ends_to_the_range_ends_even_backwards()
    {
        var y = SvgScale.Of(0, 10, 200, 0);

        Assert.Equal(200, y.Map(0));
        Assert.Equal(0, y.Map(10));
        Assert.Equal(150, y.Map(2.5));
    }

    [Fact]
    public void A_scale_of_one_value_puts_it_in_the_middle()
    {
        Assert.Equal(50, SvgScale.Of(5, 5, 0, 100).Map(5), 12);
        Assert.Equal(50, SvgScale.Of(0, 0, 0, 100).Map(0), 12);
        Assert.Equal(50, SvgScale.Fitting([3.0, double.NaN, 3.0], 0, 100).Map(3), 12);
    }

    [Fact]
    public void A_fitting_scale_pads_the_span_of_the_values()
    {
        var x = SvgScale.Fitting([0.0, 10.0], 0, 1, pad: 0.1);

        Assert.Equal(-1, x.DomainMin, 12);
        Assert.Equal(11, x.DomainMax, 12);
    }

    [Fact]
    public void Ticks_fall_on_one_two_or_five_times_a_power_of_ten()
    {
        var unit = SvgTicks.Of(0, 1, 5);
        Assert.Equal(0.2, unit.Step, 12);
        Assert.Equal([0, 0.2, 0.4, 0.6, 0.8, 1.0], unit.Values.Select(v => Math.Round(v, 12)));

        // A gain axis: 0.19888 to 0.20136 over 5 ticks: rough step 0.000496, so 0.0005, labels to 4 decimals.
        var gain = SvgTicks.Of(0.19888, 0.20136, 5);
        Assert.Equal(0.0005, gain.Step, 15);
        Assert.Equal(["0.1990", "0.1995", "0.2000", "0.2005", "0.2010"], gain.Values.Select(gain.Label));

        var wide = SvgTicks.Of(-3, 251, 6);
        Assert.Equal(50, wide.Step);
        Assert.Equal(["0", "50", "100", "150", "200", "250"], wide.Values.Select(wide.Label));
    }

    [Fact]
    public void Very_small_steps_are_labelled_in_scientific_notation()
    {
        var ticks = SvgTicks.Of(-3e-6, 3e-6, 4);

        Assert.Equal(2.0, ticks.Step * 1e6, 12);
        Assert.Equal("-2E-6", ticks.Label(ticks.Values[0]));
        Assert.Equal("0E+0", ticks.Label(0));
        Assert.Equal("1.5E-6", ticks.Label(1.5e-6));
    }

    [Fact]
    public void An_empty_interval_has_no_ticks()
    {
        Assert.Empty(SvgTicks.Of(1, 1).Values);
        Assert.Empty(SvgTicks.Of(double.NaN, 1).Values);
    }

    [Fact]
    public void A_polyline_uses_one_move_and_implicit_line_tos_and_a_missing_point_breaks_it()
    {
        Assert.Equal("M0 0 1 2.1 3 4", SvgPath.Polyline([(0, 0), (1.04, 2.06), (3, 4)]));
        Assert.Equal("M0 0M2 2 3 3", SvgPath.Polyline([(0, 0), (double.NaN, 1), (2, 2), (3, 3)]));
        Assert.Equal("", SvgPath.Polyline([]));
    }

    [Fact]
    public void Markers_and_bars_are_closed_squares_and_rectangles_in_one_path()
    {
        Assert.Equal("M9 9h2v2h-2zM19 29h2v2h-2z", SvgPath.Squares([(10, 10), (20, 30), (double.NaN, 1)], 2));
        Assert.Equal("M1 2h3v4h-3z", SvgPath.Rectangles([(1, 2, 3, 4), (5, 5, 0, 4)]));
    }

    [Fact]
    public void A_band_runs_along_the_upper_edge_and_back_along_the_lower_one()
    {
        Assert.Equal("M0 1 10 2 10 -2 0 -1Z", SvgPath.Band([(0, -1, 1), (10, -2, 2)]));
        Assert.Equal("", SvgPath.Band([(0, -1, 1)]));
    }

    [Fact]
    public void The_normal_curve_puts_a_normal_samples_share_in_each_bin()
    {
        // Phi(1) − Phi(0) = 0.341344746 (NIST/SEMATECH e-Handbook, normal table): 34.1344746 of 100 points in each of [−1, 0) and [0, 1).
        var counts = NormalCurve.ExpectedCounts([-1, 0, 1], 100, 0, 1);
        Assert.Equal(34.1344746, counts[0], 6);
        Assert.Equal(34.1344746, counts[1], 6);

        // Shifted and scaled: the same shares around mean 5 with SD 2.
        var shifted = NormalCurve.ExpectedCounts([3, 5, 7], 100, 5, 2);
        Assert.Equal(34.1344746, shifted[0], 6);

        Assert.Empty(NormalCurve.ExpectedCounts([0, 1], 10, 0, 0));
    }

    [Fact]
    public void The_curve_peaks_at_n_times_the_bin_width_over_sd_root_two_pi()
    {
        // 100 points in bins of 0.5 with SD 2: height at the mean 100 · 0.5 / (2 √(2π)) = 9.97355701.
        var curve = NormalCurve.Curve(-4, 4, 81, 100, 0.5, 0, 2);

        Assert.Equal(81, curve.Length);
        Assert.Equal(0, curve[40].X, 12);
        Assert.Equal(9.97355701, curve[40].Y, 7);
        Assert.Equal(curve[0].Y, curve[^1].Y, 12);
        Assert.Empty(NormalCurve.Curve(-1, 1, 10, 10, 0.5, 0, 0));
    }

    [Fact]
    public void Html_escaping_turns_markup_quotes_and_ampersands_into_entities()
    {
        Assert.Equal("&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; &amp; &#39;q&#39;", Html.Escape("<script>alert(\"x\")</script> & 'q'"));
        Assert.Equal("KP250-26110-0004", Html.Escape("KP250-26110-0004"));
        Assert.Equal("", Html.Escape(null));
    }

    [Fact]
    public void Html_escaping_replaces_characters_XML_forbids_and_keeps_pairs_outside_the_basic_plane()
    {
        Assert.Equal("a\uFFFDb\tc", Html.Escape("a\u0001b\tc"));
        Assert.Equal("x\uFFFDy", Html.Escape("x\uD800y"));
        Assert.Equal("gauge \U0001F321", Html.Escape("gauge \U0001F321"));
    }
}
