using StandFit.Core.Fitting;

namespace StandFit.Core.Diagnostics;

/// <summary>
/// An orthonormal basis Q (n x p) of a fit's design space, from the Householder QR of the fit's own
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
    public static DesignBasis Of(IFitResult fit)
    {
        var n = fit.Count;
        var p = fit.ParameterCount;
        var columns = new double[n * p];
        var row = new double[p];
        for (var i = 0; i < n; i++)
        {
            fit.FillDesignRow(i, row);
            for (var j = 0; j < p; j++)
            {
                columns[(j * n) + i] = row[j];
            }
        }

        return FromColumns(columns, n, p, fit.HasIntercept);
    }

    /// <summary>An orthonormal basis of the span of the columns (column-major n x p, full column rank).</summary>
    public static DesignBasis FromColumns(double[] columns, int n, int p, bool hasConstant)
    {
        // Equilibrate, so that the QR's pivoting sees columns of equal weight.
        var equilibrated = new double[n * p];
        for (var j = 0; j < p; j++)
        {
            var norm = 0.0;
            for (var i = 0; i < n; i++)
            {
                norm += columns[(j * n) + i] * columns[(j * n) + i];
            }

            norm = norm > 0 ? Math.Sqrt(norm) : 1.0;
            for (var i = 0; i < n; i++)
            {
                equilibrated[(j * n) + i] = columns[(j * n) + i] / norm;
            }
        }

        var qr = new HouseholderQr(equilibrated, n, p);
        return new DesignBasis(qr.ThinQ(), n, p, hasConstant);
    }

    /// <summary>The residual of <paramref name="v"/> after projection on the design space, in place: v - Q Q' v, twice.</summary>
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
