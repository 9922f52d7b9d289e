using StandFit.Core.Evaluation;
using StandFit.Core.Ingest;
using StandFit.Core.Judging;
using StandFit.Core.Problems;
using StandFit.Core.Recipes;
using StandFit.Core.Screening;
using StandFit.Edges.RecipeFiles;
using StandFit.Tests.Support;

namespace StandFit.Tests.Screening;

/// <summary>
/// The data-quality gates (recipe key <c>sweep:</c>), on the demo's good KP-250 sweep with rows
/// changed in memory: each gate fires with its code and a sentence naming its numbers or line, and
/// stays quiet on the good sweep; a unit that fails a gate is ruled retest and is never fitted.
/// The demo file's data rows are lines 7 to 27: step k is on line 6 + k.
/// </summary>
public sealed class SweepScreenTests
{
    private const string DemoFile = "KP250-26110-0001.csv";

    private static readonly Recipe Kp250 = LoadDemoRecipe();

    private static Recipe LoadDemoRecipe()
    {
        var catalog = RecipeCatalog.Load(DemoSet.Recipes);
        Assert.True(catalog.IsValid, catalog.Report());
        return catalog.ForPart("KP-250") ?? throw new InvalidOperationException("The demo recipes have no KP-250.");
    }

    /// <summary>The demo file's lines (line n is index n - 1).</summary>
    private static List<string> Lines() => [.. File.ReadAllText(Path.Combine(DemoSet.Folder, DemoFile)).Replace("\r\n", "\n", StringComparison.Ordinal).TrimEnd('\n').Split('\n')];

    private static SweepTable Table(List<string> lines) => SweepTextParser.Parse(DemoFile, string.Join('\n', lines) + "\n").Value;

    private static Sweep Sweep(List<string> lines) => SweepAssembler.Assemble(Table(lines), Kp250.Columns).Value;

    /// <summary>Replaces the cell of a column (0 step, 1 leg, 2 pressure_kPa, 3 output_mV) on a line (1-based).</summary>
    private static List<string> WithCell(List<string> lines, int line, int column, string value)
    {
        var cells = lines[line - 1].Split(',');
        cells[column] = value;
        lines[line - 1] = string.Join(',', cells);
        return lines;
    }

    private static IReadOnlyList<Finding> Screen(List<string> lines, SweepExpectations? expect = null) => SweepScreen.Screen(Sweep(lines), expect ?? Kp250.Sweep);

    private static Finding Single(IReadOnlyList<Finding> findings, ReasonCode code)
    {
        var finding = Assert.Single(findings);
        Assert.Equal(code.Code, finding.Code);
        Assert.Equal(ReasonKind.Retest, finding.Kind);
        return finding;
    }

    [Fact]
    public void The_demo_recipe_sets_every_gate_and_the_good_demo_sweep_passes_them_all()
    {
        var expect = Kp250.Sweep;
        Assert.Equal(21, expect.MinPoints);
        Assert.Equal(new StimulusRange(0, 250), expect.Range);
        Assert.Equal(95, expect.SpanPercent);
        Assert.Equal<Leg>([Leg.Up, Leg.Down], expect.Legs);
        Assert.Equal(1.0, expect.MonotonicTolerance);
        Assert.Equal(3, expect.SaturationRun);
        Assert.True(expect.RejectDuplicateRows);

        Assert.Empty(Screen(Lines()));
    }

    [Fact]
    public void A_sweep_with_fewer_points_than_min_points_is_sweep_too_few_points_with_both_counts()
    {
        var lines = Lines();
        lines.RemoveAt(27 - 1);

        var finding = Single(Screen(lines), ReasonCodes.SweepTooFewPoints);

        Assert.Equal("the sweep has 20 points, fewer than the 21 the recipe expects; test the unit again.", finding.Sentence);
    }

    [Fact]
    public void A_sweep_with_exactly_min_points_passes_that_gate()
    {
        Assert.Empty(Screen(Lines(), new SweepExpectations { MinPoints = 21 }));
        Assert.Single(Screen(Lines(), new SweepExpectations { MinPoints = 22 }));
    }

    [Fact]
    public void A_sweep_that_stops_short_of_the_range_is_sweep_span_short_with_the_percentage_and_the_range()
    {
        var lines = Lines();
        lines.RemoveAt(17 - 1); // step 11, the 250 kPa point: the sweep now tops out at 225.0031 kPa

        var finding = Single(Screen(lines, Kp250.Sweep with { MinPoints = null }), ReasonCodes.SweepSpanShort);

        // (225.0031 - -0.0053) / 250 = 90.003 %, shown to 4 significant digits.
        Assert.Equal("the stimulus covers 90 % of the range [0, 250], less than the 95 % the recipe expects; check the stand's sweep and test the unit again.", finding.Sentence);
    }

