using System.Numerics;

namespace StandFit.Core.Uncertainty.Resampling;

/// <summary>
/// The xoshiro256** generator (Blackman and Vigna, "Scrambled linear pseudorandom number
/// generators", 2021), written out here so that the algorithm is fixed by this file and not by a
/// library version: the same 64-bit seed gives the same draws on every platform and release.
/// The 256-bit state is filled from the seed by splitmix64 (Steele, Lea and Flood 2014), as the
/// authors recommend. A mutable struct: one per unit, never shared between threads.
/// </summary>
public struct Xoshiro256StarStar
{
    private ulong _s0;
    private ulong _s1;
    private ulong _s2;
    private ulong _s3;

    /// <summary>A generator whose state is four splitmix64 outputs from <paramref name="seed"/>.</summary>
    public Xoshiro256StarStar(ulong seed)
    {
        var x = seed;
        _s0 = SplitMix64.Next(ref x);
        _s1 = SplitMix64.Next(ref x);
        _s2 = SplitMix64.Next(ref x);
        _s3 = SplitMix64.Next(ref x);
    }

    /// <summary>A generator with this exact state (not all zero), for checks against the reference implementation.</summary>
    public static Xoshiro256StarStar FromState(ulong s0, ulong s1, ulong s2, ulong s3)
    {
        if ((s0 | s1 | s2 | s3) == 0)
        {
            throw new ArgumentException("The all-zero state is a fixed point of xoshiro256**.");
        }

        return new Xoshiro256StarStar { _s0 = s0, _s1 = s1, _s2 = s2, _s3 = s3 };
    }

    /// <summary>The next 64 random bits.</summary>
    public ulong NextUInt64()
    {
        unchecked
        {
            var result = BitOperations.RotateLeft(_s1 * 5, 7) * 9;
            var t = _s1 << 17;
            _s2 ^= _s0;
            _s3 ^= _s1;
            _s1 ^= _s2;
            _s0 ^= _s3;
            _s2 ^= t;
            _s3 = BitOperations.RotateLeft(_s3, 45);
            return result;
        }
    }

    /// <summary>Uniform on [0, 1): the top 53 bits of one draw times 2^-53.</summary>
    public double NextDouble() => (NextUInt64() >> 11) * (1.0 / 9007199254740992.0);

    /// <summary>
    /// A uniform integer in [0, <paramref name="bound"/>), exactly uniform, by Lemire's multiply-and-reject
    /// method ("Fast random integer generation in an interval", ACM TOMACS 2019) on the top 32 bits of a draw.
    /// </summary>
    public int NextBelow(int bound)
    {
        var n = (uint)bound;
        var threshold = unchecked(0u - n) % n;
        return NextBelow(n, threshold);
    }

    /// <summary>
    /// <see cref="NextBelow(int)"/> with its rejection threshold <c>(2^32 - bound) mod bound</c> computed
    /// once by the caller (<see cref="RejectionThreshold"/>): the hot loop of a bootstrap.
    /// </summary>
    public int NextBelow(uint bound, uint threshold)
    {
        while (true)
        {
            var m = (NextUInt64() >> 32) * bound;
            if ((uint)m >= threshold)
            {
                return (int)(m >> 32);
            }
        }
    }

    /// <summary>
    /// Fills <paramref name="destination"/> with uniform integers in [0, <paramref name="bound"/>) from
    /// 32-bit words, two per draw (the high half, then the low half), each by Lemire's multiply-and-reject
    /// method: word u gives floor(u bound / 2^32) unless the low 32 bits of u bound are below
    /// <paramref name="threshold"/> (<see cref="RejectionThreshold"/>), when the next word is taken. Each
    /// call starts with a fresh draw; a low half left over at the end is discarded. This is how a pairs
    /// resample draws its points.
    /// </summary>
    public void FillBelow(Span<int> destination, uint bound, uint threshold)
    {
        ulong s0 = _s0, s1 = _s1, s2 = _s2, s3 = _s3;
        var k = 0;
        var length = destination.Length;
        while (k < length)
        {
            ulong x;
            unchecked
            {
                x = BitOperations.RotateLeft(s1 * 5, 7) * 9;
                var t = s1 << 17;
                s2 ^= s0;
                s3 ^= s1;
                s1 ^= s2;
                s0 ^= s3;
                s2 ^= t;
                s3 = BitOperations.RotateLeft(s3, 45);
            }

            var m = (x >> 32) * bound;
            if ((uint)m >= threshold)
            {
                destination[k++] = (int)(m >> 32);
                if (k == length)
                {
                    break;
                }
            }

            m = (x & 0xFFFFFFFFUL) * bound;
            if ((uint)m >= threshold)
            {
                destination[k++] = (int)(m >> 32);
            }
        }

        (_s0, _s1, _s2, _s3) = (s0, s1, s2, s3);
    }

    /// <summary>The state, for a hot loop that inlines the generator (it must give the same draws as <see cref="NextUInt64"/>).</summary>
    internal readonly void Save(out ulong s0, out ulong s1, out ulong s2, out ulong s3) => (s0, s1, s2, s3) = (_s0, _s1, _s2, _s3);

    internal void Restore(ulong s0, ulong s1, ulong s2, ulong s3) => (_s0, _s1, _s2, _s3) = (s0, s1, s2, s3);

    /// <summary>(2^32 - bound) mod bound: draws whose low product word falls below it are rejected.</summary>
    public static uint RejectionThreshold(int bound)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(bound, 1);
        return unchecked(0u - (uint)bound) % (uint)bound;
    }
}

/// <summary>splitmix64 (Steele, Lea and Flood 2014; Vigna's reference splitmix64.c): seeds xoshiro256**.</summary>
public static class SplitMix64
{
    /// <summary>Advances <paramref name="state"/> by the golden gamma and returns the mixed output.</summary>
    public static ulong Next(ref ulong state)
    {
        unchecked
        {
            state += 0x9E3779B97F4A7C15UL;
            var z = state;
            z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9UL;
            z = (z ^ (z >> 27)) * 0x94D049BB133111EBUL;
            return z ^ (z >> 31);
        }
    }
}
