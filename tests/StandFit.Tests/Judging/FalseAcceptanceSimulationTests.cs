using System.Collections.Immutable;
using System.Globalization;
using StandFit.Core.Fitting;
using StandFit.Core.Judging;
using StandFit.Core.Uncertainty;
using StandFit.Core.Uncertainty.Resampling;
using StandFit.Tests.Support;

namespace StandFit.Tests.Judging;

/// <summary>
/// The false-acceptance risk of the two decision rules, by simulation through the real pipeline:
/// a KP-250-like unit whose true gain lies on or just beyond the upper tolerance limit is swept over
/// 21 points with Gaussian noise of known size, fitted (LeastSquaresFitter), given its t-based error
/// bar (TIntervals) and judged (LimitJudge). Under ILAC-G8:09/2019, a guard band w = U at 95 % coverage
/// bounds the probability of false acceptance by 2.5 % for a unit on the limit; simple acceptance
/// (w = 0) accepts about half of the units that sit exactly on it.
/// <para>
/// Monte-Carlo tolerance: an observed rate over N independent units has binomial standard error
/// SE = sqrt(p (1 - p) / N). With N = 4,000: SE = 0.0025 at p = 0.025, and 0.0079 at p = 0.5. The
/// generator is seeded (xoshiro256**), so each run draws the same units; the bounds below are still
/// set several SE wide, so that they hold for any seed and not just for this one.
/// </para>
/// </summary>
public sealed class FalseAcceptanceSimulationTests
{
    private const int Units = 4000;
    private const double NominalGain = 0.2000;   // mV/kPa
    private const double Max = 0.2010;           // upper tolerance limit, mV/kPa
    private const double Min = 0.1990;
    private const double TrueOffset = 0.0;       // mV
    private const double NoiseSd = 0.02;         // mV, per point

    private static readonly ConfidenceLevel Level95 = ConfidenceLevel.Of(0.95);

    /// <summary>The KP-250 sweep plan: up 0..250 kPa in 25 kPa steps (11 points), back down to 0 (10 points).</summary>
    private static readonly ImmutableArray<double> Stimulus =
        [.. Enumerable.Range(0, 11).Select(i => 25.0 * i), .. Enumerable.Range(0, 10).Select(i => 225.0 - (25.0 * i))];

    /// <summary>The true standard uncertainty of the fitted gain for this plan: sigma / sqrt(Sxx).</summary>
    private static double GainSigma
    {
        get
        {
            var mean = Stimulus.Average();
            return NoiseSd / Math.Sqrt(Stimulus.Sum(x => (x - mean) * (x - mean)));
        }
    }

    private static readonly FigureLimit SimpleLimit = new("gain", Min, Max) { Rule = DecisionRule.Simple };

    /// <summary>Guarded with the recipe's 95 % level: w = U = t(0.975, 19) u, the t-based interval.</summary>
    private static readonly FigureLimit GuardedLimit = new("gain", Min, Max) { Rule = DecisionRule.Guarded };

    private static readonly FigureLimit GuardedK2Limit = new("gain", Min, Max) { Rule = DecisionRule.Guarded, Guard = GuardBand.WithCoverageFactor(2) };

    /// <summary>The fraction of <see cref="Units"/> simulated units with this true gain that the limit rules within (accepted).</summary>
    private static double AcceptedFraction(double trueGain, FigureLimit limit, ulong seed)
    {
        var random = new Xoshiro256StarStar(seed);
        var accepted = 0;
        var output = new double[Stimulus.Length];
        for (var unit = 0; unit < Units; unit++)
        {
            for (var i = 0; i < Stimulus.Length; i++)
            {
                output[i] = TrueOffset + (trueGain * Stimulus[i]) + (NoiseSd * SimulatedUnits.Gaussian(ref random));
            }

            var fit = LeastSquaresFitter.Fit(Polynomial.StraightLine, Stimulus, [.. output]).Value;
            var gain = TIntervals.Compute(fit, Level95).Single(p => p.Name == "gain");
            var figure = new FigureValue("gain", gain.Estimate, gain.StandardError, fit.DegreesOfFreedom, "mV/kPa");
            if (LimitJudge.Judge(limit, figure, Level95).Limit!.Zone == LimitZone.Within)
            {
                accepted++;
            }
        }

        return accepted / (double)Units;
    }

    private static double BinomialSe(double p) => Math.Sqrt(p * (1 - p) / Units);

    private static string Describe(double observed, double expected) =>
        string.Create(CultureInfo.InvariantCulture, $"observed {observed:P2} of {Units} units, expected {expected:P2} (SE {BinomialSe(expected):P2})");

