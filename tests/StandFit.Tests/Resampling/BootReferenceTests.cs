using System.Globalization;
using StandFit.Core.Fitting;
using StandFit.Core.Uncertainty.Resampling;
using StandFit.Tests.Support;

namespace StandFit.Tests.Resampling;

/// <summary>
/// StandFit's jackknife and bootstrap figures against R's boot package (R 4.2.2, boot 1.3.28.1; the
/// versions are in the fixture's first line) on the same resamples. The fixtures in Fixtures/ were
/// written once: the data and StandFit's resample indices by
/// <c>dotnet run --project bench/StandFit.Benchmarks -- fixture tests/StandFit.Tests/Resampling/Fixtures</c>,
/// then boot-reference.csv by <c>Rscript boot_reference.R</c> (beside them), which has boot.ci (types
/// "perc", "basic", "bca", with L = empinf(type = "jack")) work on exactly those resamples. CI never runs R.
/// </summary>
public sealed class BootReferenceTests
{
    private const int B = 1000;
    private const ulong LineSeed = 424242;  // bench/StandFit.Benchmarks/Fixture.cs, LineStream
    private const ulong LawSeed = 1993;     // Fixture.cs, LawStream

    private static readonly Lazy<Dictionary<string, double>> Reference = new(() => BootFixtureFiles.NamedValues("boot-reference.csv"));

    private static readonly double[] Lsat = [576, 635, 558, 578, 666, 580, 555, 661, 651, 605, 653, 575, 545, 572, 594];
    private static readonly double[] Gpa = [3.39, 3.30, 2.81, 3.03, 3.44, 3.07, 3.00, 3.43, 3.36, 3.13, 3.12, 2.74, 2.76, 2.88, 2.96];

    [Fact]
    public void The_fixture_records_the_R_and_boot_versions()
    {
        var first = File.ReadLines(Path("boot-reference.csv")).First();
        Assert.StartsWith("# R version 4.2.2", first, StringComparison.Ordinal);
        Assert.Contains("boot 1.3.28.1", first, StringComparison.Ordinal);
    }

    [Fact]
    public void The_generator_still_draws_the_resamples_R_was_given()
    {
        var (fit, _) = Line();
        var kernel = new LinearResampler(fit, [1, 0, 0, 1]);
        var indices = new int[B * 21];
        var rng = new Xoshiro256StarStar(LineSeed);
        kernel.Bootstrap(BootstrapScheme.Pairs, B, ref rng, new double[2 * B], indices);
        Assert.Equal(ReadIndices("line-indices.csv"), indices);

        var law = new Xoshiro256StarStar(LawSeed);
        Assert.Equal(ReadIndices("law-indices.csv"), Enumerable.Range(0, B * 15).Select(_ => law.NextBelow(15)).ToArray());
    }

    [Theory]
    [InlineData("offset", 0)]
    [InlineData("gain", 1)]
    public void Straight_line_bootstrap_and_jackknife_figures_match_boot(string name, int index)
    {
        var (fit, sweep) = Line();
        var kernel = new LinearResampler(fit, index == 0 ? [1, 0] : [0, 1]);
        var replicates = new double[B];
        var rng = new Xoshiro256StarStar(LineSeed);
        Assert.Equal(B, kernel.Bootstrap(BootstrapScheme.Pairs, B, ref rng, replicates).Succeeded);
        var leaveOut = new double[21];
        kernel.LeaveOut([.. Enumerable.Range(0, 21)], 21, leaveOut, new ResampleFailure[21]);
        var jack = Jackknife.Summarise(kernel.Estimates[0], leaveOut);
        Check("line." + name, kernel.Estimates[0], replicates, jack);
        if (name == "gain")
        {
            Close("line.gain.jack_bias", jack.Bias, 1e-7);
            Close("line.gain.jack_corrected", jack.BiasCorrected, 1e-12);
            Close("line.gain.jack_mean", jack.Mean, 1e-12);
        }

        Assert.Equal(21, sweep.Count);
    }

