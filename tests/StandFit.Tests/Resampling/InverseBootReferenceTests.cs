using System.Globalization;
using StandFit.Core.Evaluation;
using StandFit.Core.Fitting;
using StandFit.Core.Fitting.Expressions;
using StandFit.Core.Fitting.Nonlinear;
using StandFit.Core.Uncertainty.Resampling;
using StandFit.Tests.Support;
using Xunit.Abstractions;

namespace StandFit.Tests.Resampling;

/// <summary>
/// Resampled inverse predictions (inverse_at) against R (R 4.2.2, boot 1.3.28.1; the versions are
/// in the fixture's first line), on the same resamples: NIST StRD Pontius (a quadratic, 40 points,
/// pairs; <see cref="LinearResampler"/>, R's lm()), Chwirut2 (pairs) and Misra1a (residual; both
/// <see cref="NonlinearResampler"/>, R's nls()). R refits every resample and deletion itself and
/// solves f(x) = y0 on the calibrated range with uniroot() (Brent's method, tol 1e-14 |x|), then
/// runs boot.ci types "perc" and "bca" on those roots. The index files were written by
/// <c>dotnet run --project bench/StandFit.Benchmarks -- fixture tests/StandFit.Tests/Resampling/Fixtures</c>,
/// inverse-boot-reference.csv and the &lt;case&gt;-inverse-roots.csv files by
/// <c>Rscript tests/StandFit.Tests/Resampling/Fixtures/inverse_boot_reference.R</c> (from the
/// repository root). CI never runs R.
/// <para>
/// Tolerances. Every root must agree with R's to 1e-8 of its value (relative). What limits the
/// agreement is the refit, not the root finder (both solve to about 1e-14 of x): the nonlinear
/// refits agree with nls to at most 1.6e-9 of a parameter's bootstrap SE (NlsBootReferenceTests),
/// which moves the root by about as many of the root's SE, far below 1e-8 of the root. The SE, the
/// jackknife SE and the percentile ends are sums and order statistics of those roots, held to 1e-8
/// of the root's bootstrap SE; the bias, a mean of small differences, and the BCa ends, which move
/// with the acceleration from the jackknife's influence values (differences of the deletion roots),
/// to 1e-6 of the SE, as for the parameters in NlsBootReferenceTests.
/// </para>
/// </summary>
public sealed class InverseBootReferenceTests
{
    private const int B = 1000;

    private static readonly Lazy<Dictionary<string, double>> Reference = new(() => BootFixtureFiles.NamedValues("inverse-boot-reference.csv"));

    private readonly ITestOutputHelper _output;

    public InverseBootReferenceTests(ITestOutputHelper output) => _output = output;

    public static TheoryData<string> Cases => new() { "pontius", "chwirut2", "misra1a" };

    [Fact]
    public void The_fixture_records_the_R_and_boot_versions()
    {
        var first = File.ReadLines(Path("inverse-boot-reference.csv")).First();
        Assert.StartsWith("# R version 4.2.2", first, StringComparison.Ordinal);
        Assert.Contains("boot 1.3.28.1", first, StringComparison.Ordinal);
    }

    [Theory]
    [MemberData(nameof(Cases))]
    public void Every_resampled_and_jackknifed_root_is_the_root_uniroot_finds_on_Rs_refit(string name)
    {
        var c = Case.Of(name);
        var (replicates, counts, indices, leaveOut) = c.Run();
        Assert.Equal(B, counts.Succeeded);
        Assert.Equal(ReadIndices(c.IndexFile, c.Points), indices);

        var roots = File.ReadAllLines(Path(name + "-inverse-roots.csv")).Select(Parse).ToArray();
        Assert.Equal(1 + B + c.Points, roots.Length);
        var worst = Gap(c.Estimate, roots[0]);
        Assert.True(worst <= 1e-8, $"{name} full data: {c.Estimate:R} vs R {roots[0]:R}");
        Assert.Equal(Reference.Value[name + ".estimate"], c.Estimate, 1e-8 * Math.Abs(c.Estimate));
        for (var s = 0; s < B; s++)
        {
            var gap = Gap(replicates[s], roots[1 + s]);
            worst = Math.Max(worst, gap);
            Assert.True(gap <= 1e-8, $"{name} resample {s}: {replicates[s]:R} vs R {roots[1 + s]:R}");
        }

        for (var i = 0; i < c.Points; i++)
        {
            var gap = Gap(leaveOut[i], roots[1 + B + i]);
            worst = Math.Max(worst, gap);
            Assert.True(gap <= 1e-8, $"{name} deletion {i}: {leaveOut[i]:R} vs R {roots[1 + B + i]:R}");
        }

        _output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{name}: largest relative difference from R's root {worst:E2}"));
    }