    [Fact]
    public void The_generators_normal_deviates_have_mean_zero_and_unit_variance()
    {
        var random = new Xoshiro256StarStar(2026);
        var draws = Enumerable.Range(0, 100_000).Select(_ => SimulatedUnits.Gaussian(ref random)).ToArray();
        var mean = draws.Average();
        var variance = draws.Sum(d => (d - mean) * (d - mean)) / (draws.Length - 1);

        // SE of the mean 1/sqrt(N) = 0.0032; SE of the variance sqrt(2/N) = 0.0045.
        Assert.InRange(mean, -0.016, 0.016);
        Assert.InRange(variance, 0.978, 1.022);
        Assert.InRange(draws.Count(d => Math.Abs(d) > 1.959963984540054) / (double)draws.Length, 0.046, 0.054);
    }

    [Fact]
    public void The_simulated_sweep_is_the_21_point_plan_and_its_gain_uncertainty_is_small_against_the_tolerance()
    {
        Assert.Equal(21, Stimulus.Length);
        Assert.Equal(250.0, Stimulus.Max());

        // u(gain) = 0.02 / sqrt(121131) = 5.75e-5 mV/kPa, about 1/17 of the half-tolerance 0.001 mV/kPa.
        Assert.InRange(GainSigma, 5.7e-5, 5.8e-5);
    }

    [Fact]
    public void A_unit_exactly_on_the_upper_limit_is_accepted_in_about_half_the_cases_under_simple_acceptance()
    {
        var observed = AcceptedFraction(Max, SimpleLimit, seed: 1);

        // Expected 50 %; 40 % to 60 % is more than 12 SE (SE = 0.79 %) either side.
        Assert.InRange(observed, 0.40, 0.60);
    }

    [Fact]
    public void A_unit_a_tiny_epsilon_above_the_upper_limit_is_still_accepted_about_half_the_time_under_simple_acceptance()
    {
        var observed = AcceptedFraction(Max + (1e-6 * GainSigma), SimpleLimit, seed: 2);

        Assert.InRange(observed, 0.40, 0.60);
    }

    [Fact]
    public void A_unit_half_a_standard_uncertainty_above_the_limit_is_accepted_in_about_31_percent_under_simple_acceptance()
    {
        // P(estimate <= max) = Phi(-0.5) = 30.85 %.
        const double expected = 0.3085;
        var observed = AcceptedFraction(Max + (0.5 * GainSigma), SimpleLimit, seed: 3);

        Assert.True(Math.Abs(observed - expected) <= 4 * BinomialSe(expected), Describe(observed, expected));
    }

    [Fact]
    public void A_unit_a_tiny_epsilon_above_the_limit_is_accepted_in_at_most_about_2_5_percent_under_guarded_acceptance_at_95_percent()
    {
        // On the limit, the estimate's t-statistic is exactly Student t on 19 df, so P(accept) =
        // P(T <= -t(0.975, 19)) = 2.5 %: the bound of ILAC-G8 is met with equality. The observed rate is
        // then 2.5 % give or take its SE (0.25 %), and at most 2.5 % + 3 SE.
        const double bound = 0.025;
        var observed = AcceptedFraction(Max + (1e-6 * GainSigma), GuardedLimit, seed: 4);

        Assert.True(observed <= bound + (3 * BinomialSe(bound)), Describe(observed, bound));

        // And the guard band is not needlessly wide: the risk at the limit is close to the 2.5 % allowed.
        Assert.True(observed >= bound - (4 * BinomialSe(bound)), Describe(observed, bound));
    }

    [Theory]
    [InlineData(0.5, 5)]
    [InlineData(1.0, 6)]
    [InlineData(2.0, 7)]
    public void A_unit_beyond_the_limit_by_part_of_its_uncertainty_is_accepted_in_at_most_2_5_percent_under_guarded_acceptance(double offsetInU, ulong seed)
    {
        var observed = AcceptedFraction(Max + (offsetInU * GainSigma), GuardedLimit, seed);

        // Expected roughly Phi(-1.96 - offset): 0.5 % at 0.5 u, 0.15 % at 1 u, 0 % at 2 u; all below 2.5 % outright.
        Assert.True(observed <= 0.025, Describe(observed, 0.025));
    }

    [Fact]
    public void The_same_units_beyond_the_limit_are_accepted_far_more_often_under_simple_than_under_guarded_acceptance()
    {
        var trueGain = Max + (0.5 * GainSigma);

        var simple = AcceptedFraction(trueGain, SimpleLimit, seed: 8);
        var guarded = AcceptedFraction(trueGain, GuardedLimit, seed: 8);
        var k2 = AcceptedFraction(trueGain, GuardedK2Limit, seed: 8);

        Assert.True(simple > 10 * guarded, $"simple {simple:P2}, guarded {guarded:P2}");
        Assert.True(k2 <= 0.025, $"guarded with k = 2: {k2:P2}");
    }

    [Fact]
    public void A_good_unit_at_the_nominal_gain_is_accepted_under_both_rules()
    {
        Assert.Equal(1.0, AcceptedFraction(NominalGain, SimpleLimit, seed: 9));
        Assert.Equal(1.0, AcceptedFraction(NominalGain, GuardedLimit, seed: 9));
    }
}
