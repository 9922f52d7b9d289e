using System.Runtime.CompilerServices;

namespace StandFit.Core.Diagnostics;

/// <summary>
/// Eigenvalues of real symmetric matrices: cyclic Jacobi rotations (with eigenvectors) for the
/// small p x p matrices of a design, and Householder reduction to tridiagonal form followed by the
/// implicit symmetric QR iteration with Wilkinson shifts (eigenvalues only) for the dense
/// n x n matrices of the Durbin-Watson statistic. Golub and Van Loan, Matrix Computations, 8.3 and 8.5.
/// </summary>
internal static class SymmetricEigen
{
    /// <summary>
    /// Jacobi: <paramref name="a"/> (p x p, row-major, symmetric) is destroyed; on return
    /// <paramref name="values"/> holds the eigenvalues and column k of <paramref name="vectors"/>
    /// (row-major p x p) the eigenvector of value k.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public static void Jacobi(Span<double> a, int p, Span<double> values, Span<double> vectors)
    {
        vectors.Clear();
        for (var i = 0; i < p; i++)
        {
            vectors[(i * p) + i] = 1.0;
        }

        for (var sweep = 0; sweep < 64; sweep++)
        {
            var off = 0.0;
            var diagonal = 0.0;
            for (var i = 0; i < p; i++)
            {
                diagonal += a[(i * p) + i] * a[(i * p) + i];
                for (var j = i + 1; j < p; j++)
                {
                    off += a[(i * p) + j] * a[(i * p) + j];
                }
            }

            if (off <= 1e-32 * diagonal || off == 0)
            {
                break;
            }

            for (var k = 0; k < p - 1; k++)
            {
                for (var l = k + 1; l < p; l++)
                {
                    var akl = a[(k * p) + l];
                    if (akl == 0)
                    {
                        continue;
                    }

                    // The rotation that zeroes a[k, l]: t = tan(angle), the smaller root of t^2 + 2 zeta t - 1 = 0.
                    var zeta = (a[(l * p) + l] - a[(k * p) + k]) / (2 * akl);
                    var t = (zeta >= 0 ? 1.0 : -1.0) / (Math.Abs(zeta) + Math.Sqrt(1 + (zeta * zeta)));
                    var c = 1 / Math.Sqrt(1 + (t * t));
                    var s = t * c;
                    for (var i = 0; i < p; i++)
                    {
                        var aik = a[(i * p) + k];
                        var ail = a[(i * p) + l];
                        a[(i * p) + k] = (c * aik) - (s * ail);
                        a[(i * p) + l] = (s * aik) + (c * ail);
                    }

                    for (var j = 0; j < p; j++)
                    {
                        var akj = a[(k * p) + j];
                        var alj = a[(l * p) + j];
                        a[(k * p) + j] = (c * akj) - (s * alj);
                        a[(l * p) + j] = (s * akj) + (c * alj);
                    }

                    for (var i = 0; i < p; i++)
                    {
                        var vik = vectors[(i * p) + k];
                        var vil = vectors[(i * p) + l];
                        vectors[(i * p) + k] = (c * vik) - (s * vil);
                        vectors[(i * p) + l] = (s * vik) + (c * vil);
                    }
                }
            }
        }

        for (var i = 0; i < p; i++)
        {
            values[i] = a[(i * p) + i];
        }
    }

    /// <summary>The eigenvalues, ascending, of the symmetric n x n matrix <paramref name="a"/> (row-major; destroyed).</summary>
    public static double[] Values(double[] a, int n)
    {
        var d = new double[n];
        var e = new double[n];
        Tridiagonalise(a, n, d, e);
        TridiagonalValues(d, e, n);
        Array.Sort(d);
        return d;
    }

