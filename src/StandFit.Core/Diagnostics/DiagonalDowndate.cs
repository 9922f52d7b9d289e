using System.Runtime.Intrinsics;

namespace StandFit.Core.Diagnostics;

/// <summary>
/// Eigenvalues of a diagonal matrix less a low-rank term, diag(d) - Z Z' (d ascending, Z an m x r
/// matrix given in the eigenbasis of diag(d)), by r successive rank-one downdates. Each downdate
/// diag(d) - z z' has the roots of the secular equation 1 - sum_j z_j^2 / (d_j - mu) = 0 as its
/// eigenvalues, one below d_1 and one between each pair of neighbouring poles (Bunch, Nielsen and
/// Sorensen 1978, Numer. Math. 31: 31-48), found by a safeguarded rational (two-pole) iteration.
/// <para>
/// Before a further column can be taken off, the remaining columns are written in the eigenbasis of
/// the downdated matrix. Its eigenvectors are (diag(d) - mu_i)^-1 z^, with z^ recomputed from the
/// computed roots by Loewner's formula (Gu and Eisenstat 1994, SIAM J. Matrix Anal. Appl. 15:
/// 1266-1276): z^_k^2 = (d_k - mu_k) prod_(i != k) (mu_i - d_k) / (d_i - d_k), so that the vectors are
/// orthogonal to working accuracy however close a root lies to a pole. Poles whose weight is
/// negligible, or that nearly coincide with their neighbour, are deflated first (the neighbour takes
/// their weight through a plane rotation), as LAPACK's dlaed2 does.
/// </para>
/// </summary>
internal static class DiagonalDowndate
{
    /// <summary>A weight below this fraction of the column's norm is negligible: the pole is an eigenvalue as it stands.</summary>
    private const double WeightTolerance = 1e-13;

    /// <summary>Neighbouring poles closer than this (absolute: the spectra here lie in [0, 4]) are merged by a rotation.</summary>
    private const double PoleTolerance = 1e-13;

    /// <summary>
    /// The eigenvalues, ascending, of diag(<paramref name="poles"/>) - Z Z'; Z is column-major
    /// m x <paramref name="rank"/> in <paramref name="columns"/> (destroyed), poles ascending.
    /// </summary>
    public static double[] Eigenvalues(ReadOnlySpan<double> poles, double[] columns, int rank)
    {
        var m = poles.Length;
        var d = poles.ToArray();
        var z = columns;
        for (var s = 0; s < rank; s++)
        {
            var remaining = rank - s - 1;
            (d, z) = Downdate(d, z, m, 0, remaining);
        }

        return d;
    }

