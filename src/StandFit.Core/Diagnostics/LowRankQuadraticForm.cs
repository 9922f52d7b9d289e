using System.Numerics;
using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;

namespace StandFit.Core.Diagnostics;

/// <summary>
/// Imhof's integral (<see cref="QuadraticForm"/>) for the weights mu_j - d, mu_j the non-zero
/// eigenvalues of C = diag(lambda) - Z Z' (Z an m x r matrix; C has <c>zeros</c> eigenvalues that
/// are exactly 0), without computing the eigenvalues. The characteristic product is a determinant:
/// <code>
///   prod_(all j) (1 + i u (mu_j - d)) = det(E - i u Z Z') = prod_k e_k * det(I_r - i u Z' E^-1 Z),
///   E = diag(e_k), e_k = 1 + i u (lambda_k - d),
/// </code>
/// and the product over the non-zero eigenvalues is that divided by (1 - i u d)^zeros. The first
/// factor is the product of <see cref="QuadraticForm"/> over the known poles (its argument unwrapped
/// by counting crossings of the negative real axis); the r x r determinant is taken as the product of
/// its LDL' pivots, the ratios of its leading minors, each of which is the characteristic product of
/// one rank-one downdate divided by that of the matrix before it. Because a rank-one downdate's
/// eigenvalues interlace the poles below them, each pivot's argument lies in (-pi, 0]: the principal
/// argument is the unwrapped one, and theta(u) is half the sum of the arguments.
/// <para>
/// The integration range and panels need four figures of the weights, also found without them:
/// their number (m - zeros), the count below zero (Sylvester's inertia: the negative poles lambda_k -
/// d plus the negative pivots of I - Z' (diag(lambda) - d)^-1 Z, less the zeros), the sum of squares
/// (the Frobenius norm of C - d I) and the sum of logarithms (log |det(C - d I)|); the turn of theta
/// over a panel is bounded through Weyl's interlacing, lambda_(j-r) &lt;= mu_j &lt;= lambda_j.
/// The cost per node is O(m r^2), against O(r m^2) to find the eigenvalues first.
/// </para>
/// </summary>
internal static class LowRankQuadraticForm
{
    /// <summary>
    /// P(sum over the non-zero eigenvalues mu of C of (mu - d) chi2_1 &lt; 0); <paramref name="poles"/>
    /// ascending and positive, <paramref name="z"/> column-major m x <paramref name="rank"/>. NaN when
    /// the shortcut does not apply (d on a pole, a singular pivot, or a product that could overflow):
    /// the caller then takes the eigenvalues. Four nodes are taken at a time (Vector256, emulated where
    /// the hardware lacks it, so the value is the same on every machine); the scalar form is the tests' reference.
    /// </summary>
    public static double LowerTail(ReadOnlySpan<double> poles, ReadOnlySpan<double> z, int rank, int zeros, double d) =>
        LowerTail(poles, z, rank, zeros, d, vectorised: true);

    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    internal static double LowerTail(ReadOnlySpan<double> poles, ReadOnlySpan<double> z, int rank, int zeros, double d, bool vectorised)
    {
        var m = poles.Length;
        var count = m - zeros;
        if (count < 1 || rank < 1 || rank > 10 || !(d > 0))
        {
            return double.NaN;
        }

        var pairs = rank * (rank + 1) / 2;
        Span<double> x = m <= 512 ? stackalloc double[m] : new double[m];
        Span<double> zz = m * pairs <= 2048 ? stackalloc double[m * pairs] : new double[m * pairs];
        var negativePoles = 0;
        double sumX2 = 0, cross = 0;
        for (var k = 0; k < m; k++)
        {
            x[k] = poles[k] - d;
            if (x[k] == 0)
            {
                return double.NaN;
            }

            negativePoles += x[k] < 0 ? 1 : 0;
            sumX2 += x[k] * x[k];
            var pair = 0;
            for (var a = 0; a < rank; a++)
            {
                for (var b = a; b < rank; b++)
                {
                    zz[(k * pairs) + pair++] = z[(a * m) + k] * z[(b * m) + k];
                }

                cross += x[k] * zz[(k * pairs) + Pair(a, a, rank)];
            }
        }

        // I - Z' (diag(lambda) - d)^-1 Z and Z'Z (real, symmetric), for the inertia, the determinant and the norm.
        Span<double> shifted = stackalloc double[rank * rank];
        Span<double> gram = stackalloc double[rank * rank];
        for (var a = 0; a < rank; a++)
        {
            for (var b = a; b < rank; b++)
            {
                double s = 0, g = 0;
                var pair = Pair(a, b, rank);
                for (var k = 0; k < m; k++)
                {
                    s += zz[(k * pairs) + pair] / x[k];
                    g += zz[(k * pairs) + pair];
                }

                shifted[(a * rank) + b] = shifted[(b * rank) + a] = (a == b ? 1.0 : 0.0) - s;
                gram[(a * rank) + b] = gram[(b * rank) + a] = g;
            }
        }

        var negativePivots = 0;
        var logDeterminant = 0.0;
        for (var j = 0; j < rank; j++)
        {
            var pivot = shifted[(j * rank) + j];
            if (pivot == 0 || !double.IsFinite(pivot))
            {
                return double.NaN;
            }

            negativePivots += pivot < 0 ? 1 : 0;
            logDeterminant += Math.Log(Math.Abs(pivot));
            for (var a = j + 1; a < rank; a++)
            {
                var factor = shifted[(a * rank) + j] / pivot;
                for (var b = j + 1; b < rank; b++)
                {
                    shifted[(a * rank) + b] -= factor * shifted[(j * rank) + b];
                }
            }
        }

        // The zero eigenvalues give the weight -d: negative, and not among the weights.
        var negative = negativePoles + negativePivots - zeros;
        if (negative <= 0)
        {
            return 0.0;
        }

        if (negative >= count)
        {
            return 1.0;
        }

        // sum (mu - d)^2 over all eigenvalues = ||diag(x) - Z Z'||_F^2 = sum x^2 - 2 sum x |z|^2 + ||Z'Z||_F^2.
        var frobenius = 0.0;
        foreach (var g in gram)
        {
            frobenius += g * g;
        }

        var sumSquares = sumX2 - (2 * cross) + frobenius - (zeros * d * d);
        var sumLog = LogAbsProduct(x) + logDeterminant - (zeros * Math.Log(d));
        if (!(sumSquares > 0) || !double.IsFinite(sumLog))
        {
            return double.NaN;
        }

        // Every mu lies in [0, lambda_max]: |mu - d| <= max(lambda_max - d, d).
        var largest = Math.Max(Math.Abs(x[m - 1]), d);
        var scale = 1.0 / Math.Sqrt(sumSquares);
        var logUpper = 2.0 / count * (Math.Log(2.0 / (count * Math.PI * QuadraticForm.TailTolerance)) - (0.5 * sumLog));
        var upper = Math.Max(2 * scale, Math.Min(Math.Exp(logUpper), 1e12 * scale));

        Span<double> starts = stackalloc double[64];
        Span<double> widths = stackalloc double[64];
        Span<int> pieces = stackalloc int[64];
        Span<double> scratch = m <= 512 ? stackalloc double[m] : new double[m];
        var doublings = 0;
        var panels = 0;
        double lo = 0, hi = scale;
        while (lo < upper && panels < QuadraticForm.MaxPanels && doublings < 64)
        {
            var turn = 0.5 * (hi - lo) * TurnBound(x, scratch, rank, zeros, d, lo);
            var n = Math.Max(1, (int)Math.Ceiling(turn / QuadraticForm.RadiansPerPanel));
            starts[doublings] = lo;
            widths[doublings] = (hi - lo) / n;
            pieces[doublings] = n;
            doublings++;
            panels += n;
            lo = hi;
            hi *= 2;
        }

        var (gaussNodes, gaussWeights) = QuadraticForm.Gauss;
        var order = gaussNodes.Length;
        var total = panels * order;
        var padded = (total + 7) & ~7;
        var u = padded <= 2048 ? stackalloc double[padded] : new double[padded];
        var f = padded <= 2048 ? stackalloc double[padded] : new double[padded];
        var node = 0;
        for (var k = 0; k < doublings; k++)
        {
            for (var piece = 0; piece < pieces[k]; piece++)
            {
                var a = starts[k] + (piece * widths[k]);
                var b = starts[k] + ((piece + 1) * widths[k]);
                var half = (b - a) / 2;
                var mid = (a + b) / 2;
                for (var g = 0; g < order; g++)
                {
                    u[node++] = mid + (half * gaussNodes[g]);
                }
            }
        }

        for (; node < padded; node++)
        {
            u[node] = 1.0;
        }

        // The pole product must stay below 1e150 (no rescaling here): (1 + (max |x| u_max)^2)^(m/2).
        var uMax = u[total - 1];
        var bound = Math.Max(largest, Math.Abs(x[0])) * uMax;
        if ((0.5 * m * Math.Log(1 + (bound * bound))) + 0.35 >= 345)
        {
            return double.NaN;
        }

        if (vectorised)
        {
            switch (rank)
            {
                case 1:
                    IntegrandsRankOne(x, zz, zeros, d, u, f);
                    break;
                case 2:
                    IntegrandsRankTwo(x, zz, zeros, d, u, f);
                    break;
                default:
                    Integrands(x, zz, rank, zeros, d, u, f);
                    break;
            }
        }
        else
        {
            for (var i = 0; i < total; i++)
            {
                f[i] = Integrand(x, zz, rank, zeros, d, u[i]);
            }
        }

        var integral = 0.0;
        node = 0;
        for (var k = 0; k < doublings; k++)
        {
            for (var piece = 0; piece < pieces[k]; piece++)
            {
                var sum = 0.0;
                for (var g = 0; g < order; g++)
                {
                    sum += gaussWeights[g] * f[node++];
                }

                integral += sum * (widths[k] / 2);
            }
        }

        return Math.Clamp(0.5 - (integral / Math.PI), 0.0, 1.0);
    }

