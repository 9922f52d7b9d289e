namespace StandFit.Core.Fitting.Nonlinear;

/// <summary>
/// Householder QR with column pivoting, A P = Q R, of an n x p matrix (n &gt;= p) into buffers
/// allocated once, so that one fit can factor its Jacobian at every iteration without allocating.
/// The Householder vectors are kept below the diagonal of the working copy and R on and above it.
/// Pivoting takes, at each step, the remaining column with the largest norm below the current row.
/// </summary>
internal sealed class ReusableQr
{
    private readonly int _n;
    private readonly int _p;
    private readonly double[] _a;         // column-major n x p: R on and above the diagonal, v_k below it (v_k[k] in _vHead)
    private readonly double[] _vHead;     // first element of Householder vector k
    private readonly double[] _vNorm2;    // squared norm of Householder vector k (0: identity)
    private readonly double[] _rDiagonal; // R[k, k]
    private readonly int[] _permutation;

    public ReusableQr(int n, int p)
    {
        if (n < p || p < 1)
        {
            throw new ArgumentException("QR needs n >= p >= 1.");
        }

        _n = n;
        _p = p;
        _a = new double[n * p];
        _vHead = new double[p];
        _vNorm2 = new double[p];
        _rDiagonal = new double[p];
        _permutation = new int[p];
    }

    /// <summary>Column k of R is column <c>Permutation(k)</c> of A.</summary>
    public int Permutation(int k) => _permutation[k];

    /// <summary>R[i, j] for i &lt;= j &lt; p.</summary>
    public double R(int i, int j) => i == j ? _rDiagonal[i] : _a[(j * _n) + i];

    /// <summary>Factorises <paramref name="a"/> (column-major n x p); <paramref name="a"/> is not changed.</summary>
    public void Factor(ReadOnlySpan<double> a)
    {
        a.CopyTo(_a);
        for (var j = 0; j < _p; j++)
        {
            _permutation[j] = j;
        }

        for (var k = 0; k < _p; k++)
        {
            var best = k;
            var bestNorm = -1.0;
            for (var j = k; j < _p; j++)
            {
                var s = SubColumnNorm(j, k);
                if (s > bestNorm)
                {
                    bestNorm = s;
                    best = j;
                }
            }

            if (best != k)
            {
                var ca = _a.AsSpan(best * _n, _n);
                var cb = _a.AsSpan(k * _n, _n);
                for (var i = 0; i < _n; i++)
                {
                    (ca[i], cb[i]) = (cb[i], ca[i]);
                }

                (_permutation[best], _permutation[k]) = (_permutation[k], _permutation[best]);
            }

            var column = _a.AsSpan(k * _n, _n);
            var alpha = bestNorm;
            if (alpha == 0.0)
            {
                _vNorm2[k] = 0.0;
                _vHead[k] = 0.0;
                _rDiagonal[k] = 0.0;
                continue;
            }

            if (column[k] > 0)
            {
                alpha = -alpha;
            }

            var head = column[k] - alpha;
            var vNorm2 = head * head;
            for (var i = k + 1; i < _n; i++)
            {
                vNorm2 += column[i] * column[i];
            }

            _vHead[k] = head;
            _vNorm2[k] = vNorm2;
            _rDiagonal[k] = alpha;
            for (var j = k + 1; j < _p; j++)
            {
                Reflect(k, _a.AsSpan(j * _n, _n));
            }
        }
    }

    /// <summary>Overwrites <paramref name="y"/> (length n) with Q' y.</summary>
    public void ApplyQTranspose(Span<double> y)
    {
        for (var k = 0; k < _p; k++)
        {
            Reflect(k, y);
        }
    }

    /// <summary>Copies R into <paramref name="r"/> (p x p, row-major, zero below the diagonal).</summary>
    public void CopyR(Span<double> r)
    {
        r.Clear();
        for (var i = 0; i < _p; i++)
        {
            for (var j = i; j < _p; j++)
            {
                r[(i * _p) + j] = R(i, j);
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

        var v = _a.AsSpan(k * _n, _n);
        var head = _vHead[k];
        var dot = head * y[k];
        for (var i = k + 1; i < _n; i++)
        {
            dot += v[i] * y[i];
        }

        var scale = 2.0 * dot / norm2;
        y[k] -= scale * head;
        for (var i = k + 1; i < _n; i++)
        {
            y[i] -= scale * v[i];
        }
    }

    /// <summary>The 2-norm of rows <paramref name="fromRow"/>.. of a column, without overflow or underflow.</summary>
    private double SubColumnNorm(int column, int fromRow) => VectorNorm.Of(_a.AsSpan((column * _n) + fromRow, _n - fromRow));
}

/// <summary>Euclidean norms that neither overflow nor underflow.</summary>
internal static class VectorNorm
{
    private const double SafeLow = 1e-150;
    private const double SafeHigh = 1e150;

    public static double Of(ReadOnlySpan<double> values)
    {
        var sum = 0.0;
        var plain = true;
        foreach (var v in values)
        {
            var a = Math.Abs(v);
            if (!(a < SafeHigh) || (a < SafeLow && a != 0))
            {
                plain = false;
                break;
            }

            sum += v * v;
        }

        if (plain)
        {
            return Math.Sqrt(sum);
        }

        var scale = 0.0;
        foreach (var v in values)
        {
            scale = Math.Max(scale, Math.Abs(v));
        }

        if (scale == 0.0 || !double.IsFinite(scale))
        {
            return scale;
        }

        sum = 0.0;
        foreach (var v in values)
        {
            var t = v / scale;
            sum += t * t;
        }

        return scale * Math.Sqrt(sum);
    }
}
