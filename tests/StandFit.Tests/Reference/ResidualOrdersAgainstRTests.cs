using System.Globalization;
using StandFit.Core.Diagnostics;
using StandFit.Core.Ingest;
using StandFit.Tests.Support;

namespace StandFit.Tests.Reference;

/// <summary>
/// The residual orders a gate can take (stimulus, acquisition, per-leg) against R, on the data sets of
/// the diagnostics fixture (datasets.csv: NIST StRD Pontius, Norris and NoInt1, a 120-point sweep of
/// our own, eight demo sweeps with up and down legs). The reference values were computed once by
/// Fixtures/diagnostics/make-orders-fixture.R (R 4.2.2, lmtest 0.9.40, tseries 0.10.53) into
/// orders-fixture.csv; the R function behind each quantity is named beside its check. Statistics
/// agree to 1e-8 relative, p-values to 1e-6 absolute, exact Durbin-Watson p-values to 1e-4 against
/// lmtest's Pan routine and to 1e-6 against R's Imhof integral.
/// </summary>
public sealed class ResidualOrdersAgainstRTests
{
    private const double Relative = 1e-8;
    private const double PAbsolute = 1e-6;
    private const double PanAbsolute = 1e-4;

    private static readonly Lazy<(string Header, Dictionary<(string, string), double> Values)> Orders = new(Load);

    public static TheoryData<string> DataSets => [.. DiagnosticsFixture.Instance.DataSets.Select(d => d.Name)];

    [Fact]
    public void The_orders_fixture_records_the_R_and_package_versions_that_made_it()
    {
        foreach (var version in new[] { "R version 4.2.2", "lmtest 0.9.40", "tseries 0.10.53" })
        {
            Assert.Contains(version, Orders.Value.Header, StringComparison.Ordinal);
        }

        Assert.True(File.Exists(Path.Combine(DiagnosticsFixture.Folder, "make-orders-fixture.R")));
        Assert.True(DiagnosticsFixture.Instance.DataSets.Length >= 10, "at least ten data sets");
        var legged = DiagnosticsFixture.Instance.DataSets.Count(d => d.Legs.Contains(Leg.Up) && d.Legs.Contains(Leg.Down));
        Assert.True(legged >= 8, "eight data sets with an up and a down leg");
    }

    [Theory]
    [MemberData(nameof(DataSets))]
    public void The_runs_test_in_acquisition_and_stimulus_order_matches_the_exact_runs_distribution_in_R(string name)
    {
        var set = DiagnosticsFixture.Instance[name];
        var byStimulus = RunsTest.Compute(set.Fit.Residuals.AsSpan(), ResidualOrders.ByStimulus(set.Fit.Stimulus.AsSpan()));
        var byAcquisition = set.Diagnostics().RunsByAcquisition;
        foreach (var (order, result) in new[] { ("stimulus", byStimulus), ("acquisition", byAcquisition) })
        {
            Runs(name, "runs_" + order, result);
        }
    }

    [Theory]
    [MemberData(nameof(DataSets))]
    public void The_runs_test_of_each_leg_and_the_sidak_combination_match_R(string name)
    {
        var set = DiagnosticsFixture.Instance[name];
        var perLeg = set.Diagnostics().RunsPerLeg;
        foreach (var (leg, label) in new[] { (Leg.Up, "up"), (Leg.Down, "down"), (Leg.Unknown, "unknown") })
        {
            var quantity = "runs_leg_" + label;
            var result = perLeg.Of(leg);
            if (Has(name, quantity + "_count"))
            {
                Assert.NotNull(result);
                Runs(name, quantity, result);
            }
            else
            {
                // R's runs_of returns nothing for a leg without points or without both signs.
                Assert.True(result is null || !result.IsApplicable, $"{name}: the {label} leg's runs test applies here but not in R");
            }
        }

        Assert.Equal(Value(name, "runs_per_leg_legs"), perLeg.Applicable);
        Near(name, "runs_per_leg_min_p", perLeg.MinP, PAbsolute);
        Near(name, "runs_per_leg_p", perLeg.P, PAbsolute); // 1 - (1 - min p)^k in R
    }