    /// <summary>Index of the pair (a, b), a &lt;= b, in the packed upper triangle.</summary>
    private static int Pair(int a, int b, int rank) => (a * rank) - (a * (a - 1) / 2) + (b - a);

    /// <summary>ln |prod x|, a log per 32 factors.</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static double LogAbsProduct(ReadOnlySpan<double> x)
    {
        var sum = 0.0;
        var product = 1.0;
        for (var k = 0; k < x.Length; k++)
        {
            product *= Math.Abs(x[k]);
            if ((k & 31) == 31)
            {
                sum += Math.Log(product);
                product = 1.0;
            }
        }

        return sum + Math.Log(product);
    }

    /// <summary>
    /// An upper bound of sum_j |mu_j - d| / (1 + (mu_j - d)^2 a^2) over the non-zero eigenvalues:
    /// eigenvalue j (ascending, from 1) lies in [lambda_(j-r), lambda_j] (lambda_i = 0 for i &lt;= 0),
    /// and the zero eigenvalues are the first <paramref name="zeros"/>. <paramref name="x"/> are the
    /// poles less d; <paramref name="g"/> (as long) is scratch for G at each of them, taken once.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static double TurnBound(ReadOnlySpan<double> x, Span<double> g, int rank, int zeros, double d, double a)
    {
        var m = x.Length;
        var k = 0;
        if (Vector256.IsHardwareAccelerated)
        {
            var one = Vector256.Create(1.0);
            var va = Vector256.Create(a);
            for (; k + 4 <= m; k += 4)
            {
                var v = Vector256.Create(x.Slice(k, 4));
                (Vector256.Abs(v) / (one + (v * v * va * va))).CopyTo(g.Slice(k, 4));
            }
        }

        for (; k < m; k++)
        {
            g[k] = G(x[k], a);
        }

        var atZero = G(-d, a);
        var sum = 0.0;
        var peak = a > 0 ? 1.0 / a : double.PositiveInfinity;
        for (var j = zeros + 1; j <= m; j++)
        {
            var lo = (j - rank >= 1 ? x[j - rank - 1] : -d);
            var hi = x[j - 1];
            var best = Math.Max(j - rank >= 1 ? g[j - rank - 1] : atZero, g[j - 1]);
            if ((peak >= lo && peak <= hi) || (-peak >= lo && -peak <= hi))
            {
                best = Math.Max(best, 0.5 * peak);
            }

            sum += best;
        }

        return sum;

        static double G(double v, double a) => Math.Abs(v) / (1 + (v * v * a * a));
    }

