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
    private const double TailTolerance = 1e-10;
    private const double RadiansPerPanel = 6.0;
    private const int MaxPanels = 4000;
    private static readonly (double[] Nodes, double[] Weights) Gauss = GaussLegendre(8);

    /// <summary>P(sum lambda_i chi2_1 &lt; 0). Zero weights are dropped.</summary>
    public static double ProbabilityBelowZero(ReadOnlySpan<double> lambda)
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

        var scale = 1.0 / Math.Sqrt(sumSquares);
        var logUpper = 2.0 / m * (Math.Log(2.0 / (m * Math.PI * TailTolerance)) - (0.5 * sumLog));
        var upper = Math.Max(2 * scale, Math.Min(Math.Exp(logUpper), 1e12 * scale));

        var integral = 0.0;
        var panels = 0;
        double a = 0, b = scale;
        while (a < upper && panels < MaxPanels)
        {
            // theta turns by at most 1/2 sum |lambda| (b - a) / (1 + lambda^2 a^2) over [a, b].
            var turn = 0.0;
            foreach (var l in lambda)
            {
                turn += Math.Abs(l) / (1 + (l * l * a * a));
            }

            turn *= 0.5 * (b - a);
            var pieces = Math.Max(1, (int)Math.Ceiling(turn / RadiansPerPanel));
            var width = (b - a) / pieces;
            for (var k = 0; k < pieces; k++)
            {
                integral += Panel(lambda, a + (k * width), a + ((k + 1) * width));
            }

            panels += pieces;
            a = b;
            b *= 2;
        }

        return Math.Clamp(0.5 - (integral / Math.PI), 0.0, 1.0);
    }

    private static double Panel(ReadOnlySpan<double> lambda, double a, double b)
    {
        var half = (b - a) / 2;
        var mid = (a + b) / 2;
        var sum = 0.0;
        var (nodes, weights) = Gauss;
        for (var k = 0; k < nodes.Length; k++)
        {
            sum += weights[k] * Integrand(lambda, mid + (half * nodes[k]));
        }

        return sum * half;
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