    /// <summary>
    /// Takes column <paramref name="column"/> of <paramref name="z"/> off diag(<paramref name="d"/>):
    /// the new poles (ascending) and the <paramref name="remaining"/> later columns in the new
    /// eigenbasis (column-major, from index 0).
    /// </summary>
    private static (double[] Poles, double[] Columns) Downdate(double[] d, double[] z, int m, int column, int remaining)
    {
        var y = z.AsSpan(column * m, m);
        var norm = 0.0;
        foreach (var v in y)
        {
            norm += v * v;
        }

        norm = Math.Sqrt(norm);

        // Deflation: negligible weights, then neighbours that nearly coincide (the later one keeps the combined weight).
        var active = new bool[m];
        var cutoff = WeightTolerance * norm;
        var previous = -1;
        for (var j = 0; j < m; j++)
        {
            if (!(Math.Abs(y[j]) > cutoff))
            {
                continue;
            }

            active[j] = true;
            if (previous >= 0 && d[j] - d[previous] <= PoleTolerance)
            {
                // Rotate the weight of 'previous' into j: [c s; -s c] on rows previous, j of every column.
                var a = y[previous];
                var b = y[j];
                var r = Math.Sqrt((a * a) + (b * b));
                var c = b / r;
                var sn = a / r;
                for (var t = column; t <= column + remaining; t++)
                {
                    var u = z[(t * m) + previous];
                    var w = z[(t * m) + j];
                    z[(t * m) + previous] = (c * u) - (sn * w);
                    z[(t * m) + j] = (sn * u) + (c * w);
                }

                active[previous] = false;
            }

            previous = j;
        }

        var k = 0;
        for (var j = 0; j < m; j++)
        {
            k += active[j] ? 1 : 0;
        }

        var poles = new double[k];
        var weights = new double[k];
        var signs = new double[k];
        var index = new int[k];
        var sumW = 0.0;
        for (int j = 0, a = 0; j < m; j++)
        {
            if (active[j])
            {
                poles[a] = d[j];
                weights[a] = y[j] * y[j];
                signs[a] = y[j] >= 0 ? 1.0 : -1.0;
                index[a] = j;
                sumW += weights[a];
                a++;
            }
        }

        // Roots: mu_i = poles[origin_i] + offset_i, with the offset from the nearer pole (accurate differences).
        var origin = new int[k];
        var offset = new double[k];
        for (var i = 0; i < k; i++)
        {
            (origin[i], offset[i]) = Root(poles, weights, i, sumW);
        }

        // The new poles: the deflated ones as they were, and the roots; the later columns follow them.
        var newPoles = new double[m];
        var newColumns = new double[m * remaining];
        var order = new int[m];
        var roots = 0;
        for (var j = 0; j < m; j++)
        {
            if (!active[j])
            {
                newPoles[j] = d[j];
                for (var t = 0; t < remaining; t++)
                {
                    newColumns[(t * m) + j] = z[((column + 1 + t) * m) + j];
                }
            }
            else
            {
                // The root of active pole number 'roots' lies just below it: it takes that pole's slot.
                newPoles[j] = poles[origin[roots]] + offset[roots];
                roots++;
            }
        }

        if (remaining > 0)
        {
            Rotate(poles, signs, index, origin, offset, z, column, remaining, m, newColumns);
        }

        for (var j = 0; j < m; j++)
        {
            order[j] = j;
        }

        Array.Sort(newPoles, order);
        var sorted = new double[m * remaining];
        for (var t = 0; t < remaining; t++)
        {
            for (var j = 0; j < m; j++)
            {
                sorted[(t * m) + j] = newColumns[(t * m) + order[j]];
            }
        }

        return (newPoles, sorted);
    }

    /// <summary>The later columns' coordinates on the eigenvectors of the active block, into the active slots of <paramref name="into"/>.</summary>
    private static void Rotate(double[] poles, double[] signs, int[] index, int[] origin, double[] offset, double[] z, int column, int remaining, int m, double[] into)
    {
        var k = poles.Length;

        // d_j - mu_i = (d_j - d_origin(i)) - offset_i, without cancellation.
        double Gap(int j, int i) => (poles[j] - poles[origin[i]]) - offset[i];

        // Loewner: z^_j^2 = (d_j - mu_j) prod_(i != j) (mu_i - d_j) / (d_i - d_j).
        var zHat = new double[k];
        for (var j = 0; j < k; j++)
        {
            var product = Gap(j, j);
            for (var i = 0; i < k; i++)
            {
                if (i != j)
                {
                    product *= -Gap(j, i) / (poles[i] - poles[j]);
                }
            }

            zHat[j] = signs[j] * Math.Sqrt(Math.Max(product, 0.0));
        }

        var sums = new double[remaining];
        for (var i = 0; i < k; i++)
        {
            Array.Clear(sums);
            var length = 0.0;
            for (var j = 0; j < k; j++)
            {
                var v = zHat[j] / Gap(j, i);
                length += v * v;
                for (var t = 0; t < remaining; t++)
                {
                    sums[t] += v * z[((column + 1 + t) * m) + index[j]];
                }
            }

            var scale = 1.0 / Math.Sqrt(length);

            // Root i sits in the slot of active pole i (its upper neighbour): see Downdate.
            for (var t = 0; t < remaining; t++)
            {
                into[(t * m) + index[i]] = sums[t] * scale;
            }
        }
    }