    /// <summary>sin(theta(u)) / (u rho(u)) at one node (the reference for <see cref="Integrands"/>).</summary>
    private static double Integrand(ReadOnlySpan<double> x, ReadOnlySpan<double> zz, int rank, int zeros, double d, double u)
    {
        var pairs = rank * (rank + 1) / 2;
        Span<double> sumA = stackalloc double[pairs];
        Span<double> sumB = stackalloc double[pairs];
        double re = 1, im = 0;
        var upper = false;
        var parity = false;
        for (var k = 0; k < x.Length; k++)
        {
            var t = x[k] * u;
            var nre = re - (t * im);
            var nim = im + (t * re);
            var isUpper = nim > 0 || (nim == 0 && nre < 0);
            parity ^= nre < 0 && (upper ^ isUpper);
            upper = isUpper;
            re = nre;
            im = nim;
            var inverse = 1.0 / (1 + (t * t));
            var ti = t * inverse;
            for (var pair = 0; pair < pairs; pair++)
            {
                sumA[pair] += zz[(k * pairs) + pair] * inverse;
                sumB[pair] += zz[(k * pairs) + pair] * ti;
            }
        }

        // W = I - u B - i u A; its LDL' pivots.
        Span<Complex> w = stackalloc Complex[rank * rank];
        for (var a = 0; a < rank; a++)
        {
            for (var b = a; b < rank; b++)
            {
                var pair = Pair(a, b, rank);
                w[(a * rank) + b] = w[(b * rank) + a] = new Complex((a == b ? 1.0 : 0.0) - (u * sumB[pair]), -u * sumA[pair]);
            }
        }

        var modulus = Math.Sqrt((re * re) + (im * im));
        var half = HalfAngle(re, im, modulus);
        if (parity)
        {
            half = -half;
        }

        for (var j = 0; j < rank; j++)
        {
            var pivot = w[(j * rank) + j];
            for (var a = j + 1; a < rank; a++)
            {
                var factor = w[(a * rank) + j] / pivot;
                for (var b = j + 1; b < rank; b++)
                {
                    w[(a * rank) + b] -= factor * w[(j * rank) + b];
                }
            }

            var pr = pivot.Real;
            var pi = Math.Min(pivot.Imaginary, 0.0);
            var pm = Math.Sqrt((pr * pr) + (pi * pi));
            half *= LowerHalfAngle(pr, pi, pm);
            modulus *= pm;
        }

        var c = Math.Sqrt(1 + (u * d * u * d));
        var cos0 = Math.Sqrt((c + 1) / (2 * c));
        var h0 = new Complex(cos0, u * d / (2 * c * cos0));
        for (var j = 0; j < zeros; j++)
        {
            half *= h0;
            modulus /= c;
        }

        return half.Imaginary / (u * Math.Sqrt(modulus));
    }

