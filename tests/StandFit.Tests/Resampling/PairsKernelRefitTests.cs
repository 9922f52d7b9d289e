using System.Collections.Immutable;
using StandFit.Core.Fitting;
using StandFit.Core.Uncertainty.Resampling;

namespace StandFit.Tests.Resampling;

/// <summary>
/// The pairs kernel solves a p x p system (Q'WQ, by LDL' for p = 2 and 3, by Cholesky beyond) on
/// the fit's centred, scaled and orthogonalised basis instead of refitting each resample by QR.
/// This checks it against the QR refit itself: the fitter (<see cref="LeastSquaresFitter"/>: QR with
/// refinement, never normal equations) on the drawn rows of every resample gives the same
/// estimates to within 1e-9 of the parameter's standard error (the boot fixtures of R, which cover
/// the straight line, allow 1e-9 to 1e-10 relative on their figures). The data are a smooth
/// quadratic and cubic with a deterministic wobble in place of noise (common practice for a check
/// of arithmetic, not of statistics).
/// </summary>
public sealed class PairsKernelRefitTests
{
    [Theory]
    [InlineData(2)]
    [InlineData(3)]
    public void Every_pairs_resample_of_the_kernel_matches_a_QR_refit_of_its_drawn_points(int degree)
    {
        const int n = 21;
        const int resamples = 300;
        var x = new double[n];
        var y = new double[n];
        for (var i = 0; i < n; i++)
        {
            x[i] = 250.0 * i / (n - 1);
            y[i] = 0.01 + (0.2 * x[i]) + (2e-6 * x[i] * x[i]) + (0.005 * Math.Sin(3.7 * i));
        }

        var model = Polynomial.OfDegree(degree);
        var fit = LeastSquaresFitter.Fit(model, [.. x], [.. y]).Value;
        var p = model.ParameterCount;
        var identity = new double[p * p];
        for (var j = 0; j < p; j++)
        {
            identity[(j * p) + j] = 1;
        }

        var kernel = new LinearResampler(fit, identity);
        var output = new double[p * resamples];
        var indices = new int[n * resamples];
        var rng = new Xoshiro256StarStar(20261202);
        var counts = kernel.Bootstrap(BootstrapScheme.Pairs, resamples, ref rng, output, indices);
        Assert.Equal(resamples, counts.Succeeded);
        var worst = 0.0;
        for (var r = 0; r < resamples; r++)
        {
            var drawn = indices.AsSpan(r * n, n);
            var xs = ImmutableArray.CreateBuilder<double>(n);
            var ys = ImmutableArray.CreateBuilder<double>(n);
            foreach (var i in drawn)
            {
                xs.Add(x[i]);
                ys.Add(y[i]);
            }

            var refit = LeastSquaresFitter.Fit(model, xs.MoveToImmutable(), ys.MoveToImmutable()).Value;
            for (var j = 0; j < p; j++)
            {
                var gap = Math.Abs(output[(j * resamples) + r] - refit.Estimates[j]) / fit.StandardError(j);
                worst = Math.Max(worst, gap);
            }
        }

        Assert.True(worst <= 1e-9, $"The kernel and the QR refit differ by {worst:E2} standard errors.");
    }
}
