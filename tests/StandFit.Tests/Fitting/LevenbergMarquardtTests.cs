using System.Collections.Immutable;
using StandFit.Core.Fitting.Expressions;
using StandFit.Core.Fitting.Nonlinear;
using StandFit.Core.Problems;
using StandFit.Tests.Reference;
using StandFit.Tests.Support;

namespace StandFit.Tests.Fitting;

/// <summary>
/// How the Levenberg-Marquardt fitter behaves beyond the NIST certified values: every way a fit can
/// fail says so, bounds hold, the statistics are the ones their definitions give, and the search
/// does not allocate per iteration. Reference values are NIST StRD certified values (Misra1a,
/// MGH09) or the parameters synthetic data were made from.
/// </summary>
public sealed class LevenbergMarquardtTests
{
    private static readonly string[] X = ["x"];

    [Fact]
    public void A_search_stopped_by_the_iteration_limit_says_it_did_not_converge()
    {
        // MGH09 from NIST's Start 1 needs hundreds of iterations (docs/accuracy.md).
        var mgh09 = StrdNonlinearCases.Mgh09;
        var fit = Fit(mgh09.Model, mgh09.Dataset.Predictors, mgh09.Response, mgh09.Dataset.Start(1), LevenbergMarquardtOptions.Default with { MaxIterations = 5 });
        Assert.Equal(NonlinearFitStatus.MaxIterations, fit.Status);
        Assert.False(fit.Converged);
        Assert.Equal("max-iterations", fit.StatusCode);
        Assert.Equal(5, fit.Iterations);
        Assert.StartsWith("did not converge", fit.StatusReason, StringComparison.Ordinal);
    }

    [Fact]
    public void A_model_that_is_not_finite_at_the_start_says_so()
    {
        // ln(b2*x) with b2 = -1 and x > 0 is the logarithm of a negative number.
        var model = Parse("b1*ln(b2*x)");
        var fit = Fit(model, [[1.0, 2.0, 3.0, 4.0]], [0.0, 0.7, 1.1, 1.4], [1.0, -1.0]);
        Assert.Equal(NonlinearFitStatus.NonFinite, fit.Status);
        Assert.False(fit.Converged);
        Assert.Equal("non-finite", fit.StatusCode);
        Assert.Equal([1.0, -1.0], fit.Estimates.ToArray());
    }

    [Fact]
    public void Parameters_the_data_cannot_separate_end_as_a_singular_jacobian_without_error_bars()
    {
        // y = b1*b2*x: only the product is determined; the Jacobian columns b2*x and b1*x are parallel.
        var model = Parse("b1*b2*x");
        var x = ImmutableArray.Create(1.0, 2.0, 3.0, 4.0, 5.0);
        var y = ImmutableArray.Create(2.1, 3.9, 6.2, 7.8, 10.1);
        var fit = Fit(model, [x], y, [1.0, 1.0]);
        Assert.Equal(NonlinearFitStatus.SingularJacobian, fit.Status);
        Assert.False(fit.Converged);
        Assert.Equal("singular-jacobian", fit.StatusCode);
        Assert.All(fit.StandardErrors, se => Assert.True(double.IsNaN(se)));
        Assert.True(fit.ConditionNumber > 1e13);
        Assert.StartsWith("no solution with error bars", fit.StatusReason, StringComparison.Ordinal);

        // The product itself is the least-squares slope through zero: sum(xy) / sum(x^2).
        var slope = x.Zip(y, (a, b) => a * b).Sum() / x.Sum(a => a * a);
        Assert.Equal(slope, fit.Estimates[0] * fit.Estimates[1], 10);
    }

    [Fact]
    public void Too_few_points_for_error_bars_is_a_problem_not_a_fit()
    {
        var result = LevenbergMarquardt.Fit(Parse("b1*exp(-b2*x)"), [[1.0, 2.0]], [1.0, 0.5], [1.0, 1.0]);
        Assert.False(result.IsSuccess);
        Assert.Equal(ReasonCodes.FitTooFewPoints.Code, Assert.Single(result.Problems).Code);
    }

    [Fact]
    public void Bounds_that_do_not_bind_change_nothing()
    {
        // NIST StRD Misra1a certified b1 = 2.3894212918E+02, b2 = 5.5015643181E-04.
        var misra = StrdNonlinearCases.Misra1a;
        var free = StrdNonlinearCases.FitFrom(misra, 1);
        var bounded = Fit(misra.Model, misra.Dataset.Predictors, misra.Response, misra.Dataset.Start(1), LevenbergMarquardtOptions.Default with
        {
            LowerBounds = [0.0, 0.0],
            UpperBounds = [1000.0, 1.0],
        });
        Assert.True(bounded.Converged, bounded.StatusReason);
        Assert.Equal([false, false], bounded.AtBound.ToArray());
        Assert.True(LogRelativeError.Of(bounded.Estimates[0], 2.3894212918E+02, 11) >= 9);
        Assert.True(LogRelativeError.Of(bounded.Estimates[1], 5.5015643181E-04, 11) >= 9);
        Assert.True(LogRelativeError.Of(bounded.Estimates[0], free.Estimates[0], 15) >= 9);
    }

