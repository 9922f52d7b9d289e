using System.Globalization;
using StandFit.Core.Fitting;
using StandFit.Core.Fitting.Expressions;
using StandFit.Core.Fitting.Nonlinear;
using StandFit.Core.Uncertainty.Resampling;
using StandFit.Tests.Support;
using Xunit.Abstractions;

namespace StandFit.Tests.Resampling;

/// <summary>
/// The jackknife and bootstrap of expression models (<see cref="NonlinearResampler"/>: every
/// resample refitted from the full-data estimate) against R's nls() and boot package (R 4.2.2,
/// boot 1.3.28.1; the versions are in the fixture's first line), on the same resamples, for two
/// NIST StRD nonlinear datasets: Chwirut2 (54 points, y = exp(-b1 x)/(b2 + b3 x), pairs) and
/// Misra1a (14 points, y = b1 (1 - exp(-b2 x)), residual). The index files were written by
/// <c>dotnet run --project bench/StandFit.Benchmarks -- fixture tests/StandFit.Tests/Resampling/Fixtures</c>,
/// then nls-boot-reference.csv and the per-resample estimates by
/// <c>Rscript tests/StandFit.Tests/Resampling/Fixtures/nls_boot_reference.R</c> (from the
/// repository root), which refits every resample and every deletion with nls() and polishes each
/// to the least-squares point by Gauss-Newton steps, then runs boot.ci (types "perc", "basic",
/// "bca", with L the jackknife influence values) on its own replicates. CI never runs R.
/// <para>
/// Tolerances. The reference estimates are the least-squares points to working precision (nls,
/// then Gauss-Newton steps until they are below 1e-15 of the parameters). StandFit stops a refit
/// once the scaled step still to come is at most the recipe's step tolerance (1e-12) of the scaled
/// parameters, ||D d|| &lt;= 1e-12 ||D theta||, D the column norms of the fit's Jacobian: the
/// search's own converged-step test. That leaves parameter j within about 1e-12 ||D theta|| / D_j
/// of the least-squares point, which is 1e-12 ||D theta|| / (D_j SE_j) bootstrap SEs: for Misra1a
/// (||D theta|| = 240, D_b1 = 0.76, SE_b1 = 2.8) about 1e-10 SE, more where the two parameters'
/// correlation of -0.9988 (vcov of R's nls) stretches the error along the valley (measured: at most 1.6e-9 SE); for
/// Chwirut2 at most 8e-11 SE. So every per-resample estimate must agree with R's to 1e-8 of its
/// bootstrap SE, and the SEs and interval ends, which are order statistics and sums of those
/// estimates, to 1e-8 (relative, or of the SE); the bias, a mean of small differences, and the BCa
/// ends, which move with the acceleration computed from the jackknife's influence values, to 1e-6
/// of the SE.
/// </para>
/// </summary>
public sealed class NlsBootReferenceTests
{
    private const int B = 1000;
    private const ulong Chwirut2Stream = 541;  // bench/StandFit.Benchmarks/Fixture.cs, Chwirut2Stream
    private const ulong Misra1aStream = 141;   // Fixture.cs, Misra1aStream

    private static readonly Lazy<Dictionary<string, double>> Reference = new(() => BootFixtureFiles.NamedValues("nls-boot-reference.csv"));

    private readonly ITestOutputHelper _output;

    public NlsBootReferenceTests(ITestOutputHelper output) => _output = output;

    public static TheoryData<string> Cases => new() { "chwirut2", "misra1a" };

    [Fact]
    public void The_fixture_records_the_R_and_boot_versions()
    {
        var first = File.ReadLines(Path("nls-boot-reference.csv")).First();
        Assert.StartsWith("# R version 4.2.2", first, StringComparison.Ordinal);
        Assert.Contains("boot 1.3.28.1", first, StringComparison.Ordinal);
    }

