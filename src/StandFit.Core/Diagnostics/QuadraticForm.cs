using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;

namespace StandFit.Core.Diagnostics;

/// <summary>
/// The distribution of Q = sum_i lambda_i chi2_1 (independent one-degree chi-squares) at 0, by
/// Imhof's (1961, Biometrika 48: 419-426) inversion of the characteristic function:
/// P(Q &lt; 0) = 1/2 - (1/pi) int_0^inf sin(theta(u)) / (u rho(u)) du, with
/// theta(u) = 1/2 sum atan(lambda_i u) and rho(u) = prod (1 + lambda_i^2 u^2)^(1/4).
/// <para>
/// Both come from one complex product z(u) = prod (1 + i lambda_i u): theta is half its unwrapped
/// argument (the winding is counted as the product crosses the negative real axis, each factor
/// turning it by less than pi/2) and rho the square root of its modulus, so the integrand costs no
/// transcendental function per eigenvalue. The range is cut where Imhof's tail bound
/// (2/m) U^(-m/2) prod |lambda_i|^(-1/2) / pi falls below 1e-10; panels double in length from the
/// scale 1/sqrt(sum lambda^2), each split so that theta turns by at most 6 radians in a panel,
/// with 8-point Gauss-Legendre on each. Checked against R's adaptive integrate() at rel.tol 1e-12
/// (fixtures) and the Durbin-Watson p-values of lmtest::dwtest.
/// </para>
/// </summary>
internal static class QuadraticForm
{
    internal const double TailTolerance = 1e-10;
    internal const double RadiansPerPanel = 8.0;
    internal const int MaxPanels = 4000;
    internal static readonly (double[] Nodes, double[] Weights) Gauss = GaussLegendre(8);

    /// <summary>P(sum lambda_i chi2_1 &lt; 0). Zero weights are dropped.</summary>
    public static double ProbabilityBelowZero(ReadOnlySpan<double> lambda) => ProbabilityBelowZero(lambda, vectorised: true);