    [Fact]
    public void The_span_gate_compares_the_measured_span_with_the_percentage_of_the_range()
    {
        // The good sweep spans 250.0086 kPa of a 250 kPa range: 100.003 %.
        Assert.Empty(Screen(Lines(), new SweepExpectations { Range = new StimulusRange(0, 250), SpanPercent = 100 }));
        Assert.Equal(
            "the stimulus covers 96.16 % of the range [0, 260], less than the 97 % the recipe expects; check the stand's sweep and test the unit again.",
            Single(Screen(Lines(), new SweepExpectations { Range = new StimulusRange(0, 260), SpanPercent = 97 }), ReasonCodes.SweepSpanShort).Sentence);
    }

    [Fact]
    public void A_sweep_without_its_down_leg_is_sweep_leg_missing_naming_the_leg()
    {
        var lines = Lines();
        lines.RemoveRange(18 - 1, 10); // steps 12 to 21

        var finding = Single(Screen(lines, new SweepExpectations { Legs = [Leg.Up, Leg.Down] }), ReasonCodes.SweepLegMissing);

        Assert.Equal("the sweep has no down leg, which the recipe expects; test the unit again.", finding.Sentence);
    }

    [Fact]
    public void Every_gate_that_fails_is_reported_not_just_the_first()
    {
        var lines = Lines();
        lines.RemoveRange(18 - 1, 10);

        var findings = Screen(lines);

        Assert.Equal(["sweep.too_few_points", "sweep.leg_missing"], findings.Select(f => f.Code));
        Assert.All(findings, f => Assert.Equal(ReasonKind.Retest, f.Kind));
    }

    [Fact]
    public void An_up_leg_that_turns_back_by_more_than_the_tolerance_is_sweep_leg_not_monotonic_naming_the_values_and_the_line()
    {
        var lines = WithCell(Lines(), 11, 2, "73.0"); // step 5: 99.9996 kPa read as 73, after 75.0042 at step 4

        var finding = Single(Screen(lines), ReasonCodes.SweepLegNotMonotonic);

        Assert.Equal("on the up leg the stimulus turns back from 75.0042 to 73 (line 11); check the stand's actuator and test the unit again.", finding.Sentence);
    }

    [Fact]
    public void A_down_leg_that_turns_back_up_is_sweep_leg_not_monotonic()
    {
        var lines = WithCell(Lines(), 21, 2, "180"); // step 15, after 175.0024 at step 14

        var finding = Single(Screen(lines), ReasonCodes.SweepLegNotMonotonic);

        Assert.Equal("on the down leg the stimulus turns back from 175.002 to 180 (line 21); check the stand's actuator and test the unit again.", finding.Sentence);
    }

    [Fact]
    public void A_reversal_within_the_tolerance_is_allowed()
    {
        var lines = WithCell(Lines(), 11, 2, "74.5"); // 0.5042 kPa back, within the recipe's 1.0 kPa

        Assert.Empty(Screen(lines));
        Assert.Single(Screen(lines, new SweepExpectations { MonotonicTolerance = 0.5 }));
    }

    [Fact]
    public void Identical_outputs_at_the_top_of_the_output_range_are_sweep_output_saturated_with_the_count_and_value()
    {
        var lines = Lines();
        foreach (var line in new[] { 16, 17, 18 }) // steps 10, 11, 12: 225, 250 and 225 kPa
        {
            WithCell(lines, line, 3, "44.95");
        }

        var finding = Single(Screen(lines), ReasonCodes.SweepOutputSaturated);

        Assert.Equal("3 points in a row read exactly 44.95 at the end of the output range: the output looks clipped or saturated; check the unit and the stand's input range.", finding.Sentence);
    }

    [Fact]
    public void Identical_outputs_at_the_bottom_of_the_output_range_are_sweep_output_saturated()
    {
        var lines = Lines();
        foreach (var line in new[] { 7, 27, 8 }) // steps 1, 21, 2: the three lowest stimuli
        {
            WithCell(lines, line, 3, "-0.02");
        }

        var finding = Single(Screen(lines), ReasonCodes.SweepOutputSaturated);

        Assert.StartsWith("3 points in a row read exactly -0.02 at the end of the output range", finding.Sentence, StringComparison.Ordinal);
    }

