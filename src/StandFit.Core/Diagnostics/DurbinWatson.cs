using System.Runtime.CompilerServices;
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
/// The constant column vanishes under D, so a model of p terms with an intercept leaves G G' of
/// rank r = p - 1 (p without one): in the sine basis C is diag(lambda) less r rank-one terms, the
/// sine transforms of G's surviving columns, and its eigenvalues come from r successive secular
/// equations (<see cref="DiagonalDowndate"/>) in O(r n^2) operations. A straight line with an
/// intercept takes one. Forming C and taking its eigenvalues densely (O(n^3)) is kept as a check.
/// Eigenvalues at or below 1e-10 are dropped, as lmtest does.
/// </para>
/// </summary>
public static class DurbinWatson
{
    private const double EigenvalueFloor = 1e-10;

    /// <summary>The test on the fit's residuals in acquisition order (index order).</summary>
    public static DurbinWatsonResult Compute(IFitResult fit) => Compute(fit, null);

    /// <summary>The test on the fit's residuals taken in <paramref name="order"/> (indices; null: index order).</summary>
    public static DurbinWatsonResult Compute(IFitResult fit, int[]? order) =>
        Compute(fit.WeightedResiduals.AsSpan(), DesignBasis.Of(fit), order);

    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
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

        // With an intercept, C has exactly p - 1 zero eigenvalues and the integral needs no eigenvalue.
        // The columns and their sine transforms live on the stack: no allocation on this path.
        var m = n - 1;
        var p = design.Columns;
        Span<double> kept = m * p <= 4096 ? stackalloc double[m * p] : new double[m * p];
        var count = KeptColumns(design, order, kept);
        if (design.HasConstant && count == p - 1 && count >= 1)
        {
            Span<double> w = m * count <= 4096 ? stackalloc double[m * count] : new double[m * count];
            var poles = SineTransform(kept[..(m * count)], count, n, w);
            var lowerTail = LowRankQuadraticForm.LowerTail(poles, w, count, p - 1, d);
            if (!double.IsNaN(lowerTail))
            {
                return new DurbinWatsonResult(d, lowerTail, DiagnosticMethods.Exact, n - p);
            }
        }

        var eigenvalues = Floor(SineDowndate(Split(kept, count, m), n));
        if (eigenvalues.Length == 0)
        {
            return DurbinWatsonResult.NotApplicable;
        }

