using System.Collections.Immutable;
using System.Globalization;
using StandFit.Core.Evaluation;
using StandFit.Core.Ingest;
using StandFit.Core.Judging;
using StandFit.Core.Problems;
using StandFit.Core.Recipes;
using StandFit.Core.Uncertainty.Resampling;
using StandFit.Edges.Outputs;
using StandFit.Edges.RecipeFiles;
using StandFit.Tests.Support;

namespace StandFit.Tests.Resampling;

/// <summary>
/// A recipe with an expression model and a resampling section, bound and judged in the core: the
/// binder accepts resampling for an expression model (and still refuses weights), every parameter
/// and derived figure gets its jackknife and bootstrap figures from refits, a guarded limit can
/// judge them, and too many resamples that cannot be refitted rule the unit retest with the counts
/// of each cause (docs/uncertainty.md, "Nonlinear models").
/// </summary>
public sealed class NonlinearResamplingRecipeTests
{
    private const string Head = """
        recipe: SX-40 saturating sensor
        version: "1"
        parts: [SX-40]
        columns:
          stimulus: stimulus_pct
          output: output_V
        units:
          stimulus: "%"
          output: V
        model:
          type: expression
          expression: y0 + span*(1 - exp(-x/tau))
          parameters:
            y0: { start: 0, unit: V }
            span: { start: 3, unit: V }
            tau: { start: 4, min: 0.5, max: 50, unit: "%" }
          max_iterations: 200
        confidence: 0.95

        """;

    [Fact]
    public void An_expression_model_with_a_resampling_section_binds_with_every_key()
    {
        var recipe = Bind("""
            resampling:
              seed: 12345
              bootstrap: wild-rademacher
              resamples: 2000
              jackknife: delete-one
              max_failed_percent: 5
            """);
        Assert.True(recipe.IsSuccess, string.Join('\n', recipe.IsSuccess ? [] : recipe.Problems.Select(p => p.ToString())));
        var plan = recipe.Value.Resampling!;
        Assert.Equal(12345UL, plan.Seed);
        Assert.Equal(BootstrapScheme.WildRademacher, plan.Bootstrap);
        Assert.Equal(2000, plan.Resamples);
        Assert.Equal(5.0, plan.MaxFailedPercent);
    }

    [Fact]
    public void Weights_are_still_refused_for_an_expression_model_where_they_are_written()
    {
        var recipe = Bind("resampling: { seed: 1, bootstrap: pairs }\nweights:\n  u_fixed: 0.001\n  u_relative: 0.0005\n");
        Assert.False(recipe.IsSuccess);
        var problem = Assert.Single(recipe.Problems);
        Assert.Equal("recipe.contradiction", problem.Code);
        Assert.StartsWith("'weights' cannot be used with model type 'expression'", problem.Message, StringComparison.Ordinal);
        Assert.Equal(20, problem.Location.Line); // the line of the key 'weights'
    }

    [Fact]
    public void A_guarded_limit_judges_the_BCa_interval_of_a_refitted_parameter_and_the_summary_row_carries_it()
    {
        var recipe = Bind("""
            decision:
              rule: guarded
              interval: bootstrap-bca
            derived:
              slope_50: { sensitivity_at: 50 }
              at_80: { value_at: 80 }
              at_3V: { inverse_at: 3.0 }
            limits:
              span: { min: 3.9, max: 4.1 }
            resampling:
              seed: 12345
              bootstrap: pairs
              resamples: 1000
              max_failed_percent: 5
            """).Value;
        var sweep = Rise(21, seed: 17);
        var unit = UnitEvaluator.Evaluate("sx40.csv", sweep, recipe, sourceSha256: new string('a', 64));
        Assert.Equal(Ruling.Pass, unit.Ruling);
        var resampling = unit.Resampling!;
        Assert.Equal(["y0", "span", "tau", "slope_50", "at_80", "at_3V"], resampling.Figures.Select(f => f.Figure));
        Assert.Equal(1000, resampling.Bootstrap!.Value.Requested);
        Assert.Equal(0, resampling.Bootstrap.Value.Failed);

        // The interval the limit judged is the resampled one, and its figure is the fit's estimate.
        var span = resampling.For("span")!;
        Assert.Equal(unit.Parameters.Single(p => p.Name == "span").Estimate, span.Estimate);
        var bca = span.Bootstrap!.Bca!.Value;
        var judged = unit.Figures["span"].Intervals.Single(i => i.Source == IntervalSource.BootstrapBca);
        Assert.Equal(bca.Low, judged.Low);
        Assert.Equal(bca.High, judged.High);

        // The derived figures centre on the curve's values; the inverse prediction's estimate is the
        // full-data root itself, found by the same rule (common practice: a resampled figure's
        // estimate is the figure on all the data).
        Assert.Equal(unit.Curve.Single(c => c.Name == "at_80").Value, resampling.For("at_80")!.Estimate, 1e-14);
        Assert.Equal(unit.Curve.Single(c => c.Name == "at_3V").Value, resampling.For("at_3V")!.Estimate);
        Assert.NotNull(resampling.For("at_3V")!.Bootstrap!.Bca);

        // The bootstrap SE of span is the t SE to Monte-Carlo accuracy (1/sqrt(2B) = 2.2 % at B = 1000)
        // and the narrowing of the pairs bootstrap, sqrt((n - p)/n) = 0.93 at n = 21 (docs/uncertainty.md, Coverage).
        var ratio = span.Bootstrap.StandardError / unit.Parameters.Single(p => p.Name == "span").StandardError;
        Assert.InRange(ratio, 0.75, 1.15);

        var record = SummaryRecordFactory.Create(unit, new string('a', 64), new DateTime(2026, 12, 5, 0, 0, 0, DateTimeKind.Utc), "t");
        Assert.Equal("pairs", record.ResamplingScheme);
        Assert.Equal(1000, record.ResamplingResamples);
        Assert.Equal(0, record.ResamplingFailed);
        Assert.Equal(6 * 4, record.Resampling.Count); // six figures, by jackknife, percentile, basic and BCa
        Assert.Equal("bootstrap-bca", record.LimitResults.Single(l => l.Figure == "span").Interval);
    }