    [Theory]
    [MemberData(nameof(Cases))]
    public void The_resampler_still_draws_the_resamples_R_was_given(string name)
    {
        var c = Case.Of(name);
        var indices = new int[B * c.Fit.Count];
        var rng = new Xoshiro256StarStar(c.Stream);
        c.Resampler.Bootstrap(c.Scheme, B, ref rng, new double[c.Fit.ParameterCount * B], indices);
        Assert.Equal(ReadIndices(c.IndexFile), indices);
    }

    [Theory]
    [MemberData(nameof(Cases))]
    public void The_full_fit_is_the_certified_and_R_estimate(string name)
    {
        var c = Case.Of(name);
        var dataset = StrdNonlinearFile.Load(c.File);
        for (var j = 0; j < c.Fit.ParameterCount; j++)
        {
            var parameter = dataset.Parameters[j];
            // NIST StRD certified value (11 digits) and R's nls, polished.
            Assert.True(Math.Abs(c.Fit.Estimates[j] - parameter.Estimate) <= 1e-9 * Math.Abs(parameter.Estimate), $"{name} {parameter.Name}: {c.Fit.Estimates[j]:R}, certified {parameter.Estimate:R}");
            Close($"{name}.{parameter.Name}.estimate", c.Fit.Estimates[j], 1e-12);
        }
    }

    [Theory]
    [MemberData(nameof(Cases))]
    public void Every_resample_refits_to_the_estimates_nls_finds_on_it(string name)
    {
        var c = Case.Of(name);
        var p = c.Fit.ParameterCount;
        var replicates = new double[p * B];
        var rng = new Xoshiro256StarStar(c.Stream);
        var counts = c.Resampler.Bootstrap(c.Scheme, B, ref rng, replicates);
        Assert.Equal(Reference.Value[name + ".failed"], counts.Failed);
        Assert.Equal(B, counts.Succeeded);

        var rows = File.ReadAllLines(Path(name + "-estimates.csv")).Skip(1).Select(l => l.Split(',').Select(Parse).ToArray()).ToArray();
        Assert.Equal(B, rows.Length);
        var worst = 0.0;
        for (var j = 0; j < p; j++)
        {
            var se = Reference.Value[$"{name}.{c.Fit.ParameterNames[j]}.boot_se"];
            for (var r = 0; r < B; r++)
            {
                var gap = Math.Abs(replicates[(j * B) + r] - rows[r][j]) / se;
                worst = Math.Max(worst, gap);
                Assert.True(gap <= 1e-8, $"{name} resample {r} {c.Fit.ParameterNames[j]}: StandFit {replicates[(j * B) + r]:R}, nls {rows[r][j]:R} ({gap:E2} SE)");
            }
        }

        _output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{name}: largest difference from nls {worst:E2} bootstrap SE; {c.Resampler.HandedOver} refits handed to the full search"));
    }