        return new DurbinWatsonResult(d, LowerTail(eigenvalues, d), DiagnosticMethods.Exact, eigenvalues.Length);
    }

    /// <summary>
    /// Durbin-Watson within legs (the per-leg order): d_w = sum over the legs of sum (e_t - e_(t-1))^2
    /// between neighbours of one leg in acquisition order, over sum e^2 of all points: the junction
    /// between two legs (the turn at the top of an up/down sweep) is not a difference. With one leg
    /// it is the acquisition-order statistic. Exact one-sided p as for the ordinary test, with A the
    /// within-leg difference matrix D_w'D_w: P(D &lt;= d) = P(sum (mu_i - d) chi2_1 &lt;= 0) over the
    /// n - p eigenvalues mu_i of M A M on the residual space. The non-zero ones are those of
    /// C = D_w M D_w' = T_w - G G' (T_w block tridiagonal, G = D_w Q), taken densely (O(n^3), so only
    /// when a gate asks for this order); the rest are 0 (a leg-constant vector can lie in the
    /// residual space) and are kept, with weight -d.
    /// </summary>
    internal static DurbinWatsonResult WithinLegs(ReadOnlySpan<double> residuals, DesignBasis design, int[][] legs)
    {
        var n = residuals.Length;
        var p = design.Columns;
        var m = 0;
        foreach (var leg in legs)
        {
            m += Math.Max(0, leg.Length - 1);
        }

        if (n < 3 || n <= p || m < 1)
        {
            return DurbinWatsonResult.NotApplicable;
        }

        double numerator = 0, denominator = 0;
        foreach (var e in residuals)
        {
            denominator += e * e;
        }

        foreach (var leg in legs)
        {
            for (var t = 1; t < leg.Length; t++)
            {
                var diff = residuals[leg[t]] - residuals[leg[t - 1]];
                numerator += diff * diff;
            }
        }

        if (!(denominator > 0))
        {
            return DurbinWatsonResult.NotApplicable;
        }

        var d = numerator / denominator;

        // G = D_w Q (m x p, row-major) and C = T_w - G G' (m x m, row-major).
        var g = new double[m * p];
        var c = new double[m * m];
        var row = 0;
        foreach (var leg in legs)
        {
            var first = row;
            for (var t = 1; t < leg.Length; t++, row++)
            {
                for (var j = 0; j < p; j++)
                {
                    g[(row * p) + j] = design[leg[t], j] - design[leg[t - 1], j];
                }

                c[(row * m) + row] = 2.0;
                if (row > first)
                {
                    c[(row * m) + row - 1] = -1.0;
                    c[((row - 1) * m) + row] = -1.0;
                }
            }
        }

        for (var a = 0; a < m; a++)
        {
            for (var b = 0; b <= a; b++)
            {
                var sum = 0.0;
                for (var j = 0; j < p; j++)
                {
                    sum += g[(a * p) + j] * g[(b * p) + j];
                }

                c[(a * m) + b] -= sum;
                if (b != a)
                {
                    c[(b * m) + a] -= sum;
                }
            }
        }

        var values = SymmetricEigen.Values(c, m);
        var nonZero = 0;
        foreach (var v in values)
        {
            nonZero += v > EigenvalueFloor ? 1 : 0;
        }

        var count = Math.Max(nonZero, n - p);
        var eigenvalues = new double[count];
        var k = 0;
        foreach (var v in values)
        {
            if (v > EigenvalueFloor)
            {
                eigenvalues[k++] = v;
            }
        }

        return new DurbinWatsonResult(d, LowerTail(eigenvalues, d), DiagnosticMethods.Exact, count);
    }

    /// <summary>P(D &lt;= d) for a design with an intercept, by the integral without eigenvalues (NaN where it does not apply; a check for the tests).</summary>
    internal static double LowerTailWithoutEigenvalues(DesignBasis design, int[]? order, double d, bool vectorised)
    {
        var (columns, _) = KeptColumns(design, order);
        var (poles, z) = SineTransform(columns, design.Rows);
        return LowRankQuadraticForm.LowerTail(poles, z, columns.Count, design.Columns - 1, d, vectorised);
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
        var (columns, m) = KeptColumns(design, order);
        return Floor(dense ? DenseDowndate(columns, m) : SineDowndate(columns, design.Rows));
    }

    private static double[] Floor(double[] values) => [.. values.Where(v => v > EigenvalueFloor).Order()];

    /// <summary>The columns c of G = D Q (rows in <paramref name="order"/>) whose outer products sum to G G', those D does not annihilate; and m = n - 1.</summary>
    internal static (List<double[]> Columns, int M) KeptColumns(DesignBasis design, int[]? order)
    {
        var m = design.Rows - 1;
        var kept = new double[m * design.Columns];
        return (Split(kept, KeptColumns(design, order, kept), m), m);
    }

    /// <summary>
    /// The kept columns of <see cref="KeptColumns(DesignBasis, int[])"/> written to
    /// <paramref name="kept"/> (column-major, m x p, the first of them used); their number.
    /// G = D Q (rows in order), its Gram matrix G'G, and the directions that survive D: the
    /// eigenvectors of G'G whose eigenvalues are not negligible, mapped back by G.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    internal static int KeptColumns(DesignBasis design, int[]? order, Span<double> kept)
    {
        var n = design.Rows;
        var p = design.Columns;
        var m = n - 1;
        Span<double> g = m * p <= 4096 ? stackalloc double[m * p] : new double[m * p]; // column-major
        for (var j = 0; j < p; j++)
        {
            for (var i = 0; i < m; i++)
            {
                var next = order is null ? i + 1 : order[i + 1];
                var here = order is null ? i : order[i];
                g[(j * m) + i] = design[next, j] - design[here, j];
            }
        }

        Span<double> gram = stackalloc double[p * p];
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

        Span<double> values = stackalloc double[p];
        Span<double> vectors = stackalloc double[p * p];
        SymmetricEigen.Jacobi(gram, p, values, vectors);
        var largest = double.NegativeInfinity;
        foreach (var v in values)
        {
            largest = Math.Max(largest, v);
        }

        var count = 0;
        for (var k = 0; k < p; k++)
        {
            if (values[k] > 1e-12 * largest && values[k] > 0)
            {
                var column = kept.Slice(count * m, m);
                column.Clear();
                for (var j = 0; j < p; j++)
                {
                    var weight = vectors[(j * p) + k];
                    for (var i = 0; i < m; i++)
                    {
                        column[i] += g[(j * m) + i] * weight;
                    }
                }

                count++;
            }
        }

        return count;
    }

    /// <summary>The first <paramref name="count"/> columns (of length m) of a column-major block, as arrays.</summary>
    private static List<double[]> Split(ReadOnlySpan<double> block, int count, int m)
    {
        var columns = new List<double[]>(count);
        for (var k = 0; k < count; k++)
        {
            columns.Add(block.Slice(k * m, m).ToArray());
        }

        return columns;
    }

    /// <summary>Eigenvalues of T - sum c c' in T's eigenbasis: diag(lambda) less the sine transforms of the columns.</summary>
    private static double[] SineDowndate(List<double[]> columns, int n)
    {
        var (lambda, w) = SineTransform(columns, n);
        return DiagonalDowndate.Eigenvalues(lambda, w, columns.Count);
    }

    /// <summary>T's eigenvalues lambda_j = 4 sin^2(j pi / 2n), ascending, and the columns in T's eigenbasis (column-major m x r).</summary>
    internal static (double[] Lambda, double[] W) SineTransform(List<double[]> columns, int n)
    {
        var m = n - 1;
        var block = new double[m * columns.Count];
        for (var t = 0; t < columns.Count; t++)
        {
            columns[t].CopyTo(block, t * m);
        }

        var w = new double[m * columns.Count];
        return (SineTransform(block, columns.Count, n, w), w);
    }

    /// <summary>The <paramref name="count"/> columns of <paramref name="columns"/> (column-major, m = n - 1 rows) in T's eigenbasis, into <paramref name="w"/>; T's eigenvalues.</summary>
    internal static double[] SineTransform(ReadOnlySpan<double> columns, int count, int n, Span<double> w)
    {
        var m = n - 1;
        var basis = SineBasis.Of(n);
        for (var t = 0; t < count; t++)
        {
            basis.Transform(columns.Slice(t * m, m), w.Slice(t * m, m));
        }

        return basis.Lambda;
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
}
