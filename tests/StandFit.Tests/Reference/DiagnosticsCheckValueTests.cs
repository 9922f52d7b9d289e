using System.Globalization;
using MathNet.Numerics.Distributions;
using StandFit.Core.Diagnostics;
using StandFit.Core.Fitting;
using StandFit.Core.Ingest;
using StandFit.Core.Merit;
using StandFit.Tests.Support;

namespace StandFit.Tests.Reference;

/// <summary>
/// Check values from outside the code: the Durbin-Watson bounds table, closed forms of the
/// quadratic-form distribution, the parabolic-bow values of the non-linearity figures, Chebyshev's
/// alternation for the minimax line, and MathNet's symmetric eigen-decomposition.
/// </summary>
public sealed class DiagnosticsCheckValueTests
{
    // Durbin-Watson bounds at 5 %, one regressor besides the intercept: Savin and White (1977) /
    // Durbin and Watson (1951), as quoted in shared/notes/trade-reference.md.
    public static TheoryData<int, double, double> Bounds => new()
    {
        { 15, 1.077, 1.361 },
        { 20, 1.201, 1.411 },
        { 30, 1.352, 1.489 },
        { 40, 1.442, 1.544 },
        { 50, 1.503, 1.585 },
        { 100, 1.654, 1.694 },
    };

    [Theory]
    [MemberData(nameof(Bounds))]
    public void The_exact_bounds_round_to_the_table_and_bracket_the_exact_five_percent_point_of_every_straight_line_design(int n, double dL, double dU)
    {
        // Durbin and Watson (1950): with the constant and one regressor, the n - 2 eigenvalues of MAM
        // interlace those of A (0 = a_0 < a_1 < ... < a_(n-1), a_j = 4 sin^2(j pi / 2n)) as
        // a_i <= mu_i <= a_(i+1); the bounding distributions take a_1 .. a_(n-2) (dL) and a_2 .. a_(n-1)
        // (dU). Their exact 5 % points must round to the table's three decimals, and the exact 5 %
        // point d* of any design must lie between them; with the table's rounding, P(dL) <= 0.05 <= P(dU)
        // to within half a unit of the third decimal.
        var a = Enumerable.Range(1, n - 1).Select(j => 4 * Math.Pow(Math.Sin(j * Math.PI / (2 * n)), 2)).ToArray();
        var lower = CriticalValue(a[..^1], 0.05);
        var upper = CriticalValue(a[1..], 0.05);
        Assert.True(Math.Abs(lower - dL) <= 0.0005 + 1e-9, string.Create(CultureInfo.InvariantCulture, $"n = {n}: exact dL {lower:F5}, table {dL}"));
        Assert.True(Math.Abs(upper - dU) <= 0.0005 + 1e-9, string.Create(CultureInfo.InvariantCulture, $"n = {n}: exact dU {upper:F5}, table {dU}"));
        foreach (var (design, x) in Designs(n))
        {
            var eigenvalues = DurbinWatson.Eigenvalues(Basis(x), null);
            Assert.Equal(n - 2, eigenvalues.Length);
            var critical = CriticalValue(eigenvalues, 0.05);
            Assert.True(
                critical >= lower - 1e-9 && critical <= upper + 1e-9,
                string.Create(CultureInfo.InvariantCulture, $"n = {n}, {design}: exact 5 % point {critical:F5}, exact bounds [{lower:F5}, {upper:F5}]"));
            Assert.True(DurbinWatson.LowerTail(eigenvalues, dL - 0.0005) <= 0.05, design + ": P(D <= dL) above 5 %");
            Assert.True(DurbinWatson.LowerTail(eigenvalues, dU + 0.0005) >= 0.05, design + ": P(D <= dU) below 5 %");
        }
    }

    [Theory]
    [InlineData(0.25)]
    [InlineData(1.0)]
    [InlineData(3.0)]
    [InlineData(40.0)]
    public void A_difference_of_two_chi_squares_follows_the_cauchy_closed_form(double c)
    {
        // z1^2 - c z2^2 < 0 iff |z1 / z2| < sqrt(c), and z1 / z2 is standard Cauchy: P = (2 / pi) atan(sqrt(c)).
        var p = QuadraticForm.ProbabilityBelowZero([1.0, -c]);
        Assert.Equal(2 / Math.PI * Math.Atan(Math.Sqrt(c)), p, 9);
    }