    [Fact]
    public void A_bound_that_binds_holds_its_parameter_on_the_bound_and_fits_the_rest()
    {
        // Misra1a's certified b1 is 238.9; held at or below 200, b1 ends on the bound and b2 is the
        // least-squares b2 for b1 = 200 (the fit with b1 fixed at 200, made separately below).
        var misra = StrdNonlinearCases.Misra1a;
        var fit = Fit(misra.Model, misra.Dataset.Predictors, misra.Response, [150.0, 5e-4], LevenbergMarquardtOptions.Default with
        {
            UpperBounds = [200.0, double.PositiveInfinity],
        });
        Assert.True(fit.Converged, fit.StatusReason);
        Assert.Equal([true, false], fit.AtBound.ToArray());
        Assert.Equal(200.0, fit.Estimates[0]);

        var fixedB1 = ExpressionParser.Parse("200*(1-exp[-b2*x])", X).Expression;
        var oneParameter = Fit(fixedB1, misra.Dataset.Predictors, misra.Response, [fit.Start[1]]);
        Assert.True(oneParameter.Converged, oneParameter.StatusReason);
        Assert.True(LogRelativeError.Of(fit.Estimates[1], oneParameter.Estimates[0], 15) >= 8);
    }

    [Fact]
    public void A_start_outside_the_bounds_is_a_bug_of_the_caller()
    {
        var misra = StrdNonlinearCases.Misra1a;
        Assert.Throws<ArgumentException>(() => LevenbergMarquardt.Fit(misra.Model, misra.Dataset.Predictors, misra.Response, misra.Dataset.Start(1), LevenbergMarquardtOptions.Default with
        {
            LowerBounds = [600.0, 0.0],
        }));
    }

    [Fact]
    public void Exact_data_from_a_thermistor_curve_give_back_its_parameters()
    {
        // The Beta equation R(T) = R25 exp(B (1/T - 1/298.15)) with R25 = 10 kOhm and B = 3950 K,
        // sampled from -20 to 100 degC; started 30 % and 10 % off.
        var model = Parse("R25*exp(beta*(1/x - 1/298.15))");
        var temperatures = Enumerable.Range(0, 25).Select(i => 253.15 + (5.0 * i)).ToImmutableArray();
        var resistance = temperatures.Select(t => 10000 * Math.Exp(3950 * ((1 / t) - (1 / 298.15)))).ToImmutableArray();
        var fit = Fit(model, [temperatures], resistance, [7000.0, 4300.0]);
        Assert.True(fit.Converged, fit.StatusReason);
        Assert.True(LogRelativeError.Of(fit.Estimates[0], 10000, 15) >= 12);
        Assert.True(LogRelativeError.Of(fit.Estimates[1], 3950, 15) >= 12);
        Assert.True(fit.ResidualSd <= 1e-9 * 10000);
    }

    [Fact]
    public void The_statistics_follow_their_definitions()
    {
        // Residual = output - fitted; RSS the sum of their squares; s = sqrt(RSS / (n - p));
        // centred R^2 = 1 - RSS / sum (y - mean)^2; the covariance is symmetric with the SEs on its diagonal.
        var fit = StrdNonlinearCases.FitFrom(StrdNonlinearCases.Rat43, 2);
        var n = fit.Count;
        var p = fit.ParameterCount;
        for (var i = 0; i < n; i++)
        {
            Assert.Equal(fit.Output[i] - fit.Fitted[i], fit.Residuals[i], 9);
        }

        Assert.Equal(fit.Residuals.Sum(r => r * r), fit.ResidualSumOfSquares, 6);
        Assert.Equal(n - p, fit.DegreesOfFreedom);
        Assert.Equal(Math.Sqrt(fit.ResidualSumOfSquares / (n - p)), fit.ResidualSd, 12);
        var mean = fit.Output.Average();
        Assert.Equal(1 - (fit.ResidualSumOfSquares / fit.Output.Sum(y => (y - mean) * (y - mean))), fit.RSquared, 12);
        for (var j = 0; j < p; j++)
        {
            Assert.Equal(Math.Sqrt(fit.Covariance[(j * p) + j]), fit.StandardErrors[j]);
            for (var k = 0; k < p; k++)
            {
                Assert.Equal(fit.Covariance[(j * p) + k], fit.Covariance[(k * p) + j], 12);
            }
        }

        Assert.Equal(["b1", "b2", "b3", "b4"], fit.ParameterNames.ToArray());
        Assert.Equal(3, fit.IndexOf("b4"));
        Assert.True(fit.ConditionNumber is > 1 and < 1e6);
    }

    [Fact]
    public void The_search_allocates_nothing_per_iteration()
    {
        // Two searches from MGH09's Start 1 that both stop at their iteration limit (5 and 150
        // iterations) allocate the same: everything is allocated once per fit.
        var mgh09 = StrdNonlinearCases.Mgh09;
        long Allocated(int iterations)
        {
            var options = LevenbergMarquardtOptions.Default with { MaxIterations = iterations };
            LevenbergMarquardt.Fit(mgh09.Model, mgh09.Dataset.Predictors, mgh09.Response, mgh09.Dataset.Start(1), options);
            var before = GC.GetAllocatedBytesForCurrentThread();
            var fit = LevenbergMarquardt.Fit(mgh09.Model, mgh09.Dataset.Predictors, mgh09.Response, mgh09.Dataset.Start(1), options).Value;
            var after = GC.GetAllocatedBytesForCurrentThread();
            Assert.Equal(NonlinearFitStatus.MaxIterations, fit.Status);
            return after - before;
        }

        Assert.Equal(Allocated(5), Allocated(150));
    }

    private static ModelExpression Parse(string text)
    {
        var result = ExpressionParser.Parse(text, X);
        Assert.True(result.IsSuccess, result.Error?.Message);
        return result.Expression;
    }

    private static NonlinearFitResult Fit(ModelExpression model, IReadOnlyList<ImmutableArray<double>> variables, ImmutableArray<double> y, ImmutableArray<double> start, LevenbergMarquardtOptions? options = null)
    {
        var result = LevenbergMarquardt.Fit(model, variables, y, start, options);
        Assert.True(result.IsSuccess, string.Join("; ", result.Problems));
        return result.Value;
    }
}