    /// <summary>e^(i phi / 2) for the principal argument phi of re + i im, without cancellation.</summary>
    private static Complex HalfAngle(double re, double im, double modulus)
    {
        if (re >= 0)
        {
            var cos = Math.Sqrt((modulus + re) / (2 * modulus));
            return new Complex(cos, im / (2 * modulus * cos));
        }

        var sin = (im >= 0 ? 1.0 : -1.0) * Math.Sqrt((modulus - re) / (2 * modulus));
        return new Complex(Math.Abs(im) / (2 * modulus * Math.Abs(sin)), sin);
    }

    /// <summary>e^(i phi / 2) for the argument phi in (-pi, 0] of re + i im (im &lt;= 0).</summary>
    private static Complex LowerHalfAngle(double re, double im, double modulus)
    {
        if (re >= 0)
        {
            var cos = Math.Sqrt((modulus + re) / (2 * modulus));
            return new Complex(cos, im / (2 * modulus * cos));
        }

        var sin = -Math.Sqrt((modulus - re) / (2 * modulus));
        return new Complex(im / (2 * modulus * sin), sin);
    }

    /// <summary><see cref="Integrand"/> at every node, four nodes at a time.</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static void Integrands(ReadOnlySpan<double> x, ReadOnlySpan<double> zz, int rank, int zeros, double d, ReadOnlySpan<double> nodes, Span<double> values)
    {
        var pairs = rank * (rank + 1) / 2;
        var zero = Vector256<double>.Zero;
        var one = Vector256.Create(1.0);
        var two = Vector256.Create(2.0);
        var signBit = Vector256.Create(-0.0);
        Span<Vector256<double>> sumA = stackalloc Vector256<double>[pairs];
        Span<Vector256<double>> sumB = stackalloc Vector256<double>[pairs];
        Span<Vector256<double>> wr = stackalloc Vector256<double>[rank * rank];
        Span<Vector256<double>> wi = stackalloc Vector256<double>[rank * rank];
        for (var i = 0; i < nodes.Length; i += 4)
        {
            var u = Vector256.Create(nodes.Slice(i, 4));
            var re = one;
            var im = zero;
            var upper = zero;
            var parity = zero;
            sumA.Clear();
            sumB.Clear();
            for (var k = 0; k < x.Length; k++)
            {
                var t = Vector256.Create(x[k]) * u;
                var nre = re - (t * im);
                var nim = im + (t * re);
                var isUpper = Vector256.GreaterThan(nim, zero) | (Vector256.Equals(nim, zero) & Vector256.LessThan(nre, zero));
                parity ^= Vector256.LessThan(nre, zero) & (upper ^ isUpper);
                upper = isUpper;
                re = nre;
                im = nim;
                var inverse = one / (one + (t * t));
                var ti = t * inverse;
                for (var pair = 0; pair < pairs; pair++)
                {
                    var c = Vector256.Create(zz[(k * pairs) + pair]);
                    sumA[pair] += c * inverse;
                    sumB[pair] += c * ti;
                }
            }

            for (var a = 0; a < rank; a++)
            {
                for (var b = a; b < rank; b++)
                {
                    var pair = Pair(a, b, rank);
                    wr[(a * rank) + b] = wr[(b * rank) + a] = (a == b ? one : zero) - (u * sumB[pair]);
                    wi[(a * rank) + b] = wi[(b * rank) + a] = zero - (u * sumA[pair]);
                }
            }

            // The pole product's half angle (principal, then the winding's parity).
            var modulus = Vector256.Sqrt((re * re) + (im * im));
            var (hr, hi) = HalfAngle(re, im, modulus, two, zero);
            hr ^= parity & signBit;
            hi ^= parity & signBit;

            for (var j = 0; j < rank; j++)
            {
                var pr = wr[(j * rank) + j];
                var pi = wi[(j * rank) + j];
                if (j + 1 < rank)
                {
                    // factor = w[a, j] / pivot; w[a, b] -= factor w[j, b].
                    var denominator = (pr * pr) + (pi * pi);
                    for (var a = j + 1; a < rank; a++)
                    {
                        var ar = wr[(a * rank) + j];
                        var ai = wi[(a * rank) + j];
                        var fr = ((ar * pr) + (ai * pi)) / denominator;
                        var fi = ((ai * pr) - (ar * pi)) / denominator;
                        for (var b = j + 1; b < rank; b++)
                        {
                            var br = wr[(j * rank) + b];
                            var bi = wi[(j * rank) + b];
                            wr[(a * rank) + b] -= (fr * br) - (fi * bi);
                            wi[(a * rank) + b] -= (fr * bi) + (fi * br);
                        }
                    }
                }

                pi = Vector256.Min(pi, zero);
                var pm = Vector256.Sqrt((pr * pr) + (pi * pi));
                var (lr, li) = LowerHalfAngle(pr, pi, pm, two, zero);
                (hr, hi) = ((hr * lr) - (hi * li), (hr * li) + (hi * lr));
                modulus *= pm;
            }

            var ud = u * Vector256.Create(d);
            var cz = Vector256.Sqrt(one + (ud * ud));
            var cos0 = Vector256.Sqrt((cz + one) / (two * cz));
            var sin0 = ud / (two * cz * cos0);
            for (var j = 0; j < zeros; j++)
            {
                (hr, hi) = ((hr * cos0) - (hi * sin0), (hr * sin0) + (hi * cos0));
                modulus /= cz;
            }

            (hi / (u * Vector256.Sqrt(modulus))).CopyTo(values.Slice(i, 4));
        }
    }

