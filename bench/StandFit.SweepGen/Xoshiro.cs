using System.Numerics;

namespace StandFit.SweepGen;

/// <summary>
/// xoshiro256** (Blackman and Vigna), seeded through splitmix64, with Gaussian deviates from the
/// Marsaglia polar method. Only IEEE-754 basic arithmetic and square root are used (the logarithm
/// is computed here rather than by the platform maths library), so a given (seed, stream) pair
/// yields the same numbers on every platform and .NET version.
/// </summary>
internal sealed class Xoshiro
{
    private const double Ln2 = 0.6931471805599453;
    private ulong s0;
    private ulong s1;
    private ulong s2;
    private ulong s3;
    private double spare;
    private bool hasSpare;

    public Xoshiro(ulong seed, ulong stream)
    {
        ulong x = unchecked(seed ^ (stream * 0xD1B54A32D192ED03UL));
        s0 = SplitMix64(ref x);
        s1 = SplitMix64(ref x);
        s2 = SplitMix64(ref x);
        s3 = SplitMix64(ref x);
    }

    public ulong NextUInt64()
    {
        unchecked
        {
            ulong result = BitOperations.RotateLeft(s1 * 5UL, 7) * 9UL;
            ulong t = s1 << 17;
            s2 ^= s0;
            s3 ^= s1;
            s1 ^= s2;
            s0 ^= s3;
            s2 ^= t;
            s3 = BitOperations.RotateLeft(s3, 45);
            return result;
        }
    }

    /// <summary>Uniform on [0, 1) with 53 random bits.</summary>
    public double NextDouble() => (NextUInt64() >> 11) * (1.0 / 9007199254740992.0);

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

    private static ulong SplitMix64(ref ulong x)
    {
        unchecked
        {
            x += 0x9E3779B97F4A7C15UL;
            ulong z = x;
            z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9UL;
            z = (z ^ (z >> 27)) * 0x94D049BB133111EBUL;
            return z ^ (z >> 31);
        }
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
