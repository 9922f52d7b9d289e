using System.Collections.Immutable;
using System.Globalization;
using System.Text;
using StandFit.Core.Fitting;
using StandFit.Tests.Support;
using Xunit.Abstractions;

namespace StandFit.Tests.Reference;

/// <summary>
/// The test contract for the NIST StRD linear-regression datasets: each subclass names its dataset
/// file, the model that file certifies and the minimum log relative error (McCullough 1998) it must
/// reach. The contract loads the file, fits the model with <see cref="LeastSquaresFitter"/> and scores
/// every certified quantity with the LRE, capped at the 15 printed digits.
/// <para>
/// Certified values of exactly 0 (the standard deviations and the residual SD of the exact fits
/// Wampler1 and Wampler2) have no relative error. The bare absolute error -log10(|est|) would depend
/// on the units of y, so such a value is scored against the size of the quantity it stands for:
/// the residual SD against max|y|, the SD of the coefficient of x^k against max|y| / max|x|^k (the
/// size a coefficient needs to move y by max|y|). The score -log10(|est| / size) must reach the same
/// minimum; for the residual SD and B0 this is |sd| &lt;= 10^-minimum * max|y|.
/// </para>
/// </summary>
public abstract class StrdLinearContract
{
    private readonly ITestOutputHelper _output;
    private FitResult? _fit;

    protected StrdLinearContract(ITestOutputHelper output) => _output = output;

    /// <summary>The file in the StRD linear folder, e.g. "Norris.dat".</summary>
    protected abstract string DatasetFile { get; }

    /// <summary>The model the file certifies.</summary>
    protected abstract LinearModel Model { get; }

    /// <summary>The smallest LRE accepted for every estimate, SD, the residual SD and R-squared.</summary>
    protected abstract double MinimumLre { get; }

    /// <summary>The smallest LRE accepted for the estimates, where a dataset is known to fall short of <see cref="MinimumLre"/>.</summary>
    protected virtual double MinimumEstimateLre => MinimumLre;

    protected StrdFile Dataset => StrdFile.Linear(DatasetFile);

    private FitResult Fit => _fit ??= FitDataset();

    [Fact]
    public void The_model_has_the_certified_parameters_and_degrees_of_freedom()
    {
        Assert.Equal(Dataset.Parameters.Length, Fit.ParameterCount);
        foreach (var parameter in Dataset.Parameters)
        {
            Assert.True(IndexOf(parameter) >= 0, DatasetFile + ": the model has no parameter for " + parameter.Name + ".");
        }

        Assert.Equal(Dataset.ResidualDegreesOfFreedom, Fit.DegreesOfFreedom);
    }

    [Fact]
    public void Every_estimate_matches_the_certified_value() =>
        AssertAll("estimate", MinimumEstimateLre, Dataset.Parameters.Select(p => Score(p.Name, Fit.Estimates[IndexOf(p)], p.Estimate, ParameterSize(p))));

    [Fact]
    public void Every_standard_deviation_matches_the_certified_value() =>
        AssertAll("standard deviation", Dataset.Parameters.Select(p => Score(p.Name, Fit.StandardError(IndexOf(p)), p.StandardDeviation, ParameterSize(p))));

    [Fact]
    public void The_residual_sd_matches_the_certified_value() =>
        AssertAll("residual SD", [Score("s", Fit.ResidualSd, Dataset.ResidualSd, MaxAbs(Dataset.Y))]);

    [Fact]
    public void R_squared_matches_the_certified_value() =>
        AssertAll("R-squared", [Score("R2", Fit.RSquared, Dataset.RSquared, 1.0)]);

    /// <summary>The model's name of a certified parameter: offset, gain, c2 ... for the polynomial files.</summary>
    protected virtual string ParameterName(StrdParameter parameter) => Polynomial.NameOfPower(parameter.Power);

    /// <summary>The size a coefficient of x^k needs to move y by max|y|: max|y| / max|x|^k (files of one predictor).</summary>
    protected virtual double ParameterSize(StrdParameter parameter) =>
        MaxAbs(Dataset.Y) / Math.Pow(MaxAbs(Dataset.X), parameter.Power);

    protected static double MaxAbs(ImmutableArray<double> values) => values.Max(Math.Abs);

    private FitResult FitDataset()
    {
        var result = LeastSquaresFitter.Fit(Model, new FitData(Dataset.Predictors, Dataset.Y) { SourceName = DatasetFile });
        Assert.True(result.IsSuccess, DatasetFile + ": the fit failed: " + string.Join("; ", result.Problems.Select(p => p.ToString())));
        return result.Value;
    }

    private int IndexOf(StrdParameter parameter) => Fit.IndexOf(ParameterName(parameter));

    private static Scored Score(string name, double estimate, double certified, double sizeIfZero)
    {
        var lre = certified == 0
            ? LogRelativeError.AgainstZero(estimate, sizeIfZero)
            : LogRelativeError.Of(estimate, certified);
        return new Scored(name, estimate, certified, lre);
    }

    private void AssertAll(string quantity, IEnumerable<Scored> scores) => AssertAll(quantity, MinimumLre, scores);

    private void AssertAll(string quantity, double required, IEnumerable<Scored> scores)
    {
        var rows = scores.ToList();
        var table = new StringBuilder();
        foreach (var row in rows)
        {
            table.Append(CultureInfo.InvariantCulture, $"{DatasetFile} {quantity} {row.Name}: {LogRelativeError.Describe(row.Estimate, row.Certified, row.Lre)}")
                 .Append(row.Certified == 0 ? " (certified 0: scored against the quantity's size)" : string.Empty)
                 .AppendLine();
        }

        var minimum = rows.Min(r => r.Lre);
        table.Append(CultureInfo.InvariantCulture, $"{DatasetFile} {quantity}: minimum LRE {minimum:F2}, required {required:F1}");
        _output.WriteLine(table.ToString());
        var failing = rows.Where(r => !(r.Lre >= required)).ToList();
        Assert.True(
            failing.Count == 0,
            string.Create(CultureInfo.InvariantCulture, $"{DatasetFile}: {failing.Count} {quantity} value(s) below LRE {required:F1}:")
                + Environment.NewLine + table);
    }

    private sealed record Scored(string Name, double Estimate, double Certified, double Lre);
}
