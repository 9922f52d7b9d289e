using StandFit.Core.Judging;
using StandFit.Core.Uncertainty;

namespace StandFit.Tests.Resampling;

/// <summary>Guarded limits on a resampling interval: the zones of docs/decision-rules.md on [low, high] from resampling.</summary>
public sealed class IntervalLimitTests
{
    private static readonly FigureLimit Limit = new("gain", 0.199, 0.201) { Rule = DecisionRule.Guarded, Interval = IntervalSource.BootstrapBca };

    [Theory]
    [InlineData(0.1995, 0.2005, "gain.within_limits", null)]
    [InlineData(0.199, 0.201, "gain.within_limits", null)]       // touching both limits is inside
    [InlineData(0.1995, 0.2011, "gain.straddles_limit", "pass")] // just over the upper limit
    [InlineData(0.2011, 0.2020, "gain.above_limit", null)]
    [InlineData(0.1980, 0.1989, "gain.below_limit", null)]
    public void A_BCa_guarded_limit_judges_the_resampling_interval(double low, double high, string code, string? conditional)
    {
        var figure = Figure(0.2, low, high);
        var finding = LimitJudge.Judge(Limit, figure, ConfidenceLevel.Default95);
        Assert.Equal(code, finding.Code);
        Assert.Equal(low, finding.Limit!.Low);
        Assert.Equal(high, finding.Limit.High);
        Assert.Equal(conditional, finding.Limit.Conditional);
        Assert.Equal(IntervalSource.BootstrapBca, finding.Limit.Interval);
        Assert.Contains("BCa", finding.Sentence, StringComparison.Ordinal);
    }

    [Fact]
    public void The_expanded_uncertainty_of_an_asymmetric_interval_is_the_larger_side()
    {
        var finding = LimitJudge.Judge(Limit, Figure(0.2, 0.1999, 0.2003), ConfidenceLevel.Default95);
        Assert.Equal(0.0003, finding.Limit!.ExpandedUncertainty, 15);
    }

    [Fact]
    public void A_limit_whose_resampling_interval_is_missing_is_not_evaluated_and_ruled_retest()
    {
        var finding = LimitJudge.Judge(Limit, new FigureValue("gain", 0.2, 1e-5, 19, "mV/kPa"), ConfidenceLevel.Default95);
        Assert.Equal("limit.not_evaluated", finding.Code);
        Assert.Equal(StandFit.Core.Problems.ReasonKind.Retest, finding.Kind);
    }

    [Fact]
    public void A_t_guarded_limit_ignores_resampling_intervals()
    {
        var limit = new FigureLimit("gain", 0.199, 0.201) { Rule = DecisionRule.Guarded };
        var finding = LimitJudge.Judge(limit, Figure(0.2, 0.1, 0.3), ConfidenceLevel.Default95);
        Assert.Equal("gain.within_limits", finding.Code);
        Assert.Equal(IntervalSource.T, finding.Limit!.Interval);
    }

    private static FigureValue Figure(double value, double low, double high) =>
        new("gain", value, 1e-5, 19, "mV/kPa") { Intervals = [new FigureInterval(IntervalSource.BootstrapBca, low, high, "bootstrap BCa, pairs resampling, 1000 resamples, 95 %")] };
}
