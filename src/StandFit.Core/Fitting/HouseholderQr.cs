namespace StandFit.Core.Fitting;

/// <summary>
/// Householder QR with column pivoting of an n x p matrix (n &gt;= p), A P = Q R. Small and dense:
/// the design matrices of a sweep have a few dozen rows and up to eleven columns.
/// Never forms A'A.
/// </summary>
internal sealed class HouseholderQr
{
    private int _n;
    private int _p;
    private double[] _r;          // column-major n x p; R in the upper triangle
    private double[] _v;          // column-major n x p; Householder vector k in rows k..n-1 of column k
    private double[] _vNorm2;     // squared norm of each Householder vector (0: identity)
    private int[] _permutation;   // column k of R is column _permutation[k] of A

    /// <summary>Factorises <paramref name="a"/> (column-major, n x p); <paramref name="a"/> is not changed.</summary>
    public HouseholderQr(ReadOnlySpan<double> a, int n, int p)
    {
        _r = [];
        _v = [];
        _vNorm2 = [];
        _permutation = [];
        Factor(a, n, p);
    }

    /// <summary>A workspace with nothing factorised yet: <see cref="Factor"/> fills it, growing its buffers only when a larger matrix comes.</summary>
    public HouseholderQr()
    {
        _r = [];
        _v = [];
        _vNorm2 = [];
        _permutation = [];
    }

    /// <summary>
    /// Factorises <paramref name="a"/> (column-major, n x p) into this object's buffers, replacing any
    /// earlier factorisation; <paramref name="a"/> is not changed. Allocates only when the buffers are
    /// smaller than n x p.
    /// </summary>
    public void Factor(ReadOnlySpan<double> a, int n, int p)
    {
        if (n < p || a.Length != n * p)
        {
            throw new ArgumentException("QR needs a column-major n x p matrix with n >= p.");
        }

        _n = n;
        _p = p;
        if (_r.Length < n * p)
        {
            _r = new double[n * p];
            _v = new double[n * p];
        }

        if (_vNorm2.Length < p)
        {
            _vNorm2 = new double[p];
            _permutation = new int[p];
        }

        a.CopyTo(_r);
        for (var j = 0; j < p; j++)
        {
            _permutation[j] = j;
        }

        Factorise();
    }

    public int Rows => _n;

    public int Columns => _p;

    /// <summary>R[i, j] for i, j &lt; p (zero below the diagonal).</summary>
    public double R(int i, int j) => i > j ? 0.0 : _r[(j * _n) + i];

    /// <summary>Column k of R is column <c>Permutation(k)</c> of A.</summary>
    public int Permutation(int k) => _permutation[k];

    /// <summary>Overwrites <paramref name="y"/> (length n) with Q' y.</summary>
    public void ApplyQTranspose(Span<double> y)
    {
        for (var k = 0; k < _p; k++)
        {
            Reflect(k, y);
        }
    }

    /// <summary>Overwrites <paramref name="y"/> (length n) with Q y.</summary>
    public void ApplyQ(Span<double> y)
    {
        for (var k = _p - 1; k >= 0; k--)
        {
            Reflect(k, y);
        }
    }

    /// <summary>Solves R' x = b for x (length p), in place (R' is lower triangular).</summary>
    public void SolveUpperTransposed(Span<double> b)
    {
        for (var i = 0; i < _p; i++)
        {
            var sum = b[i];
            for (var j = 0; j < i; j++)
            {
                sum -= R(j, i) * b[j];
            }

            b[i] = sum / R(i, i);
        }
    }

    /// <summary>The first p columns of Q, column-major n x p.</summary>
    public double[] ThinQ()
    {
        var q = new double[_n * _p];
        ThinQ(q);
        return q;
    }

    /// <summary>The first p columns of Q, column-major n x p, into <paramref name="q"/> (at least n x p long).</summary>
    public void ThinQ(Span<double> q)
    {
        q[..(_n * _p)].Clear();
        for (var j = 0; j < _p; j++)
        {
            q[(j * _n) + j] = 1.0;
        }

        for (var k = _p - 1; k >= 0; k--)
        {
            for (var j = 0; j < _p; j++)
            {
                Reflect(k, q.Slice(j * _n, _n));
            }
        }
    }