    [Fact]
    public void A_limit_that_judges_the_bootstrap_interval_of_an_inverse_prediction_is_accepted_and_judges_the_resampled_roots()
    {
        // Once refused (InverseNotResampled): the jackknife and bootstrap now resample inverse_at.
        var recipe = Bind("""
            decision:
              rule: guarded
              interval: bootstrap-percentile
            derived:
              at_3V: { inverse_at: 3.0 }
            limits:
              span: { min: 3.9, max: 4.1 }
              at_3V: { min: 0, max: 100 }
            resampling: { seed: 1, bootstrap: pairs, resamples: 1000, max_failed_percent: 5 }
            """);
        Assert.True(recipe.IsSuccess, string.Join('\n', recipe.IsSuccess ? [] : recipe.Problems.Select(p => p.ToString())));
        var limit = recipe.Value.Limits.Single(l => l.Figure == "at_3V");
        Assert.Equal(IntervalSource.BootstrapPercentile, limit.Interval);

        var unit = UnitEvaluator.Evaluate("sx40.csv", Rise(21, seed: 17), recipe.Value, sourceSha256: new string('b', 64));
        var percentile = unit.Resampling!.For("at_3V")!.Bootstrap!.Percentile!.Value;
        var judged = unit.Figures["at_3V"].Intervals.Single(i => i.Source == IntervalSource.BootstrapPercentile);
        Assert.Equal(percentile.Low, judged.Low);
        Assert.Equal(percentile.High, judged.High);
        Assert.True(percentile.Low < unit.Curve.Single(c => c.Name == "at_3V").Value && unit.Curve.Single(c => c.Name == "at_3V").Value < percentile.High);
        Assert.Equal(Ruling.Pass, unit.Ruling);
    }

    [Fact]
    public void A_linear_models_inverse_prediction_is_resampled_too_and_its_intervals_reach_the_guarded_limits()
    {
        var recipe = RecipeBinder.Bind("line.yaml", """
            recipe: KP-250
            version: "1"
            parts: [KP-250]
            columns:
              stimulus: pressure_kPa
              output: output_mV
            model:
              type: straight-line
            confidence: 0.95
            derived:
              at_20mV: { inverse_at: 20.0 }
              at_100: { value_at: 100 }
            resampling: { seed: 3, bootstrap: residual }
            """, "h").Value;
        var unit = UnitEvaluator.Evaluate("line.csv", SimulatedUnits.Line(21, 5), recipe);
        // The figures linear in the parameters first, then the roots (ResamplingAnalysis.Figures).
        Assert.Equal(["offset", "gain", "at_100", "at_20mV"], unit.Resampling!.Figures.Select(f => f.Figure));
        Assert.NotEmpty(unit.Figures["at_20mV"].Intervals);
        Assert.NotEmpty(unit.Figures["at_100"].Intervals);
        Assert.Equal(unit.Curve.Single(c => c.Name == "at_20mV").Value, unit.Resampling.For("at_20mV")!.Estimate);
    }