    /// <summary>
    /// <see cref="Integrands"/> for rank 1 (a straight line with an intercept), eight nodes at a time
    /// in two independent chains of four (the product's recurrence is a chain of dependent
    /// operations: two of them keep the core busy), the sums in registers. Lane by lane the same
    /// operations in the same order as <see cref="Integrands"/>, so the same values bit for bit.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static void IntegrandsRankOne(ReadOnlySpan<double> x, ReadOnlySpan<double> zz, int zeros, double d, ReadOnlySpan<double> nodes, Span<double> values)
    {
        var zero = Vector256<double>.Zero;
        var one = Vector256.Create(1.0);
        var two = Vector256.Create(2.0);
        var signBit = Vector256.Create(-0.0);
        for (var i = 0; i < nodes.Length; i += 8)
        {
            var u0 = Vector256.Create(nodes.Slice(i, 4));
            var u1 = Vector256.Create(nodes.Slice(i + 4, 4));
            Vector256<double> re0 = one, im0 = zero, upper0 = zero, parity0 = zero, sumA0 = zero, sumB0 = zero;
            Vector256<double> re1 = one, im1 = zero, upper1 = zero, parity1 = zero, sumA1 = zero, sumB1 = zero;
            for (var k = 0; k < x.Length; k++)
            {
                var xk = Vector256.Create(x[k]);
                var c = Vector256.Create(zz[k]);
                var t0 = xk * u0;
                var t1 = xk * u1;
                var nre0 = re0 - (t0 * im0);
                var nre1 = re1 - (t1 * im1);
                var nim0 = im0 + (t0 * re0);
                var nim1 = im1 + (t1 * re1);
                var isUpper0 = Vector256.GreaterThan(nim0, zero) | (Vector256.Equals(nim0, zero) & Vector256.LessThan(nre0, zero));
                var isUpper1 = Vector256.GreaterThan(nim1, zero) | (Vector256.Equals(nim1, zero) & Vector256.LessThan(nre1, zero));
                parity0 ^= Vector256.LessThan(nre0, zero) & (upper0 ^ isUpper0);
                parity1 ^= Vector256.LessThan(nre1, zero) & (upper1 ^ isUpper1);
                upper0 = isUpper0;
                upper1 = isUpper1;
                re0 = nre0;
                re1 = nre1;
                im0 = nim0;
                im1 = nim1;
                var inverse0 = one / (one + (t0 * t0));
                var inverse1 = one / (one + (t1 * t1));
                sumA0 += c * inverse0;
                sumA1 += c * inverse1;
                sumB0 += c * (t0 * inverse0);
                sumB1 += c * (t1 * inverse1);
            }

            Finish(re0, im0, parity0, one - (u0 * sumB0), zero - (u0 * sumA0), u0).CopyTo(values.Slice(i, 4));
            Finish(re1, im1, parity1, one - (u1 * sumB1), zero - (u1 * sumA1), u1).CopyTo(values.Slice(i + 4, 4));
        }

        Vector256<double> Finish(Vector256<double> re, Vector256<double> im, Vector256<double> parity, Vector256<double> pr, Vector256<double> pi, Vector256<double> u)
        {
            var modulus = Vector256.Sqrt((re * re) + (im * im));
            var (hr, hi) = HalfAngle(re, im, modulus, two, zero);
            hr ^= parity & signBit;
            hi ^= parity & signBit;
            Pivot(ref hr, ref hi, ref modulus, pr, pi, two, zero);
            return ZeroFactors(hr, hi, modulus, u, zeros, d, one, two);
        }
    }

