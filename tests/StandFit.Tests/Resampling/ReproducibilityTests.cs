using StandFit.Core.Evaluation;
using StandFit.Core.Uncertainty.Resampling;
using StandFit.Tests.Support;

namespace StandFit.Tests.Resampling;

public sealed class ReproducibilityTests
{
    private static readonly ResamplingPlan Plan = new(12345) { Bootstrap = BootstrapScheme.Pairs, Resamples = 500, ResamplesStated = true, MaxFailedPercent = 5 };

    [Fact]
    public void Two_evaluations_of_the_same_unit_give_bit_identical_resampling_figures()
    {
        var sweep = SimulatedUnits.Line(21, 1);
        var recipe = SimulatedUnits.Recipe(Plan);
        var a = Fingerprint(UnitEvaluator.Evaluate("a.csv", sweep, recipe, null, new string('c', 64)));
        var b = Fingerprint(UnitEvaluator.Evaluate("a.csv", sweep, recipe, null, new string('c', 64)));
        Assert.Equal(a, b);
    }

    [Fact]
    public void Units_judged_on_one_thread_and_on_two_give_bit_identical_resampling_figures()
    {
        var recipe = SimulatedUnits.Recipe(Plan);
        var sweeps = Enumerable.Range(0, 24).Select(i => SimulatedUnits.Line(21, (ulong)i + 100, serial: "SIM-" + i.ToString(System.Globalization.CultureInfo.InvariantCulture))).ToArray();
        string[] Run(int threads)
        {
            var results = new string[sweeps.Length];
            Parallel.For(0, sweeps.Length, new ParallelOptions { MaxDegreeOfParallelism = threads }, i =>
                results[i] = Fingerprint(UnitEvaluator.Evaluate("u.csv", sweeps[i], recipe, null, new string('d', 64))));
            return results;
        }

        Assert.Equal(Run(1), Run(2));
    }

    [Fact]
    public void The_stream_changes_with_the_unit_so_two_units_never_share_draws()
    {
        var recipe = SimulatedUnits.Recipe(Plan);
        var sweep = SimulatedUnits.Line(21, 1);
        var a = UnitEvaluator.Evaluate("a.csv", sweep, recipe, null, new string('1', 64)).Resampling!;
        var b = UnitEvaluator.Evaluate("a.csv", sweep, recipe, null, new string('2', 64)).Resampling!;
        Assert.NotEqual(a.StreamSeed, b.StreamSeed);
        Assert.NotEqual(a.For("gain")!.Bootstrap!.StandardError, b.For("gain")!.Bootstrap!.StandardError);
    }

    /// <summary>Every resampling figure of a unit as the hex of its bits.</summary>
    private static string Fingerprint(UnitEvaluation unit)
    {
        var r = unit.Resampling!;
        var bits = new List<string> { r.StreamSeed.ToString("X16", System.Globalization.CultureInfo.InvariantCulture) };
        foreach (var f in r.Figures)
        {
            var b = f.Bootstrap!;
            double[] values = [f.Jackknife!.StandardError, f.Jackknife.Bias, b.Mean, b.StandardError, b.Percentile!.Value.Low, b.Percentile.Value.High, b.Bca!.Value.Low, b.Bca.Value.High];
            bits.AddRange(values.Select(v => BitConverter.DoubleToInt64Bits(v).ToString("X16", System.Globalization.CultureInfo.InvariantCulture)));
        }

        return string.Join(' ', bits);
    }
}