    [Theory]
    [InlineData(2, 2, 0.5)]
    [InlineData(4, 2, 1.7)]
    [InlineData(10, 7, 0.8)]
    [InlineData(30, 25, 1.1)]
    [InlineData(1, 40, 3.0)]
    public void Equal_weights_give_the_F_distribution(int d1, int d2, double c)
    {
        // (1/d1) chi2_d1 - (c/d2) chi2_d2 < 0 iff F(d1, d2) < c; the reference is MathNet's F CDF.
        var lambda = Enumerable.Repeat(1.0 / d1, d1).Concat(Enumerable.Repeat(-c / d2, d2)).ToArray();
        var expected = FisherSnedecor.CDF(d1, d2, c);
        Assert.True(Math.Abs(QuadraticForm.ProbabilityBelowZero(lambda) - expected) <= 1e-9, string.Create(CultureInfo.InvariantCulture, $"F({d1}, {d2}) at {c}: {expected:R}"));
    }

    [Theory]
    [InlineData(21)]
    [InlineData(201)]
    [InlineData(2001)]
    public void A_parabolic_bow_gives_h_for_the_terminal_line_and_h_over_2_for_the_minimax_line(int setPoints)
    {
        // trade-reference.md, figures of merit (common practice): a pure parabolic bow of sag h gives
        // terminal-based non-linearity h and minimax ("independent") h/2; exact on any grid holding
        // the end points and mid-scale.
        var merit = Bow(setPoints);
        Assert.Equal(100 * Sag / Fso, merit.NonlinearityTerminalPct, 1e-9);
        Assert.Equal(100 * Sag / 2 / Fso, merit.NonlinearityMinimaxPct, 1e-9);
        Assert.Equal(0.0, merit.HysteresisPct); // both legs read alike
    }

    [Fact]
    public void A_parabolic_bow_gives_two_thirds_of_h_against_the_least_squares_line_in_the_dense_limit()
    {
        // trade-reference.md: 2h/3 against the least-squares line, the continuous (dense) limit. On N
        // equally spaced set points the line is the constant mean of the bow, (2h/3)(N - 2)/(N - 1):
        // each grid gives that to 1e-9, and Richardson's extrapolation of the grids N and 2N - 1 (whose
        // error in 1/(N - 1) is exactly linear) gives 2h/3 itself.
        var expected = 100 * 2 * Sag / 3 / Fso;
        foreach (var n in new[] { 201, 2001 })
        {
            Assert.Equal(expected * (n - 2) / (n - 1), Bow(n).NonlinearityLeastSquaresPct, 1e-9);
            var extrapolated = (2 * Bow((2 * n) - 1).NonlinearityLeastSquaresPct) - Bow(n).NonlinearityLeastSquaresPct;
            Assert.Equal(expected, extrapolated, 1e-9);
        }
    }

    [Fact]
    public void The_minimax_line_equioscillates_and_no_pair_of_points_gives_a_narrower_band()
    {
        // Chebyshev's alternation theorem: the best line leaves its largest deviation at three points
        // with alternating signs; and the optimal slope is one of the pairwise slopes (brute force).
        var random = new SplitMix(20261202);
        for (var trial = 0; trial < 200; trial++)
        {
            var n = 3 + random.Next(30);
            var x = Enumerable.Range(0, n).Select(i => i + (0.5 * random.NextDouble())).ToArray();
            var y = x.Select(v => (0.3 * v) + Math.Sin(v * random.NextDouble()) + random.NextDouble()).ToArray();
            var line = StraightLines.Minimax(x, y);
            var deviation = line.MaxDeviation(x, y);
            var brute = double.PositiveInfinity;
            for (var i = 0; i < n; i++)
            {
                for (var j = i + 1; j < n; j++)
                {
                    var slope = (y[j] - y[i]) / (x[j] - x[i]);
                    var r = y.Select((v, k) => v - (slope * x[k])).ToArray();
                    brute = Math.Min(brute, (r.Max() - r.Min()) / 2);
                }
            }

            Assert.Equal(brute, deviation, 1e-12);
            var signs = Enumerable.Range(0, n)
                .Select(i => y[i] - line.At(x[i]))
                .Where(d => Math.Abs(Math.Abs(d) - deviation) <= 1e-9 * Math.Max(1, deviation))
                .Select(Math.Sign)
                .ToList();
            var alternations = signs.Zip(signs.Skip(1)).Count(p => p.First != p.Second);
            Assert.True(alternations >= 2, string.Create(CultureInfo.InvariantCulture, $"trial {trial}: extreme deviations with signs {string.Join(" ", signs)}"));
        }
    }

    [Fact]
    public void Dense_symmetric_eigenvalues_match_MathNet()
    {
        // MathNet.Numerics' symmetric EVD (its managed tred2/tql2) as the outside reference.
        var random = new SplitMix(7);
        foreach (var n in new[] { 1, 2, 3, 5, 10, 40, 120 })
        {
            var a = new double[n * n];
            for (var i = 0; i < n; i++)
            {
                for (var j = 0; j <= i; j++)
                {
                    a[(i * n) + j] = a[(j * n) + i] = random.NextDouble() - 0.5;
                }
            }

            var matrix = MathNet.Numerics.LinearAlgebra.Matrix<double>.Build.Dense(n, n, (i, j) => a[(i * n) + j]);
            var expected = matrix.Evd(MathNet.Numerics.LinearAlgebra.Symmetricity.Symmetric).EigenValues.Select(c => c.Real).Order().ToArray();
            var values = SymmetricEigen.Values((double[])a.Clone(), n);
            for (var k = 0; k < n; k++)
            {
                Assert.Equal(expected[k], values[k], 1e-12);
            }
        }
    }