    [Theory]
    [MemberData(nameof(Cases))]
    public void Jackknife_bootstrap_SE_and_percentile_basic_and_BCa_intervals_match_boot(string name)
    {
        var c = Case.Of(name);
        var p = c.Fit.ParameterCount;
        var n = c.Fit.Count;
        var replicates = new double[p * B];
        var rng = new Xoshiro256StarStar(c.Stream);
        var counts = c.Resampler.Bootstrap(c.Scheme, B, ref rng, replicates);
        var leaveOut = new double[p * n];
        var failures = new ResampleFailure[n];
        c.Resampler.LeaveOut([.. Enumerable.Range(0, n)], n, leaveOut, failures);
        Assert.All(failures, f => Assert.Equal(ResampleFailure.None, f));

        for (var j = 0; j < p; j++)
        {
            var prefix = $"{name}.{c.Fit.ParameterNames[j]}";
            var se = Reference.Value[prefix + ".boot_se"];
            var jack = Jackknife.Summarise(c.Resampler.Estimates[j], leaveOut.AsSpan(j * n, n));
            var jackSe = Reference.Value[prefix + ".jack_se"];
            Close(prefix + ".jack_se", jack.StandardError, 1e-8);
            Close(prefix + ".jack_mean", jack.Mean, 1e-8, jackSe);
            Close(prefix + ".jack_bias", jack.Bias, 1e-6, jackSe);
            Close(prefix + ".acceleration", jack.Acceleration, 1e-6, 1.0);
            for (var i = 0; i < n; i++)
            {
                Close(string.Create(CultureInfo.InvariantCulture, $"{prefix}.influence.{i}"), jack.Influence[i], 1e-6, jackSe);
            }

            foreach (var coverage in new[] { 0.95, 0.6827 })
            {
                var summary = BootstrapIntervals.Summarise(replicates.AsSpan(j * B, counts.Succeeded), c.Resampler.Estimates[j], coverage, jack.Acceleration);
                Close(prefix + ".boot_se", summary.StandardError, 1e-8);
                Close(prefix + ".boot_bias", summary.Bias, 1e-6, se);
                var tag = prefix + "." + coverage.ToString(CultureInfo.InvariantCulture);
                Close(tag + ".perc.low", summary.Percentile!.Value.Low, 1e-8, se);
                Close(tag + ".perc.high", summary.Percentile.Value.High, 1e-8, se);
                Close(tag + ".basic.low", summary.Basic!.Value.Low, 1e-8, se);
                Close(tag + ".basic.high", summary.Basic.Value.High, 1e-8, se);
                Close(tag + ".bca.low", summary.Bca!.Value.Low, 1e-6, se);
                Close(tag + ".bca.high", summary.Bca.Value.High, 1e-6, se);
            }
        }
    }

    /// <summary>|actual - R| within <paramref name="relative"/> of |R| (or of <paramref name="scale"/> when given).</summary>
    private static void Close(string name, double actual, double relative, double? scale = null)
    {
        var expected = Reference.Value[name];
        var tolerance = relative * (scale ?? Math.Abs(expected));
        Assert.True(Math.Abs(actual - expected) <= tolerance, $"{name}: StandFit {actual:R}, R {expected:R}");
    }

    private static double Parse(string s) => double.Parse(s, NumberStyles.Float, CultureInfo.InvariantCulture);

    private static int[] ReadIndices(string file) => BootFixtureFiles.Indices(file);

    private static string Path(string file) => BootFixtureFiles.Path(file);

    /// <summary>One dataset: its expression model fitted from NIST's Start 2, and a resampler of the fit.</summary>
    private sealed record Case(string File, NonlinearFitResult Fit, NonlinearResampler Resampler, BootstrapScheme Scheme, ulong Stream, string IndexFile)
    {
        public static Case Of(string name) => name switch
        {
            "chwirut2" => Make("Chwirut2.dat", "exp(-b1*x)/(b2+b3*x)", BootstrapScheme.Pairs, Chwirut2Stream, "chwirut2-pairs-indices.csv"),
            _ => Make("Misra1a.dat", "b1*(1-exp(-b2*x))", BootstrapScheme.Residual, Misra1aStream, "misra1a-residual-indices.csv"),
        };

        private static Case Make(string file, string expression, BootstrapScheme scheme, ulong stream, string indexFile)
        {
            var dataset = StrdNonlinearFile.Load(file);
            var names = dataset.Parameters.Select(p => p.Name).ToArray();
            var parsed = ExpressionParser.Parse(expression, ["x"], names);
            var model = new ExpressionModel(parsed.Expression, dataset.Parameters.Select(p => new ExpressionParameter(p.Name, p.Start2)));
            var outcome = NonlinearFitter.Fit(model, new FitData(dataset.Predictors[0], dataset.Y));
            Assert.Null(outcome.Problem);
            var fit = outcome.Search!;
            return new Case(file, fit, new NonlinearResampler(fit, model, []), scheme, stream, indexFile);
        }
    }
}
