namespace StandFit.Core.Fitting;

/// <summary>Singular values of a small square matrix by one-sided Jacobi rotations (accurate to rounding).</summary>
internal static class SingularValues
{
    /// <summary>The 2-norm condition number of a p x p row-major matrix: largest over smallest singular value.</summary>
    public static double ConditionNumber(double[] matrix, int p) => ConditionNumber(matrix, p, new double[p * p]);

    /// <summary>As <see cref="ConditionNumber(double[], int)"/>, working in <paramref name="scratch"/> (at least p x p long) instead of a copy.</summary>
    public static double ConditionNumber(ReadOnlySpan<double> matrix, int p, Span<double> scratch)
    {
        var u = scratch[..(p * p)];
        matrix[..(p * p)].CopyTo(u);
        for (var sweep = 0; sweep < 60; sweep++)
        {
            var rotated = false;
            for (var i = 0; i < p - 1; i++)
            {
                for (var j = i + 1; j < p; j++)
                {
                    double alpha = 0, beta = 0, gamma = 0;
                    for (var k = 0; k < p; k++)
                    {
                        var ui = u[(k * p) + i];
                        var uj = u[(k * p) + j];
                        alpha += ui * ui;
                        beta += uj * uj;
                        gamma += ui * uj;
                    }

                    if (Math.Abs(gamma) <= 1e-15 * Math.Sqrt(alpha * beta) || gamma == 0)
                    {
                        continue;
                    }

                    rotated = true;
                    var zeta = (beta - alpha) / (2 * gamma);
                    var t = Math.Sign(zeta == 0 ? 1 : zeta) / (Math.Abs(zeta) + Math.Sqrt(1 + (zeta * zeta)));
                    var c = 1 / Math.Sqrt(1 + (t * t));
                    var s = c * t;
                    for (var k = 0; k < p; k++)
                    {
                        var ui = u[(k * p) + i];
                        var uj = u[(k * p) + j];
                        u[(k * p) + i] = (c * ui) - (s * uj);
                        u[(k * p) + j] = (s * ui) + (c * uj);
                    }
                }
            }

            if (!rotated)
            {
                break;
            }
        }

        double max = 0, min = double.PositiveInfinity;
        for (var j = 0; j < p; j++)
        {
            var norm = 0.0;
            for (var k = 0; k < p; k++)
            {
                norm += u[(k * p) + j] * u[(k * p) + j];
            }

            norm = Math.Sqrt(norm);
            max = Math.Max(max, norm);
            min = Math.Min(min, norm);
        }

        return min == 0 ? double.PositiveInfinity : max / min;
    }
}
