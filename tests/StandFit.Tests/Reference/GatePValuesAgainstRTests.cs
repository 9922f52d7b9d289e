using System.Globalization;
using StandFit.Core.Diagnostics;
using StandFit.Core.Ingest;
using StandFit.Tests.Support;

namespace StandFit.Tests.Reference;

/// <summary>
/// The p-values the residual gates judge (docs/diagnostics.md, "Why the gates judge a mid-p and an F
/// form") against R on the data sets of the diagnostics fixture (datasets.csv). The reference values
/// were computed once by Fixtures/diagnostics/make-gate-pvalues-fixture.R (R 4.2.2, lmtest 0.9.40) into gate-pvalues-fixture.csv; the R computation behind each quantity is named
/// beside its check. Statistics agree to 1e-8 relative, p-values to 1e-6 absolute. The R-matching
/// values the summary keeps beside them (bp_p, runs_p, runs_per_leg_p) are checked, unchanged, by
/// DiagnosticsAgainstRTests and ResidualOrdersAgainstRTests.
/// </summary>
public sealed class GatePValuesAgainstRTests
{
    private const double Relative = 1e-8;
    private const double PAbsolute = 1e-6;

    private static readonly Lazy<(string Header, Dictionary<(string, string), double> Values)> Fixture = new(Load);

    public static TheoryData<string> DataSets => [.. DiagnosticsFixture.Instance.DataSets.Select(d => d.Name)];

    [Fact]
    public void The_gate_p_value_fixture_records_the_R_and_package_versions_that_made_it()
    {
        foreach (var version in new[] { "R version 4.2.2", "lmtest 0.9.40" })
        {
            Assert.Contains(version, Fixture.Value.Header, StringComparison.Ordinal);
        }

        Assert.True(File.Exists(Path.Combine(DiagnosticsFixture.Folder, "make-gate-pvalues-fixture.R")));
    }

    [Theory]
    [MemberData(nameof(DataSets))]
    public void The_breusch_pagan_f_form_matches_the_f_test_of_Rs_auxiliary_regression(string name)
    {
        var bp = DiagnosticsFixture.Instance[name].Diagnostics().BreuschPagan;

        Stat(name, "bp_statistic", bp.Statistic); // lmtest::bptest(studentize = TRUE), unchanged
        Stat(name, "bp_f", bp.F); // summary(lm(e^2 ~ terms))$fstatistic
        Assert.Equal(Value(name, "bp_f_df1"), bp.Df);
        Assert.Equal(Value(name, "bp_f_df2"), bp.FDf2);
        Near(name, "bp_f_p", bp.FP); // pf(F, k, n - k - 1, lower.tail = FALSE)
    }

    [Theory]
    [MemberData(nameof(DataSets))]
    public void The_runs_mid_p_values_match_R_in_every_order_and_within_legs(string name)
    {
        var set = DiagnosticsFixture.Instance[name];
        var d = set.Diagnostics();
        var byStimulus = RunsTest.Compute(set.Fit.Residuals.AsSpan(), ResidualOrders.ByStimulus(set.Fit.Stimulus.AsSpan()));
        foreach (var (order, result) in new[] { ("stimulus", byStimulus), ("acquisition", d.RunsByAcquisition) })
        {
            Assert.Equal(Value(name, $"runs_{order}_count"), result.Runs);
            Near(name, $"runs_{order}_p", result.P); // twice the smaller tail, choose() (above 30 signs of one kind: 2 pnorm(-|z|), as tseries::runs.test)
            Near(name, $"runs_{order}_mid_p", result.MidP); // twice the smaller mid tail, choose()
        }

        foreach (var leg in new[] { Leg.Up, Leg.Down, Leg.Unknown })
        {
            var quantity = $"runs_leg_{leg.ToString().ToLowerInvariant()}_mid_p";
            if (d.RunsPerLeg.Of(leg) is { IsApplicable: true } result)
            {
                Near(name, quantity, result.MidP);
            }
            else
            {
                Assert.False(Has(name, quantity), $"{name}: R has {quantity}, StandFit's test does not apply");
            }
        }

        var within = d.RunsPerLeg.WithinLegs;
        Assert.Equal(Value(name, "runs_within_legs_count"), within.Runs); // the legs' run counts summed
        Near(name, "runs_within_legs_p", within.P); // stats::convolve of the legs' choose() distributions
        Near(name, "runs_within_legs_mid_p", within.MidP);
    }

    private static bool Has(string name, string quantity) => Fixture.Value.Values.ContainsKey((name, quantity));

    private static double Value(string name, string quantity) =>
        Fixture.Value.Values.TryGetValue((name, quantity), out var v) ? v : throw new KeyNotFoundException($"{name}: {quantity} is not in gate-pvalues-fixture.csv");

    private static void Stat(string name, string quantity, double value)
    {
        var expected = Value(name, quantity);
        Assert.True(Math.Abs(value - expected) <= Relative * Math.Abs(expected), $"{name}: {quantity} = {value:R}, R has {expected:R}");
    }

    private static void Near(string name, string quantity, double value)
    {
        var expected = Value(name, quantity);
        Assert.True(Math.Abs(value - expected) <= PAbsolute, $"{name}: {quantity} = {value:R}, R has {expected:R}");
    }

    private static (string, Dictionary<(string, string), double>) Load()
    {
        var lines = File.ReadAllLines(Path.Combine(DiagnosticsFixture.Folder, "gate-pvalues-fixture.csv"));
        var values = new Dictionary<(string, string), double>();
        foreach (var line in lines.Skip(2).Where(l => l.Length > 0))
        {
            var cells = line.Split(',');
            values[(cells[0], cells[1])] = double.Parse(cells[3], NumberStyles.Float, CultureInfo.InvariantCulture);
        }

        return (lines[0], values);
    }
}