    [Fact]
    public void A_run_shorter_than_saturation_run_is_not_saturation()
    {
        var lines = Lines();
        WithCell(lines, 16, 3, "44.99"); // step 10, 225.0031 kPa
        WithCell(lines, 17, 3, "44.99"); // step 11, 250.0033 kPa: two equal outputs at the top

        Assert.Empty(Screen(lines));
        Assert.Single(Screen(lines, new SweepExpectations { SaturationRun = 2 }));
    }

    [Fact]
    public void A_row_logged_twice_is_sweep_duplicate_rows_naming_both_lines()
    {
        var lines = Lines();
        lines.Insert(9, lines[9 - 1]); // step 3 again, as line 10

        var finding = Single(Screen(lines), ReasonCodes.SweepDuplicateRows);

        Assert.Equal("line 10 repeats line 9 exactly (stimulus, output and leg): the stand logged a row twice; test the unit again.", finding.Sentence);
    }

    [Fact]
    public void The_same_point_on_the_other_leg_is_not_a_duplicate_row()
    {
        var lines = Lines();
        lines.Insert(9, lines[9 - 1].Replace(",up,", ",down,", StringComparison.Ordinal));

        Assert.Empty(Screen(lines));
    }

    [Fact]
    public void A_recipe_without_a_sweep_section_checks_nothing_before_the_fit()
    {
        var lines = Lines();
        lines.RemoveRange(18 - 1, 10);
        lines.Insert(9, lines[9 - 1]);

        Assert.Empty(Screen(lines, SweepExpectations.None));
    }

    [Fact]
    public void A_unit_that_fails_a_gate_is_ruled_retest_with_the_gates_reason_only_and_is_not_fitted()
    {
        var table = Table(WithCell(Lines(), 11, 2, "73.0"));

        var unit = UnitEvaluator.Evaluate(table, Kp250);

        Assert.Equal(Ruling.Retest, unit.Ruling);
        Assert.Equal(["sweep.leg_not_monotonic"], unit.Verdict.Codes);
        Assert.Null(unit.Fit);
        Assert.Empty(unit.Parameters);
        Assert.Empty(unit.Figures);
        Assert.Null(unit.Runs);
        Assert.Null(unit.Problem);
        Assert.NotNull(unit.Sweep);
        Assert.Equal("KP250-26110-0001", unit.Identity!.Serial);
    }

    [Fact]
    public void The_good_demo_sweep_passes_the_gates_and_is_fitted_and_judged()
    {
        var unit = UnitEvaluator.Evaluate(Table(Lines()), Kp250);

        Assert.Equal(Ruling.Pass, unit.Ruling);
        Assert.NotNull(unit.Fit);
        Assert.DoesNotContain(unit.Verdict.Codes, c => c.StartsWith("sweep.", StringComparison.Ordinal));
        Assert.Contains("gain.within_limits", unit.Verdict.Codes);
    }

    [Fact]
    public void A_sweep_whose_stimulus_never_moves_is_rejected_as_fit_zero_stimulus_spread_not_screened()
    {
        var lines = Lines();
        for (var line = 7; line <= 27; line++)
        {
            WithCell(lines, line, 2, "100");
        }

        // The span gate alone would call it short, but a sweep no fit can use is rejected before any gate.
        Assert.Contains(Screen(lines), f => f.Code == "sweep.span_short");
        var unit = UnitEvaluator.Evaluate(Table(lines), Kp250);

        Assert.Equal(Ruling.Rejected, unit.Ruling);
        Assert.Equal(["fit.zero_stimulus_spread"], unit.Verdict.Codes);
        Assert.Equal("fit.zero_stimulus_spread", unit.Problem!.Code);
        Assert.Null(unit.Fit);
    }

    [Fact]
    public void A_sweep_too_short_for_any_fit_is_rejected_as_fit_too_few_points_before_the_min_points_gate()
    {
        var lines = Lines();
        lines.RemoveRange(9 - 1, 19); // keep steps 1 and 2 only

        var unit = UnitEvaluator.Evaluate(Table(lines), Kp250);

        Assert.Equal(Ruling.Rejected, unit.Ruling);
        Assert.Equal(["fit.too_few_points"], unit.Verdict.Codes);
    }

    [Fact]
    public void A_sweep_with_too_few_points_for_the_recipe_but_enough_for_a_fit_is_ruled_retest()
    {
        var lines = Lines();
        lines.RemoveRange(18 - 1, 5); // steps 12 to 16: 16 points, both legs still present

        var unit = UnitEvaluator.Evaluate(Table(lines), Kp250);

        Assert.Equal(Ruling.Retest, unit.Ruling);
        Assert.Equal(["sweep.too_few_points"], unit.Verdict.Codes);
        Assert.Null(unit.Fit);
    }
}