    /// <summary><see cref="Integrands"/> for rank 2 (a quadratic with an intercept), the sums in registers; the same values bit for bit.</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static void IntegrandsRankTwo(ReadOnlySpan<double> x, ReadOnlySpan<double> zz, int zeros, double d, ReadOnlySpan<double> nodes, Span<double> values)
    {
        var zero = Vector256<double>.Zero;
        var one = Vector256.Create(1.0);
        var two = Vector256.Create(2.0);
        var signBit = Vector256.Create(-0.0);
        for (var i = 0; i < nodes.Length; i += 4)
        {
            var u = Vector256.Create(nodes.Slice(i, 4));
            Vector256<double> re = one, im = zero, upper = zero, parity = zero;
            Vector256<double> a00 = zero, a01 = zero, a11 = zero, b00 = zero, b01 = zero, b11 = zero;
            for (var k = 0; k < x.Length; k++)
            {
                var t = Vector256.Create(x[k]) * u;
                var nre = re - (t * im);
                var nim = im + (t * re);
                var isUpper = Vector256.GreaterThan(nim, zero) | (Vector256.Equals(nim, zero) & Vector256.LessThan(nre, zero));
                parity ^= Vector256.LessThan(nre, zero) & (upper ^ isUpper);
                upper = isUpper;
                re = nre;
                im = nim;
                var inverse = one / (one + (t * t));
                var ti = t * inverse;
                var c00 = Vector256.Create(zz[3 * k]);
                var c01 = Vector256.Create(zz[(3 * k) + 1]);
                var c11 = Vector256.Create(zz[(3 * k) + 2]);
                a00 += c00 * inverse;
                b00 += c00 * ti;
                a01 += c01 * inverse;
                b01 += c01 * ti;
                a11 += c11 * inverse;
                b11 += c11 * ti;
            }

            // W = I - u B - i u A (2 x 2): its two LDL' pivots, as Integrands takes them.
            var w00r = one - (u * b00);
            var w00i = zero - (u * a00);
            var w01r = zero - (u * b01);
            var w01i = zero - (u * a01);
            var w11r = one - (u * b11);
            var w11i = zero - (u * a11);
            var denominator = (w00r * w00r) + (w00i * w00i);
            var fr = ((w01r * w00r) + (w01i * w00i)) / denominator;
            var fi = ((w01i * w00r) - (w01r * w00i)) / denominator;
            w11r -= (fr * w01r) - (fi * w01i);
            w11i -= (fr * w01i) + (fi * w01r);

            var modulus = Vector256.Sqrt((re * re) + (im * im));
            var (hr, hi) = HalfAngle(re, im, modulus, two, zero);
            hr ^= parity & signBit;
            hi ^= parity & signBit;
            Pivot(ref hr, ref hi, ref modulus, w00r, w00i, two, zero);
            Pivot(ref hr, ref hi, ref modulus, w11r, w11i, two, zero);
            ZeroFactors(hr, hi, modulus, u, zeros, d, one, two).CopyTo(values.Slice(i, 4));
        }
    }