    /// <summary>Solves R x = b for x (length p), in place.</summary>
    public void SolveUpper(Span<double> b)
    {
        for (var i = _p - 1; i >= 0; i--)
        {
            var sum = b[i];
            for (var j = i + 1; j < _p; j++)
            {
                sum -= R(i, j) * b[j];
            }

            b[i] = sum / R(i, i);
        }
    }

    /// <summary>R^-1 (p x p, row-major, upper triangular).</summary>
    public double[] InverseR()
    {
        var inverse = new double[_p * _p];
        InverseR(inverse);
        return inverse;
    }

    /// <summary>R^-1 (p x p, row-major, upper triangular) into <paramref name="inverse"/> (at least p x p long).</summary>
    public void InverseR(Span<double> inverse)
    {
        inverse[..(_p * _p)].Clear();
        for (var col = 0; col < _p; col++)
        {
            for (var i = col; i >= 0; i--)
            {
                var sum = i == col ? 1.0 : 0.0;
                for (var j = i + 1; j <= col; j++)
                {
                    sum -= R(i, j) * inverse[(j * _p) + col];
                }

                inverse[(i * _p) + col] = sum / R(i, i);
            }
        }
    }

    private void Reflect(int k, Span<double> y)
    {
        var norm2 = _vNorm2[k];
        if (norm2 == 0.0)
        {
            return;
        }

        var v = _v.AsSpan(k * _n, _n);
        var dot = 0.0;
        for (var i = k; i < _n; i++)
        {
            dot += v[i] * y[i];
        }

        var scale = 2.0 * dot / norm2;
        for (var i = k; i < _n; i++)
        {
            y[i] -= scale * v[i];
        }
    }

    private void Factorise()
    {
        for (var k = 0; k < _p; k++)
        {
            // Pivot: the remaining column with the largest norm below row k.
            var best = k;
            var bestNorm = -1.0;
            for (var j = k; j < _p; j++)
            {
                var s = SubColumnNorm2(j, k);
                if (s > bestNorm)
                {
                    bestNorm = s;
                    best = j;
                }
            }

            if (best != k)
            {
                SwapColumns(best, k);
            }

            var column = _r.AsSpan(k * _n, _n);
            var alpha = Math.Sqrt(SubColumnNorm2(k, k));
            if (alpha == 0.0)
            {
                _vNorm2[k] = 0.0;
                continue;
            }

            if (column[k] > 0)
            {
                alpha = -alpha;
            }

            var v = _v.AsSpan(k * _n, _n);
            var vNorm2 = 0.0;
            for (var i = k; i < _n; i++)
            {
                v[i] = column[i];
            }

            v[k] -= alpha;
            for (var i = k; i < _n; i++)
            {
                vNorm2 += v[i] * v[i];
            }

            _vNorm2[k] = vNorm2;
            column[k] = alpha;
            for (var i = k + 1; i < _n; i++)
            {
                column[i] = 0.0;
            }

            for (var j = k + 1; j < _p; j++)
            {
                Reflect(k, _r.AsSpan(j * _n, _n));
            }
        }
    }

    private double SubColumnNorm2(int column, int fromRow)
    {
        var c = _r.AsSpan(column * _n, _n);
        var scale = 0.0;
        for (var i = fromRow; i < _n; i++)
        {
            scale = Math.Max(scale, Math.Abs(c[i]));
        }

        if (scale == 0.0)
        {
            return 0.0;
        }

        var sum = 0.0;
        for (var i = fromRow; i < _n; i++)
        {
            var t = c[i] / scale;
            sum += t * t;
        }

        return sum * scale * scale;
    }

    private void SwapColumns(int a, int b)
    {
        var ca = _r.AsSpan(a * _n, _n);
        var cb = _r.AsSpan(b * _n, _n);
        for (var i = 0; i < _n; i++)
        {
            (ca[i], cb[i]) = (cb[i], ca[i]);
        }

        (_permutation[a], _permutation[b]) = (_permutation[b], _permutation[a]);
    }
}
