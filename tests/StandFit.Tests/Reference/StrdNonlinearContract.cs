using System.Globalization;
using System.Text;
using StandFit.Core.Fitting.Nonlinear;
using StandFit.Tests.Support;
using Xunit.Abstractions;

namespace StandFit.Tests.Reference;

/// <summary>
/// The test contract for the NIST StRD nonlinear-regression datasets: each subclass names its
/// dataset (<see cref="StrdNonlinearCases"/>: the file and its model). The contract fits the model
/// with <see cref="LevenbergMarquardt"/> from both of NIST's start vectors and scores every
/// certified quantity by the log relative error (McCullough 1998), capped at the 11 printed digits.
/// <para>
/// Where a fit converges, its estimates must reach LRE 6 and its standard deviations and residual
/// SD LRE 4. Where a fit does not converge, the result must say so (a status that is not converged),
/// and the dataset must expect it: a fit that stops converging, or starts to, fails the test until
/// the subclass and docs/accuracy.md say so.
/// </para>
/// </summary>
public abstract class StrdNonlinearContract
{
    public const double RequiredEstimateLre = 6;
    public const double RequiredSdLre = 4;

    private readonly ITestOutputHelper _output;

    protected StrdNonlinearContract(ITestOutputHelper output) => _output = output;

    /// <summary>The dataset and the model it certifies.</summary>
    protected abstract StrdNonlinearCase Case { get; }

    /// <summary>The smallest LRE accepted for the standard deviations, where a dataset is known to fall short of <see cref="RequiredSdLre"/>.</summary>
    protected virtual double MinimumSdLre => RequiredSdLre;

    /// <summary>The residual degrees of freedom when the file's header misstates them (Rat43).</summary>
    protected virtual int DegreesOfFreedom => Case.Dataset.StatedDegreesOfFreedom;

    /// <summary>Whether the fit from Start 1 or Start 2 is expected to converge (all do so far).</summary>
    protected virtual bool ConvergesFrom(int start) => true;

    private StrdNonlinearFile Dataset => Case.Dataset;

    [Fact]
    public void The_model_has_the_certified_parameters_in_the_file_order() =>
        Assert.Equal(Dataset.Parameters.Select(p => p.Name), Case.Model.ParameterNames);

    [Fact]
    public void The_degrees_of_freedom_are_the_points_less_the_parameters() =>
        Assert.Equal(DegreesOfFreedom, StrdNonlinearCases.FitFrom(Case, 2).DegreesOfFreedom);

    [Theory]
    [InlineData(1)]
    [InlineData(2)]
    public void The_fit_from_each_start_converges_as_the_dataset_expects(int start)
    {
        var fit = StrdNonlinearCases.FitFrom(Case, start);
        _output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{Case.File} start {start}: {fit.StatusCode} after {fit.Iterations} iterations, {fit.Evaluations} evaluations: {fit.StatusReason}"));
        Assert.True(
            fit.Converged == ConvergesFrom(start),
            string.Create(CultureInfo.InvariantCulture, $"{Case.File} start {start}: expected {(ConvergesFrom(start) ? "convergence" : "no convergence")}, got {fit.StatusCode}: {fit.StatusReason}"));
    }

    [Theory]
    [InlineData(1)]
    [InlineData(2)]
    public void A_converged_fit_matches_every_certified_estimate_and_any_other_says_it_did_not_converge(int start) =>
        AssertWhereConverged(start, "estimate", RequiredEstimateLre, fit => Dataset.Parameters.Select((p, j) => Score(p.Name, fit.Estimates[j], p.Estimate)));

    [Theory]
    [InlineData(1)]
    [InlineData(2)]
    public void A_converged_fit_matches_every_certified_standard_deviation_and_any_other_says_it_did_not_converge(int start) =>
        AssertWhereConverged(start, "standard deviation", MinimumSdLre, fit => Dataset.Parameters.Select((p, j) => Score(p.Name, fit.StandardErrors[j], p.StandardDeviation)));

    [Theory]
    [InlineData(1)]
    [InlineData(2)]
    public void A_converged_fit_matches_the_certified_residual_sd_and_any_other_says_it_did_not_converge(int start) =>
        AssertWhereConverged(start, "residual SD", MinimumSdLre, fit => [Score("s", fit.ResidualSd, Dataset.ResidualSd)]);

    private static Scored Score(string name, double estimate, double certified) =>
        new(name, estimate, certified, LogRelativeError.Of(estimate, certified, StrdNonlinearFile.CertifiedDigits));

    private void AssertWhereConverged(int start, string quantity, double required, Func<NonlinearFitResult, IEnumerable<Scored>> scores)
    {
        var fit = StrdNonlinearCases.FitFrom(Case, start);
        if (!fit.Converged)
        {
            // No solution to score: the result must not pass itself off as one.
            _output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{Case.File} start {start}: {fit.StatusCode}: {fit.StatusReason}"));
            Assert.DoesNotContain(fit.StatusCode, new[] { "converged-rss", "converged-step", "converged-gradient" });
            Assert.DoesNotContain("converged after", fit.StatusReason, StringComparison.Ordinal);
            return;
        }

        var rows = scores(fit).ToList();
        var table = new StringBuilder();
        foreach (var row in rows)
        {
            table.Append(CultureInfo.InvariantCulture, $"{Case.File} start {start} {quantity} {row.Name}: {LogRelativeError.Describe(row.Estimate, row.Certified, row.Lre)}").AppendLine();
        }

        var minimum = rows.Min(r => r.Lre);
        table.Append(CultureInfo.InvariantCulture, $"{Case.File} start {start} {quantity}: minimum LRE {minimum:F2}, required {required:F1} ({fit.StatusCode}, {fit.Iterations} iterations)");
        _output.WriteLine(table.ToString());
        var failing = rows.Where(r => !(r.Lre >= required)).ToList();
        Assert.True(
            failing.Count == 0,
            string.Create(CultureInfo.InvariantCulture, $"{Case.File} start {start}: {failing.Count} {quantity} value(s) below LRE {required:F1}:") + Environment.NewLine + table);
    }

    private sealed record Scored(string Name, double Estimate, double Certified, double Lre);
}