    [Theory]
    [MemberData(nameof(DataSets))]
    public void The_durbin_watson_test_in_acquisition_and_stimulus_order_matches_lmtest_dwtest(string name)
    {
        var set = DiagnosticsFixture.Instance[name];
        var acquisition = set.Diagnostics().DurbinWatson;
        Stat(name, "dw_acquisition", acquisition.Statistic); // lmtest::dwtest(exact = TRUE)
        Near(name, "dw_acquisition_p", acquisition.P, PanAbsolute);

        var stimulus = Compute(set, ResidualOrder.Stimulus).DurbinWatsonIn(ResidualOrder.Stimulus);
        Assert.Equal(DiagnosticMethods.Exact, stimulus.Method);
        Stat(name, "dw_stimulus", stimulus.Statistic); // lmtest::dwtest on the rows sorted by stimulus
        Near(name, "dw_stimulus_p", stimulus.P, PanAbsolute);
    }

    [Theory]
    [MemberData(nameof(DataSets))]
    public void The_durbin_watson_test_within_legs_matches_R_on_the_within_leg_difference_matrix(string name)
    {
        var set = DiagnosticsFixture.Instance[name];
        var perLeg = Compute(set, ResidualOrder.PerLeg).DurbinWatsonIn(ResidualOrder.PerLeg);
        Assert.Equal(DiagnosticMethods.Exact, perLeg.Method);
        Stat(name, "dw_per_leg", perLeg.Statistic); // sum((D e)^2) / sum(e^2), D the within-leg differences
        Near(name, "dw_per_leg_p_imhof", perLeg.P, PAbsolute); // Imhof by stats::integrate over eigen(M A M)
        Near(name, "dw_per_leg_p_pan", perLeg.P, PanAbsolute); // lmtest's Fortran pan, as dwtest calls it
        Assert.Equal(0, Value(name, "dw_per_leg_zero_eigenvalues")); // none of these designs has a leg-constant residual direction
    }

    [Fact]
    public void A_sweep_without_leg_labels_is_one_leg_so_its_per_leg_durbin_watson_test_is_the_acquisition_order_test()
    {
        // Norris has no legs: the within-leg statistic and its p (by the dense eigenvalues) equal the
        // acquisition-order test's (by the low-rank integral), two computations of one probability.
        var set = DiagnosticsFixture.Instance["norris-line"];
        var d = Compute(set, ResidualOrder.PerLeg);
        Assert.Equal(d.DurbinWatson.Statistic, d.DurbinWatsonIn(ResidualOrder.PerLeg).Statistic, 12);
        Assert.Equal(d.DurbinWatson.P, d.DurbinWatsonIn(ResidualOrder.PerLeg).P, 8);
    }

    private static ResidualDiagnostics Compute(DiagnosticsFixture.DataSet set, ResidualOrder order) =>
        ResidualDiagnostics.Compute(set.Fit, set.Legs.AsSpan(), set.Options with { DurbinWatsonOrder = order });

    private static void Runs(string name, string quantity, RunsTestResult result)
    {
        Assert.Equal(Value(name, quantity + "_count"), result.Runs);
        Stat(name, quantity + "_z", result.Z); // tseries::runs.test statistic
        if (result.Method == RunsMethod.Exact)
        {
            Near(name, quantity + "_p_exact", result.P, PAbsolute); // the closed-form runs distribution summed with choose()
        }
        else
        {
            Near(name, quantity + "_p_normal", result.P, PAbsolute); // tseries::runs.test p (normal approximation)
        }
    }

    private static bool Has(string name, string quantity) => Orders.Value.Values.ContainsKey((name, quantity));

    private static double Value(string name, string quantity) =>
        Orders.Value.Values.TryGetValue((name, quantity), out var v) ? v : throw new KeyNotFoundException($"{name}: {quantity} is not in orders-fixture.csv");

    private static void Stat(string name, string quantity, double value)
    {
        var expected = Value(name, quantity);
        Assert.True(Math.Abs(value - expected) <= Relative * Math.Abs(expected), $"{name}: {quantity} = {value:R}, R has {expected:R}");
    }

    private static void Near(string name, string quantity, double value, double tolerance)
    {
        var expected = Value(name, quantity);
        Assert.True(Math.Abs(value - expected) <= tolerance, $"{name}: {quantity} = {value:R}, R has {expected:R}");
    }

    private static (string, Dictionary<(string, string), double>) Load()
    {
        var lines = File.ReadAllLines(Path.Combine(DiagnosticsFixture.Folder, "orders-fixture.csv"));
        var values = new Dictionary<(string, string), double>();
        foreach (var line in lines.Skip(2).Where(l => l.Length > 0))
        {
            var cells = line.Split(',');
            values[(cells[0], cells[1])] = double.Parse(cells[3], NumberStyles.Float, CultureInfo.InvariantCulture);
        }

        return (lines[0], values);
    }
}
