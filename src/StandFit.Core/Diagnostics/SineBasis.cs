using System.Collections.Concurrent;
using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;

namespace StandFit.Core.Diagnostics;

/// <summary>
/// The eigenbasis of T = tridiag(-1, 2, -1) of order m = n - 1: eigenvalues lambda_j = 4 sin^2(j pi / 2n)
/// (ascending) and orthonormal eigenvectors phi_j(i) = sqrt(2/n) sin(i j pi / n), i, j = 1 .. m (the
/// discrete sine basis). One per n, cached: the matrix itself up to n = 256 (a transform is then a
/// dot product per row, four terms at a time), above that a table of sin(k pi / 2n), k = 0 .. 4n - 1
/// (sin(i j pi / n) is entry 2 i j mod 4n).
/// </summary>
internal sealed class SineBasis
{
    private const int MatrixLimit = 256;
    private static readonly ConcurrentDictionary<int, SineBasis> Cache = new();

    private readonly int _n;
    private readonly double[] _table;
    private readonly double[]? _matrix; // row-major m x m, rows padded to a multiple of 4

    private SineBasis(int n)
    {
        _n = n;
        var m = n - 1;
        _table = new double[4 * n];
        for (var k = 0; k < _table.Length; k++)
        {
            _table[k] = Math.Sin(k * Math.PI / (2 * n));
        }

        Lambda = new double[m];
        for (var j = 1; j <= m; j++)
        {
            Lambda[j - 1] = 4 * _table[j] * _table[j];
        }

        if (n <= MatrixLimit)
        {
            Stride = (m + 3) & ~3;
            var norm = Math.Sqrt(2.0 / n);
            _matrix = new double[m * Stride];
            for (var j = 1; j <= m; j++)
            {
                for (var i = 1; i <= m; i++)
                {
                    _matrix[((j - 1) * Stride) + i - 1] = norm * _table[(2 * i * j) % (4 * n)];
                }
            }
        }
    }

    /// <summary>lambda_1 .. lambda_m, ascending.</summary>
    public double[] Lambda { get; }

    private int Stride { get; }

    public static SineBasis Of(int n) => Cache.GetOrAdd(n, static size => new SineBasis(size));

    /// <summary>w_j = phi_j' c for j = 1 .. m.</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public void Transform(ReadOnlySpan<double> c, Span<double> w)
    {
        var m = _n - 1;
        if (_matrix is { } matrix)
        {
            Span<double> padded = stackalloc double[Stride];
            c.CopyTo(padded);
            for (var j = 0; j < m; j++)
            {
                var row = matrix.AsSpan(j * Stride, Stride);
                var sum = Vector256<double>.Zero;
                for (var i = 0; i < Stride; i += 4)
                {
                    sum += Vector256.Create(row.Slice(i, 4)) * Vector256.Create(padded.Slice(i, 4));
                }

                // A fixed order of the four partial sums, the same on every machine.
                w[j] = (sum.GetElement(0) + sum.GetElement(1)) + (sum.GetElement(2) + sum.GetElement(3));
            }

            return;
        }

        var norm = Math.Sqrt(2.0 / _n);
        var period = 4 * _n;
        for (var j = 1; j <= m; j++)
        {
            var total = 0.0;
            var index = 0;
            for (var i = 1; i <= m; i++)
            {
                index += 2 * j;
                if (index >= period)
                {
                    index -= period;
                }

                total += c[i - 1] * _table[index];
            }

            w[j - 1] = norm * total;
        }
    }
}
