using System.Collections.Concurrent;
using StandFit.Core.Fitting;

namespace StandFit.Core.Diagnostics;

/// <summary>
/// The Durbin-Watson test: d = sum (e_t - e_(t-1))^2 / sum e_t^2 over the residuals in the given
/// order. <see cref="P"/> is the exact one-sided p-value P(D &lt;= d) under independent normal
/// errors, for the alternative of positive autocorrelation (lmtest::dwtest's default "greater"):
/// small when neighbouring residuals are alike. <see cref="Method"/> is <c>exact</c> (the Imhof
/// integral over the design's own eigenvalues) or <c>notapplicable</c>.
/// </summary>
public sealed record DurbinWatsonResult(double Statistic, double P, string Method, int Eigenvalues)
{
    public bool IsApplicable => Method != DiagnosticMethods.NotApplicable;

    public static DurbinWatsonResult NotApplicable { get; } = new(double.NaN, double.NaN, DiagnosticMethods.NotApplicable, 0);
}

/// <summary>
/// Durbin-Watson with an exact p-value. With e = M u (M the residual maker of the design X), D is
/// the ratio u'MAMu / u'Mu with A the first-difference matrix D'D, so P(D &lt;= d) =
/// P(sum (mu_i - d) chi2_1 &lt;= 0) over the non-zero eigenvalues mu_i of MAM (Durbin and Watson
/// 1950; lmtest::dwtest computes the same probability with Pan's algorithm, here it is Imhof's
/// integral, <see cref="QuadraticForm"/>).
/// <para>
/// The eigenvalues come from C = D M D' = T - G G' ((n-1) x (n-1)), which has the same non-zero
/// eigenvalues as MAM: T = D D' is tridiag(-1, 2, -1), whose eigenvectors are the discrete sine
/// basis (eigenvalues 4 sin^2(j pi / 2n)), and G = D Q with Q an orthonormal basis of the design.
/// The constant column vanishes under D, so a straight line with an intercept leaves a rank-one
/// G G': its eigenvalues are the roots of the secular equation 1 - sum w_j^2 / (lambda_j - mu) = 0,
/// w the sine transform of the one remaining column, found by a safeguarded rational (two-pole)
/// iteration between the poles (Bunch, Nielsen and Sorensen 1978). Other designs form C and take
/// its eigenvalues densely. Eigenvalues at or below 1e-10 are dropped, as lmtest does.
/// </para>
/// </summary>
public static class DurbinWatson
{
    private const double EigenvalueFloor = 1e-10;
    private static readonly ConcurrentDictionary<int, double[]> SineTables = new();

    /// <summary>The test on the fit's residuals in acquisition order (index order).</summary>
    public static DurbinWatsonResult Compute(IFitResult fit) => Compute(fit, null);

    /// <summary>The test on the fit's residuals taken in <paramref name="order"/> (indices; null: index order).</summary>
    public static DurbinWatsonResult Compute(IFitResult fit, int[]? order) =>
        Compute(fit.WeightedResiduals.AsSpan(), DesignBasis.Of(fit), order);

    internal static DurbinWatsonResult Compute(ReadOnlySpan<double> residuals, DesignBasis design, int[]? order)
    {
        var n = residuals.Length;
        if (n < 3 || n <= design.Columns)
        {
            return DurbinWatsonResult.NotApplicable;
        }

        double numerator = 0, denominator = 0;
        var previous = 0.0;
        for (var t = 0; t < n; t++)
        {
            var e = residuals[order is null ? t : order[t]];
            denominator += e * e;
            if (t > 0)
            {
                numerator += (e - previous) * (e - previous);
            }

            previous = e;
        }

        if (!(denominator > 0))
        {
            return DurbinWatsonResult.NotApplicable;
        }

        var d = numerator / denominator;
        var eigenvalues = Eigenvalues(design, order);
        if (eigenvalues.Length == 0)
        {
            return DurbinWatsonResult.NotApplicable;
        }

        return new DurbinWatsonResult(d, LowerTail(eigenvalues, d), DiagnosticMethods.Exact, eigenvalues.Length);
    }

    /// <summary>P(D &lt;= d) for a design with these non-zero eigenvalues of MAM.</summary>
    internal static double LowerTail(ReadOnlySpan<double> eigenvalues, double d)
    {
        Span<double> shifted = eigenvalues.Length <= 512 ? stackalloc double[eigenvalues.Length] : new double[eigenvalues.Length];
        for (var i = 0; i < eigenvalues.Length; i++)
        {
            shifted[i] = eigenvalues[i] - d;
        }

        return QuadraticForm.ProbabilityBelowZero(shifted);
    }