    /// <summary>As <see cref="ProbabilityBelowZero(ReadOnlySpan{double})"/>; <paramref name="vectorised"/> evaluates four nodes at a time (the same value, bit for bit).</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    internal static double ProbabilityBelowZero(ReadOnlySpan<double> lambda, bool vectorised)
    {
        var m = 0;
        int positive = 0, negative = 0;
        double sumSquares = 0, sumLog = 0, largest = 0;
        foreach (var l in lambda)
        {
            if (l == 0)
            {
                continue;
            }

            m++;
            _ = l > 0 ? positive++ : negative++;
            sumSquares += l * l;
            sumLog += Math.Log(Math.Abs(l));
            largest = Math.Max(largest, Math.Abs(l));
        }

        if (negative == 0)
        {
            return 0.0;
        }

        if (positive == 0)
        {
            return 1.0;
        }

        Span<double> weights = m <= 512 ? stackalloc double[m] : new double[m];
        var w = 0;
        foreach (var l in lambda)
        {
            if (l != 0)
            {
                weights[w++] = l;
            }
        }

        var scale = 1.0 / Math.Sqrt(sumSquares);
        var logUpper = 2.0 / m * (Math.Log(2.0 / (m * Math.PI * TailTolerance)) - (0.5 * sumLog));
        var upper = Math.Max(2 * scale, Math.Min(Math.Exp(logUpper), 1e12 * scale));

        // The panels: lengths doubling from the scale, each split so that theta turns by at most
        // RadiansPerPanel in a piece (theta turns by at most 1/2 sum |lambda| (b - a) / (1 + lambda^2 a^2) over [a, b]).
        Span<double> starts = stackalloc double[64];
        Span<double> widths = stackalloc double[64];
        Span<int> pieces = stackalloc int[64];
        var doublings = 0;
        var panels = 0;
        double a = 0, b = scale;
        while (a < upper && panels < MaxPanels && doublings < 64)
        {
            var turn = 0.0;
            foreach (var l in weights)
            {
                turn += Math.Abs(l) / (1 + (l * l * a * a));
            }

            turn *= 0.5 * (b - a);
            var count = Math.Max(1, (int)Math.Ceiling(turn / RadiansPerPanel));
            starts[doublings] = a;
            widths[doublings] = (b - a) / count;
            pieces[doublings] = count;
            doublings++;
            panels += count;
            a = b;
            b *= 2;
        }

        // Every node of every piece, then the integrand at all of them.
        var (gaussNodes, gaussWeights) = Gauss;
        var order = gaussNodes.Length;
        var total = panels * order;
        var padded = (total + 3) & ~3;
        var u = padded <= 2048 ? stackalloc double[padded] : new double[padded];
        var f = padded <= 2048 ? stackalloc double[padded] : new double[padded];
        var node = 0;
        for (var k = 0; k < doublings; k++)
        {
            for (var piece = 0; piece < pieces[k]; piece++)
            {
                var lo = starts[k] + (piece * widths[k]);
                var hi = starts[k] + ((piece + 1) * widths[k]);
                var half = (hi - lo) / 2;
                var mid = (lo + hi) / 2;
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

        // The scalar integrand rescales the product once |re| + |im| passes 1e150; the vectorised one
        // does not, so it is used only where sqrt(2) (1 + (max |lambda| u_max)^2)^(m/2) stays below 1e150.
        var uMax = u[total - 1];
        var safe = (0.5 * m * Math.Log(1 + (largest * uMax * largest * uMax))) + 0.35 < 345;
        if (vectorised && safe)
        {
            Integrands(weights, u, f);
        }
        else
        {
            for (var i = 0; i < total; i++)
            {
                f[i] = Integrand(weights, u[i]);
            }
        }

        // Sum piece by piece, in node order.
        var integral = 0.0;
        node = 0;
        for (var k = 0; k < doublings; k++)
        {
            for (var piece = 0; piece < pieces[k]; piece++)
            {
                var lo = starts[k] + (piece * widths[k]);
                var hi = starts[k] + ((piece + 1) * widths[k]);
                var sum = 0.0;
                for (var g = 0; g < order; g++)
                {
                    sum += gaussWeights[g] * f[node++];
                }

                integral += sum * ((hi - lo) / 2);
            }
        }

        return Math.Clamp(0.5 - (integral / Math.PI), 0.0, 1.0);
    }

    /// <summary>
    /// <see cref="Integrand"/> at every node, four nodes at a time: the same operations in the same
    /// order on each lane, so the same value bit for bit (no fused multiply-add). No rescaling: the
    /// caller has checked that the product cannot overflow.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static void Integrands(ReadOnlySpan<double> lambda, ReadOnlySpan<double> nodes, Span<double> values)
    {
        var zero = Vector256<double>.Zero;
        var one = Vector256.Create(1.0);
        var minusOne = Vector256.Create(-1.0);
        var two = Vector256.Create(2.0);
        var signBit = Vector256.Create(-0.0);
        for (var i = 0; i < nodes.Length; i += 4)
        {
            var u = Vector256.Create(nodes.Slice(i, 4));
            var re = one;
            var im = zero;
            var upper = zero; // all bits set where the point lies in the upper half-plane (arg in (0, pi])
            var parity = zero; // all bits set where the negative real axis has been crossed an odd number of times
            foreach (var l in lambda)
            {
                var t = Vector256.Create(l) * u;
                var nre = re - (t * im);
                var nim = im + (t * re);
                var isUpper = Vector256.GreaterThan(nim, zero) | (Vector256.Equals(nim, zero) & Vector256.LessThan(nre, zero));
                parity ^= Vector256.LessThan(nre, zero) & (upper ^ isUpper);
                upper = isUpper;
                re = nre;
                im = nim;
            }

            var r = Vector256.Sqrt((re * re) + (im * im));

            // sin(phi / 2) for the principal argument phi, without cancellation; then the winding's parity.
            var right = im / Vector256.Sqrt(two * r * (r + re));
            var left = Vector256.ConditionalSelect(Vector256.GreaterThanOrEqual(im, zero), one, minusOne) * Vector256.Sqrt((r - re) / (two * r));
            var halfSine = Vector256.ConditionalSelect(Vector256.GreaterThanOrEqual(re, zero), right, left);
            halfSine ^= parity & signBit;
            (halfSine / (u * Vector256.Sqrt(r))).CopyTo(values.Slice(i, 4));
        }
    }

    /// <summary>sin(theta(u)) / (u rho(u)).</summary>
    private static double Integrand(ReadOnlySpan<double> lambda, double u)
    {
        const double Big = 1e150;
        const double Shrink = 1e-150;
        double re = 1, im = 0;
        var winding = 0;
        var shrinks = 0;
        foreach (var l in lambda)
        {
            if (l == 0)
            {
                continue;
            }

            var t = l * u;
            var nre = re - (t * im);
            var nim = im + (t * re);
            if (nre < 0)
            {
                // Crossing the negative real axis: up through pi (winding +1) or down through -pi.
                var wasUpper = im > 0 || (im == 0 && re < 0);
                var isUpper = nim > 0 || nim == 0;
                if (wasUpper != isUpper)
                {
                    winding += wasUpper ? 1 : -1;
                }
            }

            re = nre;
            im = nim;
            if (Math.Abs(re) + Math.Abs(im) > Big)
            {
                re *= Shrink;
                im *= Shrink;
                shrinks++;
            }
        }

        if (shrinks > 1)
        {
            return 0.0; // rho beyond 1e150: the integrand is far below any tolerance
        }

        var r = Math.Sqrt((re * re) + (im * im));

        // sin(phi / 2) for the principal argument phi of z, without cancellation; then the winding.
        var halfSine = re >= 0
            ? im / Math.Sqrt(2 * r * (r + re))
            : (im >= 0 ? 1.0 : -1.0) * Math.Sqrt((r - re) / (2 * r));
        if ((winding & 1) != 0)
        {
            halfSine = -halfSine;
        }

        var rho = Math.Sqrt(r);
        if (shrinks == 1)
        {
            rho *= 1e75; // sqrt of the 1e150 taken out
        }

        return halfSine / (u * rho);
    }

    /// <summary>Gauss-Legendre nodes and weights on [-1, 1], by Newton's method on the Legendre polynomial.</summary>
    internal static (double[] Nodes, double[] Weights) GaussLegendre(int count)
    {
        var nodes = new double[count];
        var weights = new double[count];
        for (var i = 0; i < count; i++)
        {
            var x = Math.Cos(Math.PI * (i + 0.75) / (count + 0.5));
            double derivative = 0;
            for (var iteration = 0; iteration < 100; iteration++)
            {
                double p0 = 1, p1 = x;
                for (var k = 2; k <= count; k++)
                {
                    var p2 = (((2 * k) - 1) * x * p1 - ((k - 1) * p0)) / k;
                    p0 = p1;
                    p1 = p2;
                }

                derivative = count * ((x * p1) - p0) / ((x * x) - 1);
                var step = p1 / derivative;
                x -= step;
                if (Math.Abs(step) < 1e-16)
                {
                    break;
                }
            }

            nodes[i] = x;
            weights[i] = 2 / ((1 - (x * x)) * derivative * derivative);
        }

        return (nodes, weights);
    }
}