    /// <summary>
    /// Householder reduction of the lower triangle: on return d holds the diagonal and e[0..n-2] the
    /// subdiagonal of a tridiagonal matrix with the same eigenvalues.
    /// </summary>
    private static void Tridiagonalise(double[] a, int n, double[] d, double[] e)
    {
        var v = new double[n];
        var w = new double[n];
        for (var k = 0; k < n - 2; k++)
        {
            // x = a[k+1.., k]; v = x + sign(x0) |x| e1; H = I - 2 v v' / v'v.
            var scale = 0.0;
            for (var i = k + 1; i < n; i++)
            {
                scale = Math.Max(scale, Math.Abs(a[(i * n) + k]));
            }

            if (scale == 0)
            {
                e[k] = 0;
                continue;
            }

            var norm2 = 0.0;
            for (var i = k + 1; i < n; i++)
            {
                v[i] = a[(i * n) + k] / scale;
                norm2 += v[i] * v[i];
            }

            var alpha = Math.Sqrt(norm2);
            if (v[k + 1] < 0)
            {
                alpha = -alpha;
            }

            v[k + 1] += alpha;
            var vv = 0.0;
            for (var i = k + 1; i < n; i++)
            {
                vv += v[i] * v[i];
            }

            e[k] = -alpha * scale;
            var beta = 2.0 / vv;

            // p = beta B v, K = beta v'p / 2, w = p - K v; B -= v w' + w v' (B = a[k+1.., k+1..]).
            var vp = 0.0;
            for (var i = k + 1; i < n; i++)
            {
                var sum = 0.0;
                for (var j = k + 1; j < n; j++)
                {
                    sum += a[(i * n) + j] * v[j];
                }

                w[i] = beta * sum;
                vp += v[i] * w[i];
            }

            var kappa = beta * vp / 2;
            for (var i = k + 1; i < n; i++)
            {
                w[i] -= kappa * v[i];
            }

            for (var i = k + 1; i < n; i++)
            {
                for (var j = k + 1; j < n; j++)
                {
                    a[(i * n) + j] -= (v[i] * w[j]) + (w[i] * v[j]);
                }
            }
        }

        for (var i = 0; i < n; i++)
        {
            d[i] = a[(i * n) + i];
        }

        if (n >= 2)
        {
            e[n - 2] = a[((n - 1) * n) + n - 2];
        }

        e[n - 1] = 0;
    }

    /// <summary>The implicit symmetric QR iteration with Wilkinson shifts on (d, e); the eigenvalues are left in d.</summary>
    private static void TridiagonalValues(double[] d, double[] e, int n)
    {
        var last = n - 1;
        var iterations = 0;
        while (last > 0)
        {
            if (Math.Abs(e[last - 1]) <= 1e-16 * (Math.Abs(d[last - 1]) + Math.Abs(d[last])))
            {
                e[last - 1] = 0;
                last--;
                continue;
            }

            // The unreduced block first..last.
            var first = last - 1;
            while (first > 0 && Math.Abs(e[first - 1]) > 1e-16 * (Math.Abs(d[first - 1]) + Math.Abs(d[first])))
            {
                first--;
            }

            if (++iterations > 60 * n)
            {
                throw new InvalidOperationException("The symmetric QR iteration did not converge.");
            }

            // Wilkinson shift: the eigenvalue of the trailing 2 x 2 block nearer d[last].
            var delta = (d[last - 1] - d[last]) / 2;
            var b2 = e[last - 1] * e[last - 1];
            var shift = d[last] - (b2 / (delta + ((delta >= 0 ? 1.0 : -1.0) * Math.Sqrt((delta * delta) + b2))));

            // Chase the bulge from first to last with Givens rotations.
            var x = d[first] - shift;
            var z = e[first];
            for (var k = first; k < last; k++)
            {
                var r = Math.Sqrt((x * x) + (z * z));
                var c = x / r;
                var s = -z / r;
                if (k > first)
                {
                    e[k - 1] = r;
                }

                // Apply the rotation to rows/columns k, k+1 of the tridiagonal block.
                var dk = d[k];
                var dk1 = d[k + 1];
                var ek = e[k];
                d[k] = (c * c * dk) - (2 * c * s * ek) + (s * s * dk1);
                d[k + 1] = (s * s * dk) + (2 * c * s * ek) + (c * c * dk1);
                e[k] = (c * s * (dk - dk1)) + (((c * c) - (s * s)) * ek);
                if (k < last - 1)
                {
                    x = e[k];
                    z = -s * e[k + 1];
                    e[k + 1] *= c;
                }
            }
        }
    }
}