    /// <summary>The non-zero eigenvalues (above 1e-10), ascending, of M A M for the design with its rows in <paramref name="order"/>.</summary>
    internal static double[] Eigenvalues(DesignBasis design, int[]? order, bool dense = false)
    {
        var n = design.Rows;
        var p = design.Columns;
        var m = n - 1;

        // G = D Q (rows in order), then its Gram matrix G'G and the directions that survive D.
        var g = new double[m * p]; // column-major
        for (var j = 0; j < p; j++)
        {
            for (var i = 0; i < m; i++)
            {
                var next = order is null ? i + 1 : order[i + 1];
                var here = order is null ? i : order[i];
                g[(j * m) + i] = design[next, j] - design[here, j];
            }
        }

        var gram = new double[p * p];
        for (var a = 0; a < p; a++)
        {
            for (var b = a; b < p; b++)
            {
                var sum = 0.0;
                for (var i = 0; i < m; i++)
                {
                    sum += g[(a * m) + i] * g[(b * m) + i];
                }

                gram[(a * p) + b] = sum;
                gram[(b * p) + a] = sum;
            }
        }

        var values = new double[p];
        var vectors = new double[p * p];
        SymmetricEigen.Jacobi(gram, p, values, vectors);
        var largest = values.Max();
        var kept = new List<double[]>();
        for (var k = 0; k < p; k++)
        {
            if (values[k] > 1e-12 * largest && values[k] > 0)
            {
                var column = new double[m];
                for (var j = 0; j < p; j++)
                {
                    var weight = vectors[(j * p) + k];
                    for (var i = 0; i < m; i++)
                    {
                        column[i] += g[(j * m) + i] * weight;
                    }
                }

                kept.Add(column);
            }
        }

        var all = kept.Count == 1 && !dense ? RankOneDowndate(kept[0], n) : DenseDowndate(kept, m);
        return [.. all.Where(v => v > EigenvalueFloor).Order()];
    }

    /// <summary>Eigenvalues of T - c c' by forming the matrix.</summary>
    private static double[] DenseDowndate(List<double[]> columns, int m)
    {
        var c = new double[m * m];
        for (var i = 0; i < m; i++)
        {
            c[(i * m) + i] = 2.0;
            if (i + 1 < m)
            {
                c[(i * m) + i + 1] = -1.0;
                c[((i + 1) * m) + i] = -1.0;
            }
        }

        foreach (var column in columns)
        {
            for (var i = 0; i < m; i++)
            {
                for (var j = 0; j < m; j++)
                {
                    c[(i * m) + j] -= column[i] * column[j];
                }
            }
        }

        return SymmetricEigen.Values(c, m);
    }

    /// <summary>Eigenvalues of T - c c' (T = tridiag(-1, 2, -1) of order n - 1) from the secular equation.</summary>
    private static double[] RankOneDowndate(double[] c, int n)
    {
        var m = n - 1;
        var sines = SineTable(n);
        var norm = Math.Sqrt(2.0 / n);

        // w_j = phi_j' c, phi_j(i) = sqrt(2/n) sin(i j pi / n); lambda_j = 4 sin^2(j pi / 2n).
        // The table holds sin(k pi / 2n), k = 0 .. 4n - 1: sin(i j pi / n) is entry 2 i j mod 4n.
        var w = new double[m];
        var lambda = new double[m];
        var total = 0.0;
        var period = 4 * n;
        for (var j = 1; j <= m; j++)
        {
            var sum = 0.0;
            var index = 0;
            for (var i = 1; i <= m; i++)
            {
                index += 2 * j;
                if (index >= period)
                {
                    index -= period;
                }

                sum += c[i - 1] * sines[index];
            }

            w[j - 1] = norm * sum;
            lambda[j - 1] = 4 * sines[j] * sines[j];
            total += w[j - 1] * w[j - 1];
        }

        // Deflation: a pole whose weight is negligible is an eigenvalue of C as it stands.
        var result = new List<double>(m);
        var poles = new List<double>(m);
        var weights = new List<double>(m);
        var cutoff = 1e-13 * Math.Sqrt(total);
        for (var j = 0; j < m; j++)
        {
            if (Math.Abs(w[j]) <= cutoff)
            {
                result.Add(lambda[j]);
            }
            else
            {
                poles.Add(lambda[j]);
                weights.Add(w[j] * w[j]);
            }
        }

        result.AddRange(SecularRootsOfDowndate(poles, weights));
        return [.. result];
    }

