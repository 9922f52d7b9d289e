namespace StandFit.Tests.Support;

/// <summary>
/// A seeded generator with a fixed, published algorithm, so that simulations give the same numbers
/// on every machine and every .NET version (System.Random's algorithm is not a contract):
/// xoshiro256** 1.0 (Blackman and Vigna, 2018, https://prng.di.unimi.it/xoshiro256starstar.c),
/// seeded through SplitMix64 as its authors recommend; uniform doubles from the top 53 bits;
/// standard normal deviates by the Box-Muller transform (both deviates of a pair are used).
/// </summary>
public sealed class Xoshiro256StarStar
{
    private ulong _s0;
    private ulong _s1;
    private ulong _s2;
    private ulong _s3;
    private double? _spare;

    /// <summary>Seeds the state with four outputs of SplitMix64 started at <paramref name="seed"/>.</summary>
    public Xoshiro256StarStar(ulong seed)
    {
        var x = seed;
        _s0 = SplitMix64(ref x);
        _s1 = SplitMix64(ref x);
        _s2 = SplitMix64(ref x);
        _s3 = SplitMix64(ref x);
    }

    /// <summary>Starts from a given state (not all zero), for checks against the reference implementation.</summary>
    public Xoshiro256StarStar(ulong s0, ulong s1, ulong s2, ulong s3)
    {
        if ((s0 | s1 | s2 | s3) == 0)
        {
            throw new ArgumentException("The state of xoshiro256** must not be all zero.");
        }

        (_s0, _s1, _s2, _s3) = (s0, s1, s2, s3);
    }

    /// <summary>SplitMix64 (Steele, Lea and Flood, 2014): advances <paramref name="x"/> and returns the next output.</summary>
    public static ulong SplitMix64(ref ulong x)
    {
        x += 0x9E3779B97F4A7C15UL;
        var z = x;
        z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9UL;
        z = (z ^ (z >> 27)) * 0x94D049BB133111EBUL;
        return z ^ (z >> 31);
    }

    public ulong NextUInt64()
    {
        var result = RotateLeft(_s1 * 5, 7) * 9;
        var t = _s1 << 17;
        _s2 ^= _s0;
        _s3 ^= _s1;
        _s1 ^= _s2;
        _s0 ^= _s3;
        _s2 ^= t;
        _s3 = RotateLeft(_s3, 45);
        return result;
    }

    /// <summary>A uniform double in [0, 1): the top 53 bits of the next output, times 2^-53.</summary>
    public double NextDouble() => (NextUInt64() >> 11) * (1.0 / (1UL << 53));

    /// <summary>A standard normal deviate (Box-Muller; u1 in (0, 1] so the logarithm is finite).</summary>
    public double NextGaussian()
    {
        if (_spare is { } spare)
        {
            _spare = null;
            return spare;
        }

        var u1 = 1.0 - NextDouble();
        var u2 = NextDouble();
        var radius = Math.Sqrt(-2.0 * Math.Log(u1));
        var angle = 2.0 * Math.PI * u2;
        _spare = radius * Math.Sin(angle);
        return radius * Math.Cos(angle);
    }

    private static ulong RotateLeft(ulong x, int k) => (x << k) | (x >> (64 - k));
}
