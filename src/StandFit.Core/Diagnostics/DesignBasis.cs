using System.Runtime.CompilerServices;
using StandFit.Core.Fitting;

namespace StandFit.Core.Diagnostics;

/// <summary>
/// An orthonormal basis Q (n x p) of a fit's design space, by Gram-Schmidt twice on the fit's own
/// centred and scaled basis (the same column space as the natural one, well conditioned). The
/// residual-based tests project with it: M v = v - Q Q' v, taken twice (one reorthogonalisation
/// step is enough to reach working accuracy).
/// </summary>
internal sealed class DesignBasis
{
    private readonly double[] _q; // column-major n x p

    private DesignBasis(double[] q, int rows, int columns, bool hasConstant)
    {
        _q = q;
        Rows = rows;
        Columns = columns;
        HasConstant = hasConstant;
    }

    public int Rows { get; }

    public int Columns { get; }

    /// <summary>True when the constant vector lies in the design space (a model with an intercept).</summary>
    public bool HasConstant { get; }

    /// <summary>Q[i, j].</summary>
    public double this[int row, int column] => _q[(column * Rows) + row];

    /// <summary>The basis of the fit's design: the model's basis functions at the fit's scaled inputs (whitened rows for a weighted fit).</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public static DesignBasis Of(IFitResult fit)
    {
        var n = fit.Count;
        var p = fit.ParameterCount;
        var columns = new double[n * p];
        Span<double> row = stackalloc double[p];
        for (var i = 0; i < n; i++)
        {
            fit.FillDesignRow(i, row);
            for (var j = 0; j < p; j++)
            {
                columns[(j * n) + i] = row[j];
            }
        }

        // Gram-Schmidt in place; the design is filled again for the rare Householder fallback, so no copy is kept.
        if (GramSchmidtTwice(columns, n, p))
        {
            return new DesignBasis(columns, n, p, fit.HasIntercept);
        }

        for (var i = 0; i < n; i++)
        {
            fit.FillDesignRow(i, row);
            for (var j = 0; j < p; j++)
            {
                columns[(j * n) + i] = row[j];
            }
        }

        return Householder(columns, n, p, fit.HasIntercept);
    }

    /// <summary>
    /// An orthonormal basis of the span of the columns (column-major n x p, full column rank; the
    /// array becomes the basis). Gram-Schmidt with one reorthogonalisation per column ("twice is
    /// enough": orthogonal to working accuracy for any numerically full-rank matrix; Giraud, Langou,
    /// Rozloznik and van den Eshof 2005, Numer. Math. 101: 87-100), on columns scaled to unit length
    /// first. The fit's own design is centred and scaled, so it is far from rank-deficient.
    /// </summary>
    public static DesignBasis FromColumns(double[] columns, int n, int p, bool hasConstant)
    {
        var original = columns.ToArray();
        return GramSchmidtTwice(columns, n, p) ? new DesignBasis(columns, n, p, hasConstant) : Householder(original, n, p, hasConstant);
    }

    /// <summary>Gram-Schmidt twice on the columns, in place; false when a column is (nearly) dependent on the earlier ones (the columns are then spoilt).</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static bool GramSchmidtTwice(double[] columns, int n, int p)
    {
        for (var j = 0; j < p; j++)
        {
            var column = columns.AsSpan(j * n, n);
            Normalise(column);
            for (var pass = 0; pass < 2; pass++)
            {
                for (var k = 0; k < j; k++)
                {
                    var basis = columns.AsSpan(k * n, n);
                    var dot = Dot(basis, column);
                    for (var i = 0; i < n; i++)
                    {
                        column[i] -= dot * basis[i];
                    }
                }

                // A column (nearly) dependent on the earlier ones: Householder QR with pivoting instead.
                if (!Normalise(column, pass == 0 ? 1e-8 : 0.5))
                {
                    return false;
                }
            }
        }

        return true;
    }

    /// <summary>The thin Q of the Householder QR (with column pivoting) of the equilibrated columns.</summary>
    private static DesignBasis Householder(double[] columns, int n, int p, bool hasConstant)
    {
        for (var j = 0; j < p; j++)
        {
            _ = Normalise(columns.AsSpan(j * n, n), 0);
        }

        var qr = new HouseholderQr(columns, n, p);
        return new DesignBasis(qr.ThinQ(), n, p, hasConstant);
    }

    private static double Dot(ReadOnlySpan<double> a, ReadOnlySpan<double> b)
    {
        var sum = 0.0;
        for (var i = 0; i < a.Length; i++)
        {
            sum += a[i] * b[i];
        }

        return sum;
    }

    /// <summary>Scales v to unit length; false, leaving v as it is, when its length is not above <paramref name="floor"/> (or is 0).</summary>
    private static bool Normalise(Span<double> v, double floor = 0)
    {
        var norm = Math.Sqrt(Dot(v, v));
        if (!(norm > floor))
        {
            return norm > 0 && floor == 0;
        }

        foreach (ref var x in v)
        {
            x /= norm;
        }

        return true;
    }

    /// <summary>The residual of <paramref name="v"/> after projection on the design space, in place: v - Q Q' v, twice.</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public void RemoveProjection(Span<double> v)
    {
        for (var pass = 0; pass < 2; pass++)
        {
            for (var j = 0; j < Columns; j++)
            {
                var column = _q.AsSpan(j * Rows, Rows);
                var dot = 0.0;
                for (var i = 0; i < Rows; i++)
                {
                    dot += column[i] * v[i];
                }

                for (var i = 0; i < Rows; i++)
                {
                    v[i] -= dot * column[i];
                }
            }
        }
    }

    /// <summary>||Q' v||^2: the squared length of the projection of <paramref name="v"/> on the design space.</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public double ProjectedSquaredNorm(ReadOnlySpan<double> v)
    {
        var sum = 0.0;
        for (var j = 0; j < Columns; j++)
        {
            var column = _q.AsSpan(j * Rows, Rows);
            var dot = 0.0;
            for (var i = 0; i < Rows; i++)
            {
                dot += column[i] * v[i];
            }

            sum += dot * dot;
        }

        return sum;
    }
}