    [Fact]
    public void Law_school_correlation_bootstrap_and_jackknife_figures_match_boot()
    {
        var indices = ReadIndices("law-indices.csv");
        var replicates = new double[B];
        for (var r = 0; r < B; r++)
        {
            replicates[r] = Correlation(indices.AsSpan(r * 15, 15).ToArray());
        }

        var all = Enumerable.Range(0, 15).ToArray();
        var theta = Correlation(all);
        var jack = Jackknife.Summarise(theta, all.Select(i => Correlation([.. all.Where(j => j != i)])).ToArray());
        Check("law.cor", theta, replicates, jack);
    }

    private static void Check(string prefix, double estimate, double[] replicates, JackknifeSummary jack)
    {
        Close(prefix + ".estimate", estimate, 1e-12);
        Close(prefix + ".jack_se", jack.StandardError, 1e-9);
        Close(prefix + ".acceleration", jack.Acceleration, 1e-8);
        for (var i = 0; i < jack.Influence.Length; i++)
        {
            Close(string.Create(CultureInfo.InvariantCulture, $"{prefix}.influence.{i}"), jack.Influence[i], 1e-8, Reference.Value[prefix + ".jack_se"]);
        }

        foreach (var coverage in new[] { 0.95, 0.6827 })
        {
            var summary = BootstrapIntervals.Summarise(replicates.ToArray(), estimate, coverage, jack.Acceleration);
            Close(prefix + ".boot_se", summary.StandardError, 1e-9);
            Close(prefix + ".boot_bias", summary.Bias, 1e-6, summary.StandardError);
            var tag = prefix + "." + coverage.ToString(CultureInfo.InvariantCulture);
            Close(tag + ".perc.low", summary.Percentile!.Value.Low, 1e-10);
            Close(tag + ".perc.high", summary.Percentile.Value.High, 1e-10);
            Close(tag + ".basic.low", summary.Basic!.Value.Low, 1e-10);
            Close(tag + ".basic.high", summary.Basic.Value.High, 1e-10);
            Close(tag + ".bca.low", summary.Bca!.Value.Low, 1e-10);
            Close(tag + ".bca.high", summary.Bca.Value.High, 1e-10);
        }
    }

    /// <summary>|actual - R| within <paramref name="relative"/> of |R| (or of <paramref name="scale"/> when given: for values near 0).</summary>
    private static void Close(string name, double actual, double relative, double? scale = null)
    {
        var expected = Reference.Value[name];
        var tolerance = relative * (scale ?? Math.Abs(expected));
        Assert.True(Math.Abs(actual - expected) <= tolerance, $"{name}: StandFit {actual:R}, boot {expected:R}");
    }

    private static (FitResult Fit, StandFit.Core.Ingest.Sweep Sweep) Line()
    {
        var rows = File.ReadAllLines(Path("line.csv")).Skip(1).Select(l => l.Split(',')).ToArray();
        double P(string s) => double.Parse(s, NumberStyles.Float, CultureInfo.InvariantCulture);
        var x = rows.Select(r => P(r[0])).ToArray();
        var y = rows.Select(r => P(r[1])).ToArray();
        var sweep = new StandFit.Core.Ingest.Sweep(new("LINE", null, null, null), [.. x], [.. y], [.. x.Select(_ => StandFit.Core.Ingest.Leg.Unknown)], [.. Enumerable.Range(2, x.Length)], []);
        return (SimulatedUnits.Fit(sweep), sweep);
    }

    private static int[] ReadIndices(string file) => BootFixtureFiles.Indices(file);

    private static double Correlation(int[] rows)
    {
        var mx = rows.Average(i => Lsat[i]);
        var my = rows.Average(i => Gpa[i]);
        double sxy = 0, sxx = 0, syy = 0;
        foreach (var i in rows)
        {
            sxy += (Lsat[i] - mx) * (Gpa[i] - my);
            sxx += (Lsat[i] - mx) * (Lsat[i] - mx);
            syy += (Gpa[i] - my) * (Gpa[i] - my);
        }

        return sxy / Math.Sqrt(sxx * syy);
    }

    private static string Path(string file) => BootFixtureFiles.Path(file);
}