    /// <summary>
    /// The roots mu of 1 - sum z_j / (lambda_j - mu) = 0 (z_j &gt; 0, lambda ascending and distinct):
    /// one below lambda_1 and one between each pair of neighbouring poles. Solved as the update
    /// problem 1 + sum z_j / (d_j - nu) = 0 with d = -lambda, nu = -mu.
    /// </summary>
    internal static IEnumerable<double> SecularRootsOfDowndate(List<double> lambda, List<double> z)
    {
        var k = lambda.Count;
        var d = new double[k];
        var weights = new double[k];
        var sumZ = 0.0;
        for (var j = 0; j < k; j++)
        {
            d[j] = -lambda[k - 1 - j];
            weights[j] = z[k - 1 - j];
            sumZ += weights[j];
        }

        var roots = new double[k];
        var delta = new double[k];
        for (var i = 0; i < k; i++)
        {
            roots[i] = -UpdateRoot(d, weights, i, sumZ, delta);
        }

        return roots;
    }

    /// <summary>The root of 1 + sum z_j / (d_j - nu) in (d_i, d_(i+1)), or in (d_(k-1), d_(k-1) + sum z) for the last.</summary>
    private static double UpdateRoot(double[] d, double[] z, int i, double sumZ, double[] delta)
    {
        var k = d.Length;
        var last = i == k - 1;
        var gap = last ? sumZ : d[i + 1] - d[i];

        // Origin at the nearer pole: the sign of the function at the middle says which.
        var origin = d[i];
        if (!last)
        {
            var mid = d[i] + (gap / 2);
            var f = 1.0;
            for (var j = 0; j < k; j++)
            {
                f += z[j] / (d[j] - mid);
            }

            if (f < 0)
            {
                origin = d[i + 1];
            }
        }

        for (var j = 0; j < k; j++)
        {
            delta[j] = d[j] - origin;
        }

        // tau in (lo, hi): the poles delta[i] and delta[i + 1] (or delta[i] + sum z for the last root).
        var lo = delta[i];
        var hi = last ? delta[i] + sumZ : delta[i + 1];
        var tau = origin == d[i] ? lo + ((hi - lo) / 4) : hi - ((hi - lo) / 4);
        for (var iteration = 0; iteration < 100; iteration++)
        {
            double psi = 0, psiPrime = 0, phi = 0, phiPrime = 0;
            for (var j = 0; j < k; j++)
            {
                var r = 1.0 / (delta[j] - tau);
                var term = z[j] * r;
                if (j <= i)
                {
                    psi += term;
                    psiPrime += term * r;
                }
                else
                {
                    phi += term;
                    phiPrime += term * r;
                }
            }

            var f = 1.0 + psi + phi;
            if (Math.Abs(f) <= 16 * double.Epsilon + (4 * k * 1.1102230246251565e-16 * (1.0 + Math.Abs(psi) + Math.Abs(phi))))
            {
                break;
            }

            if (f < 0)
            {
                lo = tau;
            }
            else
            {
                hi = tau;
            }

            if (hi - lo <= 2.2e-16 * Math.Max(Math.Abs(lo), Math.Abs(hi)))
            {
                break;
            }

            // Model psi = a1 + b1 / (p - t) and phi = a2 + b2 / (q - t), matched in value and slope at tau.
            var p = delta[i];
            var b1 = psiPrime * (p - tau) * (p - tau);
            var a1 = psi - (b1 / (p - tau));
            double next;
            if (last)
            {
                var c0 = 1.0 + a1 + phi;
                next = c0 > 0 ? p + (b1 / c0) : double.NaN;
            }
            else
            {
                var q = delta[i + 1];
                var b2 = phiPrime * (q - tau) * (q - tau);
                var a2 = phi - (b2 / (q - tau));
                var c = 1.0 + a1 + a2;

                // c (p - t)(q - t) + b1 (q - t) + b2 (p - t) = 0, i.e. c t^2 - B t + C = 0.
                var bb = (c * (p + q)) + b1 + b2;
                var cc = (c * p * q) + (b1 * q) + (b2 * p);
                if (c == 0)
                {
                    next = cc / bb;
                }
                else
                {
                    var disc = Math.Max(0, (bb * bb) - (4 * c * cc));
                    var root = Math.Sqrt(disc);
                    var t1 = bb >= 0 ? (bb + root) / (2 * c) : (2 * cc) / (bb - root);
                    var t2 = bb >= 0 ? (2 * cc) / (bb + root) : (bb - root) / (2 * c);
                    next = t1 > lo && t1 < hi ? t1 : t2;
                }
            }

            tau = next > lo && next < hi ? next : (lo + hi) / 2;
        }

        return origin + tau;
    }

    /// <summary>sin(k pi / 2n) for k = 0 .. 4n - 1, cached per n.</summary>
    private static double[] SineTable(int n) => SineTables.GetOrAdd(n, static size =>
    {
        var table = new double[4 * size];
        for (var k = 0; k < table.Length; k++)
        {
            table[k] = Math.Sin(k * Math.PI / (2 * size));
        }

        return table;
    });
}
