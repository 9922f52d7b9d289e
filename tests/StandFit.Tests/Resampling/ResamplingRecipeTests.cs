using StandFit.Core.Evaluation;
using StandFit.Core.Ingest;
using StandFit.Core.Judging;
using StandFit.Core.Uncertainty.Resampling;
using StandFit.Edges.Outputs;
using StandFit.Edges.RecipeFiles;
using StandFit.Tests.Support;

namespace StandFit.Tests.Resampling;

/// <summary>The resampling keys of the recipe language, read and refused, and a unit judged on a BCa guard end to end in the core.</summary>
public sealed class ResamplingRecipeTests
{
    private const string Head = """
        recipe: KP-250 resampled
        version: "1"
        parts: [KP-250]
        columns:
          stimulus: pressure_kPa
          output: output_mV
          leg: leg
        units:
          stimulus: kPa
          output: mV
        model:
          type: straight-line
        confidence: 0.95

        """;

    [Fact]
    public void A_resampling_section_is_read_with_every_key()
    {
        var recipe = Bind("""
            resampling:
              seed: 12345
              bootstrap: wild-mammen
              resamples: 2000
              jackknife: delete-cycle
              max_failed_percent: 5
            """);
        Assert.True(recipe.IsSuccess, string.Join('\n', recipe.IsSuccess ? [] : recipe.Problems.Select(p => p.ToString())));
        var plan = recipe.Value.Resampling!;
        Assert.Equal(12345UL, plan.Seed);
        Assert.Equal(BootstrapScheme.WildMammen, plan.Bootstrap);
        Assert.Equal(2000, plan.Resamples);
        Assert.True(plan.ResamplesStated);
        Assert.Equal(JackknifeGroups.DeleteCycle, plan.Jackknife);
        Assert.Equal(5.0, plan.MaxFailedPercent);
    }

    [Fact]
    public void Resamples_default_to_1000_when_no_limit_judges_a_bootstrap_interval()
    {
        var plan = Bind("resampling: { seed: 1, bootstrap: pairs }").Value.Resampling!;
        Assert.Equal(ResamplingPlan.DefaultResamples, plan.Resamples);
        Assert.False(plan.ResamplesStated);
        Assert.Null(plan.MaxFailedPercent);
    }

    [Fact]
    public void A_limit_on_a_bootstrap_interval_needs_the_resamples_and_the_failure_budget_written_out()
    {
        var result = Bind("""
            decision: { rule: guarded, interval: bootstrap-bca }
            limits:
              gain: { min: 0.199, max: 0.201 }
            resampling: { seed: 1, bootstrap: pairs }
            """);
        Assert.False(result.IsSuccess);
        Assert.Contains(result.Problems, p => p.Code == RecipeCodes.MissingKey && p.Message.Contains("'resamples'", StringComparison.Ordinal));
        Assert.Contains(result.Problems, p => p.Code == RecipeCodes.MissingKey && p.Message.Contains("'max_failed_percent'", StringComparison.Ordinal));
    }

    [Fact]
    public void A_limit_on_a_resampling_interval_without_a_resampling_section_is_refused()
    {
        var result = Bind("""
            decision: { rule: guarded }
            limits:
              gain: { min: 0.199, max: 0.201, interval: jackknife }
            """);
        Assert.Contains(result.Problems, p => p.Code == RecipeCodes.MissingKey && p.Message.Contains("no 'resampling' section", StringComparison.Ordinal));
    }

    [Theory]
    [InlineData("decision: { rule: simple, interval: bootstrap-bca }", RecipeCodes.Contradiction)]
    [InlineData("decision: { rule: guarded, coverage_factor: 2, interval: bootstrap-bca }", RecipeCodes.Contradiction)]
    [InlineData("decision: { rule: guarded, interval: bootstrap-bcaa }", RecipeCodes.BadValue)]
    public void Contradictory_or_unknown_intervals_are_refused(string decision, string code)
    {
        var result = Bind(decision + "\nlimits:\n  gain: { min: 0.199, max: 0.201 }\nresampling: { seed: 1, bootstrap: pairs, resamples: 1000, max_failed_percent: 5 }");
        Assert.Contains(result.Problems, p => p.Code == code);
    }