    [Theory]
    [MemberData(nameof(Cases))]
    public void The_roots_bootstrap_SE_and_percentile_and_BCa_intervals_match_boot_ci(string name)
    {
        var c = Case.Of(name);
        var (replicates, counts, _, leaveOut) = c.Run();
        var se = Reference.Value[name + ".boot_se"];
        var jack = Jackknife.Summarise(c.Estimate, leaveOut);
        Close(name + ".jack_se", jack.StandardError, 1e-8, se);
        Close(name + ".acceleration", jack.Acceleration, 1e-6, 1.0);
        foreach (var coverage in new[] { 0.95, 0.6827 })
        {
            var summary = BootstrapIntervals.Summarise(replicates.ToArray().AsSpan(0, counts.Succeeded), c.Estimate, coverage, jack.Acceleration);
            Close(name + ".boot_se", summary.StandardError, 1e-8, se);
            Close(name + ".boot_bias", summary.Bias, 1e-6, se);
            var tag = name + "." + coverage.ToString(CultureInfo.InvariantCulture);
            Close(tag + ".perc.low", summary.Percentile!.Value.Low, 1e-8, se);
            Close(tag + ".perc.high", summary.Percentile.Value.High, 1e-8, se);
            Close(tag + ".bca.low", summary.Bca!.Value.Low, 1e-6, se);
            Close(tag + ".bca.high", summary.Bca.Value.High, 1e-6, se);
        }
    }

    private static double Gap(double actual, double expected) => Math.Abs(actual - expected) / Math.Abs(expected);

    /// <summary>|actual - R| within <paramref name="relative"/> of <paramref name="scale"/>.</summary>
    private static void Close(string name, double actual, double relative, double scale)
    {
        var expected = Reference.Value[name];
        Assert.True(Math.Abs(actual - expected) <= relative * scale, $"{name}: StandFit {actual:R}, R {expected:R}");
    }

    private static double Parse(string s) => double.Parse(s, NumberStyles.Float, CultureInfo.InvariantCulture);

    private static int[] ReadIndices(string file, int n)
    {
        var values = BootFixtureFiles.Indices(file);
        Assert.Equal(B * n, values.Length);
        return values;
    }

    private static string Path(string file) => BootFixtureFiles.Path(file);

    /// <summary>One dataset, its resampler with the inverse figure last, and the scheme and stream of its index file.</summary>
    private sealed record Case(IResamplerCase Resampler, int Points, int Figure, BootstrapScheme Scheme, ulong Stream, string IndexFile)
    {
        public double Estimate => Resampler.Estimates[Figure];

        public static Case Of(string name) => name switch
        {
            "pontius" => Pontius(),
            "chwirut2" => Nonlinear("Chwirut2.dat", "exp(-b1*x)/(b2+b3*x)", 20.0, BootstrapScheme.Pairs, 541, "chwirut2-pairs-indices.csv"),
            _ => Nonlinear("Misra1a.dat", "b1*(1-exp(-b2*x))", 40.0, BootstrapScheme.Residual, 141, "misra1a-residual-indices.csv"),
        };