    [Fact]
    public void Too_many_resamples_that_cannot_be_refitted_rule_the_unit_retest_with_the_counts_of_each_cause()
    {
        var sweep = Step();
        var unit = UnitEvaluator.Evaluate("step.csv", sweep, StepRecipe("resampling: { seed: 7, bootstrap: pairs, resamples: 1000, max_failed_percent: 5 }"));
        var counts = unit.Resampling!.Bootstrap!.Value;
        Assert.True(counts.Failed > 50, counts.ToString());
        Assert.Equal(Ruling.Retest, unit.Ruling);
        var finding = Assert.Single(unit.Verdict.Reasons, r => r.Code == ReasonCodes.ResamplingTooManyFailures.Code);
        Assert.Contains(string.Create(CultureInfo.InvariantCulture, $"{counts.Failed} of 1000 bootstrap resamples could not be fitted"), finding.Sentence, StringComparison.Ordinal);
        Assert.Contains(string.Create(CultureInfo.InvariantCulture, $"{counts.RankDeficient} rank deficient"), finding.Sentence, StringComparison.Ordinal);
        Assert.Contains(string.Create(CultureInfo.InvariantCulture, $"{counts.NotConverged} not converged within the iteration limit, {counts.AtBound} on a parameter bound"), finding.Sentence, StringComparison.Ordinal);

        // The summary row's failed-resamples column and each bootstrap row's 'failed' carry the count.
        var record = SummaryRecordFactory.Create(unit, new string('b', 64), new DateTime(2026, 12, 5, 0, 0, 0, DateTimeKind.Utc), "t");
        Assert.Equal(counts.Failed, record.ResamplingFailed);
        Assert.All(record.Resampling.Where(r => r.Method != "jackknife"), r => Assert.Equal(counts.Failed, r.Failed));
        Assert.Contains(record.Resampling, r => r.Method == "bca");

        // The same unit under a budget above its failure rate: no such reason, the figures rest on the rest.
        var lenient = UnitEvaluator.Evaluate("step.csv", sweep, StepRecipe("resampling: { seed: 7, bootstrap: pairs, resamples: 1000, max_failed_percent: 60 }"));
        Assert.Equal(counts, lenient.Resampling!.Bootstrap!.Value);
        Assert.DoesNotContain(lenient.Verdict.Reasons, r => r.Code == ReasonCodes.ResamplingTooManyFailures.Code);
        Assert.Equal(counts.Succeeded, lenient.Resampling.For("tau")!.Bootstrap!.Resamples);

        // The point at 2 alone fixes tau (leverage 1): leaving it out cannot be refitted, so there is no jackknife.
        Assert.Contains(unit.Verdict.Reasons, r => r.Code == ReasonCodes.ResamplingJackknifeUnavailable.Code);
        Assert.Null(unit.Resampling.For("tau")!.DeleteOne);
    }

    [Fact]
    public void Failed_resamples_are_counted_exactly_at_the_budget_and_just_over_it()
    {
        // The rate of the step unit's failures, then budgets exactly on it (no reason: "more than") and just under it.
        var sweep = Step();
        var failed = UnitEvaluator.Evaluate("step.csv", sweep, StepRecipe("resampling: { seed: 7, bootstrap: pairs, resamples: 1000 }")).Resampling!.Bootstrap!.Value.Failed;
        var percent = 100.0 * failed / 1000;
        var on = UnitEvaluator.Evaluate("step.csv", sweep, StepRecipe(string.Create(CultureInfo.InvariantCulture, $"resampling: {{ seed: 7, bootstrap: pairs, resamples: 1000, max_failed_percent: {percent} }}")));
        var under = UnitEvaluator.Evaluate("step.csv", sweep, StepRecipe(string.Create(CultureInfo.InvariantCulture, $"resampling: {{ seed: 7, bootstrap: pairs, resamples: 1000, max_failed_percent: {percent - 0.1} }}")));
        Assert.DoesNotContain(on.Verdict.Reasons, r => r.Code == ReasonCodes.ResamplingTooManyFailures.Code);
        Assert.Contains(under.Verdict.Reasons, r => r.Code == ReasonCodes.ResamplingTooManyFailures.Code);
    }

    /// <summary>The recipe with tau bounded to [0.5, 5], as the step unit's model (NonlinearResamplerTests.StepUnit).</summary>
    private static Recipe StepRecipe(string tail)
    {
        var bound = RecipeBinder.Bind("step.yaml", Head.Replace("max: 50", "max: 5", StringComparison.Ordinal) + tail, "h");
        Assert.True(bound.IsSuccess, string.Join('\n', bound.IsSuccess ? [] : bound.Problems.Select(p => p.ToString())));
        return bound.Value;
    }

    private static Result<Recipe> Bind(string tail) => RecipeBinder.Bind("sx40.yaml", Head + tail, "h");

    /// <summary>n points of the exponential rise 0.5 + 4 (1 - exp(-x/30)) from 0 to 100 %, noise SD 2 mV (seeded).</summary>
    private static Sweep Rise(int n, ulong seed)
    {
        var rng = new Xoshiro256StarStar(seed);
        var x = Enumerable.Range(0, n).Select(i => 100.0 * i / (n - 1)).ToArray();
        var y = x.Select(v => 0.5 + (4.0 * (1 - Math.Exp(-v / 30.0))) + (0.002 * SimulatedUnits.Gaussian(ref rng))).ToArray();
        return Sweep(x, y);
    }

    /// <summary>The step unit of NonlinearResamplerTests: two points at 0, one at 2, eleven on a plateau where exp(-x/tau) underflows.</summary>
    private static Sweep Step()
    {
        var (_, fit) = NonlinearResamplerTests.StepUnit();
        return Sweep([.. fit.Stimulus], [.. fit.Output]);
    }

    private static Sweep Sweep(double[] x, double[] y) =>
        new(new UnitIdentity("SX40-1", "SX-40", null, null), [.. x], [.. y], [.. x.Select(_ => Leg.Unknown)], [.. Enumerable.Range(6, x.Length)], ImmutableArray<MetadataEntry>.Empty);
}