    [Fact]
    public void The_secular_solution_agrees_with_the_dense_eigenvalues_on_symmetric_and_random_designs()
    {
        // Symmetric designs (equal steps) leave half the sine weights zero: deflation is exercised.
        var random = new SplitMix(11);
        foreach (var n in new[] { 3, 4, 7, 21, 41, 64, 200 })
        {
            foreach (var x in new[]
            {
                Enumerable.Range(0, n).Select(i => (double)i).ToArray(),
                Enumerable.Range(0, n).Select(_ => random.NextDouble()).ToArray(),
                Enumerable.Range(0, n).Select(i => i < (n + 1) / 2 ? i : n - 1 - i + 0.001 * random.NextDouble()).Select(v => (double)v).ToArray(),
            })
            {
                var basis = Basis(x);
                var fast = DurbinWatson.Eigenvalues(basis, null);
                var dense = DurbinWatson.Eigenvalues(basis, null, dense: true);
                Assert.Equal(dense.Length, fast.Length);
                for (var k = 0; k < dense.Length; k++)
                {
                    Assert.Equal(dense[k], fast[k], 1e-11);
                }
            }
        }
    }

    [Fact]
    public void The_successive_downdates_agree_with_the_dense_eigenvalues_for_higher_degrees_and_models_through_zero()
    {
        // Degrees 2 to 5 take 2 to 5 successive rank-one downdates (through zero: one more); equal
        // steps and up/down sweeps deflate poles in one column and not in the next. The reference is
        // the dense eigen-decomposition of C itself.
        var random = new SplitMix(29);
        foreach (var n in new[] { 8, 21, 41, 120 })
        {
            foreach (var x in new[]
            {
                Enumerable.Range(0, n).Select(i => (double)i).ToArray(),
                Enumerable.Range(0, n).Select(_ => random.NextDouble()).ToArray(),
                Enumerable.Range(0, n).Select(i => (double)(i < (n + 1) / 2 ? i : n - 1 - i)).ToArray(),
            })
            {
                foreach (var model in new LinearModel[] { Polynomial.OfDegree(2), Polynomial.OfDegree(3), Polynomial.OfDegree(5), Polynomial.StraightLineThroughZero, Polynomial.OfDegree(2, intercept: false) })
                {
                    if (n <= model.ParameterCount + 1)
                    {
                        continue;
                    }

                    var fit = LeastSquaresFitter.Fit(model, [.. x], [.. x.Select((v, i) => v + Math.Sin(i))]);
                    if (!fit.IsSuccess)
                    {
                        continue; // an up/down sweep of 8 points has too few distinct set points for degree 5
                    }

                    var basis = DesignBasis.Of(fit.Value);
                    var fast = DurbinWatson.Eigenvalues(basis, null);
                    var dense = DurbinWatson.Eigenvalues(basis, null, dense: true);
                    Assert.Equal(dense.Length, fast.Length);
                    for (var k = 0; k < dense.Length; k++)
                    {
                        Assert.True(Math.Abs(dense[k] - fast[k]) <= 1e-11, string.Create(CultureInfo.InvariantCulture, $"n = {n}, {model.Name}: eigenvalue {k + 1} {fast[k]:R}, dense {dense[k]:R}"));
                    }
                }
            }
        }
    }

    [Fact]
    public void The_imhof_integral_four_nodes_at_a_time_is_bit_for_bit_the_scalar_integral()
    {
        // The same operations in the same order on every lane (no fused multiply-add): the vectorised
        // integrand must reproduce the scalar one exactly, on Durbin-Watson spectra and on random weights.
        var random = new SplitMix(31);
        for (var trial = 0; trial < 200; trial++)
        {
            var m = 2 + (trial % 60);
            var shift = 4 * random.NextDouble();
            var lambda = Enumerable.Range(1, m).Select(j => (trial % 2 == 0 ? 4 * Math.Pow(Math.Sin(j * Math.PI / (2 * (m + 1))), 2) : 4 * random.NextDouble()) - shift).ToArray();
            var scalar = QuadraticForm.ProbabilityBelowZero(lambda, vectorised: false);
            var vector = QuadraticForm.ProbabilityBelowZero(lambda, vectorised: true);
            Assert.True(scalar.Equals(vector), string.Create(CultureInfo.InvariantCulture, $"m = {m}, shift {shift:R}: scalar {scalar:R}, vectorised {vector:R}"));
        }
    }