    [Theory]
    [InlineData("resampling: { seed: 1, bootstrap: pair }", RecipeCodes.BadValue)]
    [InlineData("resampling: { seed: 1, resamples: 50 }", RecipeCodes.BadValue)]
    [InlineData("resampling: { seed: -1 }", RecipeCodes.BadValue)]
    [InlineData("resampling: { bootstrap: pairs }", RecipeCodes.MissingKey)]
    [InlineData("resampling: { seed: 1, max_failed_percent: 101 }", RecipeCodes.BadValue)]
    [InlineData("resampling: { seed: 1, sed: 2 }", RecipeCodes.UnknownKey)]
    public void Bad_resampling_keys_are_refused(string section, string code)
    {
        var result = Bind(section);
        Assert.Contains(result.Problems, p => p.Code == code);
    }

    [Fact]
    public void A_grouped_jackknife_needs_a_leg_column()
    {
        var text = (Head + "resampling: { seed: 1, jackknife: delete-leg }").Replace("  leg: leg\n", "", StringComparison.Ordinal);
        var result = RecipeBinder.Bind("r.yaml", text, "h");
        Assert.Contains(result.Problems, p => p.Code == RecipeCodes.Contradiction);
    }

    [Fact]
    public void A_unit_judged_on_a_BCa_guard_records_the_interval_the_summary_columns_and_the_seed()
    {
        var recipe = Bind("""
            decision: { rule: guarded, interval: bootstrap-bca }
            limits:
              gain: { min: 0.199, max: 0.201 }
            resampling: { seed: 12345, bootstrap: pairs, resamples: 1000, max_failed_percent: 5 }
            """).Value;
        var sweep = SimulatedUnits.Line(21, 3, serial: "KP250-1");
        var unit = UnitEvaluator.Evaluate("KP250-1.csv", sweep, recipe, null, new string('e', 64));
        var gain = unit.Verdict.Reasons.Single(r => r.Limit?.Figure == "gain");
        Assert.Equal(IntervalSource.BootstrapBca, gain.Limit!.Interval);
        var bca = unit.Resampling!.For("gain")!.Bootstrap!.Bca!.Value;
        Assert.Equal(bca.Low, gain.Limit.Low);
        Assert.Equal(bca.High, gain.Limit.High);
        Assert.Contains(unit.Verdict.Codes, c => c == "resampling.influential_point");

        var record = SummaryRecordFactory.Create(unit, new string('e', 64), new DateTime(2026, 12, 2, 0, 0, 0, DateTimeKind.Utc), "t");
        Assert.Equal(12345, record.ResamplingSeed);
        Assert.Equal(StreamSeed.Derive(12345, "KP250-1", new string('e', 64)).ToString("x16", System.Globalization.CultureInfo.InvariantCulture), record.ResamplingStream);
        Assert.Equal("pairs", record.ResamplingScheme);
        Assert.Equal(1000, record.ResamplingResamples);
        Assert.Equal(8, record.Resampling.Count); // offset and gain, by jackknife, percentile, basic and BCa
        Assert.Equal("bootstrap-bca", record.LimitResults.Single(l => l.Figure == "gain").Interval);
        var row = record.Resampling.Single(r => r.Figure == "gain" && r.Method == "bca");
        Assert.Equal(bca.Low, row.CiLow);
    }

    [Fact]
    public void Too_many_failed_resamples_rule_the_unit_retest_with_the_counts()
    {
        // Five points, four at 0 and one at 250: about a third of pairs resamples have no stimulus spread.
        var recipe = Bind("resampling: { seed: 7, bootstrap: pairs, resamples: 1000, max_failed_percent: 5 }").Value;
        var sweep = new Sweep(new UnitIdentity("S", null, null, null), [0, 0, 0, 0, 250], [0.01, 0.02, 0.0, 0.015, 50.0], [Leg.Up, Leg.Up, Leg.Up, Leg.Up, Leg.Up], [5, 6, 7, 8, 9], []);
        var unit = UnitEvaluator.Evaluate("s.csv", sweep, recipe);
        Assert.Equal(Ruling.Retest, unit.Ruling);
        var finding = unit.Verdict.Reasons[0];
        Assert.Equal("resampling.too_many_failures", finding.Code);
        Assert.Contains("no stimulus spread", finding.Sentence, StringComparison.Ordinal);
        Assert.Equal(unit.Resampling!.Bootstrap!.Value.Failed, unit.Resampling.Bootstrap.Value.DegenerateStimulus);
    }

    private static StandFit.Core.Problems.Result<StandFit.Core.Recipes.Recipe> Bind(string tail) => RecipeBinder.Bind("r.yaml", Head + tail, "h");
}