    /// <summary>One LDL' pivot's half angle (its argument clamped into (-pi, 0]) and modulus multiplied in.</summary>
    private static void Pivot(ref Vector256<double> hr, ref Vector256<double> hi, ref Vector256<double> modulus, Vector256<double> pr, Vector256<double> pi, Vector256<double> two, Vector256<double> zero)
    {
        pi = Vector256.Min(pi, zero);
        var pm = Vector256.Sqrt((pr * pr) + (pi * pi));
        var (lr, li) = LowerHalfAngle(pr, pi, pm, two, zero);
        (hr, hi) = ((hr * lr) - (hi * li), (hr * li) + (hi * lr));
        modulus *= pm;
    }

    /// <summary>The zero eigenvalues' factors taken out of the half angle and the modulus; the integrand sin(theta) / (u rho).</summary>
    private static Vector256<double> ZeroFactors(Vector256<double> hr, Vector256<double> hi, Vector256<double> modulus, Vector256<double> u, int zeros, double d, Vector256<double> one, Vector256<double> two)
    {
        var ud = u * Vector256.Create(d);
        var cz = Vector256.Sqrt(one + (ud * ud));
        var cos0 = Vector256.Sqrt((cz + one) / (two * cz));
        var sin0 = ud / (two * cz * cos0);
        for (var j = 0; j < zeros; j++)
        {
            (hr, hi) = ((hr * cos0) - (hi * sin0), (hr * sin0) + (hi * cos0));
            modulus /= cz;
        }

        return hi / (u * Vector256.Sqrt(modulus));
    }

    private static (Vector256<double> Cos, Vector256<double> Sin) HalfAngle(Vector256<double> re, Vector256<double> im, Vector256<double> modulus, Vector256<double> two, Vector256<double> zero)
    {
        var rightCos = Vector256.Sqrt((modulus + re) / (two * modulus));
        var rightSin = im / (two * modulus * rightCos);
        var leftSin = Vector256.ConditionalSelect(Vector256.GreaterThanOrEqual(im, zero), Vector256.Create(1.0), Vector256.Create(-1.0)) * Vector256.Sqrt((modulus - re) / (two * modulus));
        var leftCos = Vector256.Abs(im) / (two * modulus * Vector256.Abs(leftSin));
        var right = Vector256.GreaterThanOrEqual(re, zero);
        return (Vector256.ConditionalSelect(right, rightCos, leftCos), Vector256.ConditionalSelect(right, rightSin, leftSin));
    }

    private static (Vector256<double> Cos, Vector256<double> Sin) LowerHalfAngle(Vector256<double> re, Vector256<double> im, Vector256<double> modulus, Vector256<double> two, Vector256<double> zero)
    {
        var rightCos = Vector256.Sqrt((modulus + re) / (two * modulus));
        var rightSin = im / (two * modulus * rightCos);
        var leftSin = zero - Vector256.Sqrt((modulus - re) / (two * modulus));
        var leftCos = im / (two * modulus * leftSin);
        var right = Vector256.GreaterThanOrEqual(re, zero);
        return (Vector256.ConditionalSelect(right, rightCos, leftCos), Vector256.ConditionalSelect(right, rightSin, leftSin));
    }
}