    [Fact]
    public void The_integral_without_eigenvalues_gives_the_p_value_of_the_integral_over_the_eigenvalues()
    {
        // Designs with an intercept, of degree 1 to 5, equal steps, random stimuli and up/down sweeps,
        // in index order and in a shuffled order; d across the range of the statistic. The reference is
        // Imhof's integral over the eigenvalues (themselves checked against R's eigen()).
        var random = new SplitMix(37);
        foreach (var n in new[] { 5, 8, 21, 41, 120 })
        {
            foreach (var x in new[]
            {
                Enumerable.Range(0, n).Select(i => (double)i).ToArray(),
                Enumerable.Range(0, n).Select(_ => random.NextDouble()).ToArray(),
                Enumerable.Range(0, n).Select(i => (i < (n + 1) / 2 ? i : n - 1 - i) + (0.002 * random.NextDouble())).ToArray(),
            })
            {
                foreach (var degree in new[] { 1, 2, 3, 5 })
                {
                    if (n <= degree + 2)
                    {
                        continue;
                    }

                    var fit = LeastSquaresFitter.Fit(Polynomial.OfDegree(degree), [.. x], [.. x.Select((v, i) => v + Math.Sin(i))]);
                    if (!fit.IsSuccess)
                    {
                        continue;
                    }

                    var basis = DesignBasis.Of(fit.Value);
                    var shuffled = Enumerable.Range(0, n).OrderBy(_ => random.NextDouble()).ToArray();
                    foreach (var order in new[] { null, shuffled })
                    {
                        var eigenvalues = DurbinWatson.Eigenvalues(basis, order);
                        foreach (var d in new[] { 0.4, 0.9, 1.3, 1.7, 2.0, 2.3, 2.8, 3.4 })
                        {
                            var expected = DurbinWatson.LowerTail(eigenvalues, d);
                            foreach (var vectorised in new[] { false, true })
                            {
                                var p = DurbinWatson.LowerTailWithoutEigenvalues(basis, order, d, vectorised);
                                Assert.False(double.IsNaN(p), string.Create(CultureInfo.InvariantCulture, $"n = {n}, degree {degree}, d = {d}: the shortcut did not apply"));
                                Assert.True(Math.Abs(p - expected) <= 1e-9, string.Create(CultureInfo.InvariantCulture, $"n = {n}, degree {degree}, d = {d}, vectorised {vectorised}: {p:R}, over the eigenvalues {expected:R}"));
                            }
                        }
                    }
                }
            }
        }
    }

    private const double Sag = 0.08;
    private const double Gain = 0.2;
    private const double Span = 250;
    private const double Fso = Gain * Span;

    /// <summary>An up and a down leg over N equally spaced set points of y = gain x - h 4t(1 - t), t = x / span.</summary>
    private static FiguresOfMerit Bow(int setPoints)
    {
        var x = new List<double>();
        var legs = new List<Leg>();
        for (var i = 0; i < setPoints; i++)
        {
            x.Add(Span * i / (setPoints - 1));
            legs.Add(Leg.Up);
        }

        for (var i = setPoints - 1; i >= 0; i--)
        {
            x.Add(Span * i / (setPoints - 1));
            legs.Add(Leg.Down);
        }

        var y = x.Select(v => (Gain * v) - (Sag * 4 * (v / Span) * (1 - (v / Span)))).ToArray();
        var groups = SetPoints.Group(x.ToArray(), 0);
        Assert.Equal(setPoints, groups.Count);
        return FiguresOfMerit.Compute([.. x], y, [.. legs], groups, 0.001, null)!;
    }

    private static DesignBasis Basis(double[] x)
    {
        var fit = LeastSquaresFitter.Fit(Polynomial.StraightLine, [.. x], [.. x.Select((v, i) => v + Math.Sin(i))]).Value;
        return DesignBasis.Of(fit);
    }

    private static IEnumerable<(string Name, double[] X)> Designs(int n)
    {
        yield return ("equal steps", [.. Enumerable.Range(0, n).Select(i => (double)i)]);
        var up = (n + 1) / 2;
        yield return ("up/down sweep", [.. Enumerable.Range(0, n).Select(i => (double)(i < up ? i : n - 1 - i))]);
        var state = 0.5;
        yield return ("spread points", [.. Enumerable.Range(0, n).Select(_ => state = (state + 0.6180339887498949) % 1.0)]);
    }

    private static double CriticalValue(double[] eigenvalues, double level)
    {
        double lo = 0, hi = 4;
        for (var i = 0; i < 60; i++)
        {
            var mid = (lo + hi) / 2;
            if (DurbinWatson.LowerTail(eigenvalues, mid) < level)
            {
                lo = mid;
            }
            else
            {
                hi = mid;
            }
        }

        return (lo + hi) / 2;
    }
}