        /// <summary>The inverse figure's bootstrap replicates, the counts, the drawn indices and its delete-one roots.</summary>
        public (double[] Replicates, BootstrapCounts Counts, int[] Indices, double[] LeaveOut) Run()
        {
            var f = Resampler.Figures;
            var output = new double[f * B];
            var indices = new int[B * Points];
            var rng = new Xoshiro256StarStar(Stream);
            var counts = Resampler.Bootstrap(Scheme, B, ref rng, output, indices);
            var leaveOut = new double[f * Points];
            var failures = new ResampleFailure[Points];
            Resampler.LeaveOut([.. Enumerable.Range(0, Points)], Points, leaveOut, failures);
            Assert.All(failures, x => Assert.Equal(ResampleFailure.None, x));
            return (output.AsSpan(Figure * B, B).ToArray(), counts, indices, leaveOut.AsSpan(Figure * Points, Points).ToArray());
        }

        private static Case Pontius()
        {
            // PontiusStream of bench/StandFit.Benchmarks/Fixture.cs; y0 = 1 (inverse_boot_reference.R).
            var data = StrdFile.Linear("Pontius.dat");
            var fit = LeastSquaresFitter.Fit(Polynomial.OfDegree(2), new FitData(data.X, data.Y)).Value;
            var kernel = new LinearResampler(fit, [1, 0, 0, 0, 1, 0, 0, 0, 1], [1.0]);
            return new Case(new LinearCase(kernel), fit.Count, 3, BootstrapScheme.Pairs, 1881, "pontius-pairs-indices.csv");
        }

        private static Case Nonlinear(string file, string expression, double y0, BootstrapScheme scheme, ulong stream, string indexFile)
        {
            // Streams of Fixture.cs (Chwirut2Stream, Misra1aStream); y0 of inverse_boot_reference.R.
            var dataset = StrdNonlinearFile.Load(file);
            var names = dataset.Parameters.Select(p => p.Name).ToArray();
            var parsed = ExpressionParser.Parse(expression, ["x"], names);
            var model = new ExpressionModel(parsed.Expression, dataset.Parameters.Select(p => new ExpressionParameter(p.Name, p.Start2)));
            var outcome = NonlinearFitter.Fit(model, new FitData(dataset.Predictors[0], dataset.Y));
            Assert.Null(outcome.Problem);
            var fit = outcome.Search!;
            var resampler = new NonlinearResampler(fit, model, [new DerivedFigure("x_at", DerivedKind.InverseAt, y0)]);
            return new Case(new NonlinearCase(resampler), fit.Count, fit.ParameterCount, scheme, stream, indexFile);
        }
    }

    /// <summary>The two resamplers behind one face (their common interface is internal to the core).</summary>
    private interface IResamplerCase
    {
        int Figures { get; }

        double[] Estimates { get; }

        BootstrapCounts Bootstrap(BootstrapScheme scheme, int resamples, ref Xoshiro256StarStar rng, double[] output, int[] indices);

        void LeaveOut(int[] groupOf, int groups, double[] output, ResampleFailure[] failures);
    }

    private sealed class LinearCase(LinearResampler kernel) : IResamplerCase
    {
        public int Figures => kernel.Figures;

        public double[] Estimates => kernel.Estimates.ToArray();

        public BootstrapCounts Bootstrap(BootstrapScheme scheme, int resamples, ref Xoshiro256StarStar rng, double[] output, int[] indices) => kernel.Bootstrap(scheme, resamples, ref rng, output, indices);

        public void LeaveOut(int[] groupOf, int groups, double[] output, ResampleFailure[] failures) => kernel.LeaveOut(groupOf, groups, output, failures);
    }

    private sealed class NonlinearCase(NonlinearResampler resampler) : IResamplerCase
    {
        public int Figures => resampler.Figures;

        public double[] Estimates => resampler.Estimates.ToArray();

        public BootstrapCounts Bootstrap(BootstrapScheme scheme, int resamples, ref Xoshiro256StarStar rng, double[] output, int[] indices) => resampler.Bootstrap(scheme, resamples, ref rng, output, indices);

        public void LeaveOut(int[] groupOf, int groups, double[] output, ResampleFailure[] failures) => resampler.LeaveOut(groupOf, groups, output, failures);
    }
}
