using StandFit.Core.Uncertainty.Resampling;

namespace StandFit.SweepGen;

/// <summary>
/// Gaussian deviates (Marsaglia polar method) over one stream of the core's xoshiro256**
/// generator, seeded with <c>seed ^ (stream * 0xD1B54A32D192ED03)</c> through splitmix64. Only
/// IEEE-754 basic arithmetic and square root are used (the logarithm is computed here rather than
/// by the platform maths library), so a given (seed, stream) pair yields the same numbers on every
/// platform and .NET version.
/// </summary>
internal sealed class Xoshiro
{
    private const double Ln2 = 0.6931471805599453;
    private Xoshiro256StarStar generator;
    private double spare;
    private bool hasSpare;

    public Xoshiro(ulong seed, ulong stream)
    {
        generator = new Xoshiro256StarStar(unchecked(seed ^ (stream * 0xD1B54A32D192ED03UL)));
    }

    /// <summary>Uniform on [0, 1) with 53 random bits.</summary>
    public double NextDouble() => generator.NextDouble();

    public double NextGaussian()
    {
        if (hasSpare)
        {
            hasSpare = false;
            return spare;
        }

        double u;
        double v;
        double w;
        do
        {
            u = (2.0 * NextDouble()) - 1.0;
            v = (2.0 * NextDouble()) - 1.0;
            w = (u * u) + (v * v);
        }
        while (w >= 1.0 || w == 0.0);

        double f = Math.Sqrt(-2.0 * Ln(w) / w);
        spare = v * f;
        hasSpare = true;
        return u * f;
    }

    /// <summary>Stable 64-bit FNV-1a hash, used to derive one stream per serial number.</summary>
    public static ulong Fnv1a(string text)
    {
        ulong h = 0xCBF29CE484222325UL;
        foreach (char c in text)
        {
            h = unchecked((h ^ c) * 0x100000001B3UL);
        }

        return h;
    }

    /// <summary>Natural logarithm of a positive normal double: ln(m 2^e) = e ln2 + 2 atanh((m-1)/(m+1)).</summary>
    private static double Ln(double x)
    {
        long bits = BitConverter.DoubleToInt64Bits(x);
        int exponent = (int)((bits >> 52) & 0x7FF) - 1023;
        double m = BitConverter.Int64BitsToDouble((bits & 0x000FFFFFFFFFFFFFL) | 0x3FF0000000000000L);
        if (m > 1.4142135623730951)
        {
            m *= 0.5;
            exponent++;
        }

        double s = (m - 1.0) / (m + 1.0);
        double s2 = s * s;
        double term = s;
        double sum = 0.0;
        for (int k = 1; k <= 41; k += 2)
        {
            sum += term / k;
            term *= s2;
        }

        return (2.0 * sum) + (exponent * Ln2);
    }
}