    /// <summary>
    /// Root i of 1 - sum_j w_j / (d_j - mu) = 0 (d ascending and distinct, w &gt; 0): in (d_(i-1), d_i),
    /// or in (d_0 - sum w, d_0) for i = 0. Returned as mu = d[origin] + offset, origin the nearer pole.
    /// </summary>
    internal static (int Origin, double Offset) Root(double[] d, double[] w, int i, double sumW)
    {
        var k = d.Length;
        var first = i == 0;

        // Start at the middle of the interval, with the poles measured from d_i; the sign of f there
        // says which pole is nearer the root, and that pole becomes the origin (accurate differences).
        var origin = i;
        var o = d[i];
        var lo = first ? -sumW : d[i - 1] - o;
        var hi = 0.0;
        var tau = first ? -sumW / 2 : lo / 2;
        var (psi, psiPrime, phi, phiPrime) = Sums(d, w, o, i, tau);
        if (!first && 1.0 - psi - phi <= 0)
        {
            // The root lies in the lower half, nearer d_(i-1): measure from there (the sums do not change).
            origin = i - 1;
            var shift = d[i - 1] - o;
            o = d[i - 1];
            tau -= shift;
            lo = 0.0;
            hi = d[i] - o;
        }

        // The poles either side of the root, from the origin.
        var q = d[i] - o;
        var p = first ? 0.0 : d[i - 1] - o;

        for (var iteration = 0; iteration < 100; iteration++)
        {
            if (iteration > 0)
            {
                (psi, psiPrime, phi, phiPrime) = Sums(d, w, o, i, tau);
            }

            // psi: the poles at or below delta[i - 1] (left of the root), phi: those at or above delta[i].
            var f = 1.0 - psi - phi;
            if (Math.Abs(f) <= 16 * double.Epsilon + (4 * k * 1.1102230246251565e-16 * (1.0 + Math.Abs(psi) + Math.Abs(phi))))
            {
                break;
            }

            // f falls in tau: f > 0 means the root lies above tau.
            if (f > 0)
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

            // Model psi = a1 + b1 / (p - t) and phi = a2 + b2 / (q - t) (p, q the poles either side), matched in value and slope.
            double next;
            var b2 = phiPrime * (q - tau) * (q - tau);
            var a2 = phi - (b2 / (q - tau));
            if (first)
            {
                // Only poles to the right: 1 - a2 - b2 / (q - t) = 0.
                var c0 = 1.0 - a2;
                next = c0 > 0 ? q - (b2 / c0) : double.NaN;
            }
            else
            {
                var b1 = psiPrime * (p - tau) * (p - tau);
                var a1 = psi - (b1 / (p - tau));
                var c = 1.0 - a1 - a2;

                // c (p - t)(q - t) - b1 (q - t) - b2 (p - t) = 0, i.e. c t^2 - B t + C = 0.
                var bb = (c * (p + q)) - b1 - b2;
                var cc = (c * p * q) - (b1 * q) - (b2 * p);
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

        return (origin, tau);
    }

    /// <summary>
    /// psi = sum over j &lt; i and phi = sum over j &gt;= i of w_j / ((d_j - o) - tau), with their
    /// derivatives sum w_j / ((d_j - o) - tau)^2: one pass, four poles at a time (the same order of operations on every machine).
    /// </summary>
    private static (double Psi, double PsiPrime, double Phi, double PhiPrime) Sums(double[] d, double[] w, double o, int i, double tau)
    {
        double psi = 0, psiPrime = 0, phi = 0, phiPrime = 0;
        var j = 0;
        var k = d.Length;
        if (k >= 8)
        {
            var origin = Vector256.Create(o);
            var t = Vector256.Create(tau);
            var one = Vector256.Create(1.0);
            var split = Vector256.Create((double)i);
            var index = Vector256.Create(0.0, 1.0, 2.0, 3.0);
            var four = Vector256.Create(4.0);
            var left = Vector256<double>.Zero;
            var leftPrime = Vector256<double>.Zero;
            var right = Vector256<double>.Zero;
            var rightPrime = Vector256<double>.Zero;
            for (; j + 4 <= k; j += 4)
            {
                var r = one / ((Vector256.Create(d.AsSpan(j, 4)) - origin) - t);
                var term = Vector256.Create(w.AsSpan(j, 4)) * r;
                var termPrime = term * r;
                var below = Vector256.LessThan(index, split);
                left += term & below;
                leftPrime += termPrime & below;
                right += Vector256.AndNot(term, below);
                rightPrime += Vector256.AndNot(termPrime, below);
                index += four;
            }

            psi = Add(left);
            psiPrime = Add(leftPrime);
            phi = Add(right);
            phiPrime = Add(rightPrime);
        }

        for (; j < k; j++)
        {
            var r = 1.0 / ((d[j] - o) - tau);
            var term = w[j] * r;
            if (j < i)
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

        return (psi, psiPrime, phi, phiPrime);
    }

    /// <summary>The four lanes summed in a fixed order, the same on every machine.</summary>
    private static double Add(Vector256<double> v) => (v.GetElement(0) + v.GetElement(1)) + (v.GetElement(2) + v.GetElement(3));
}
