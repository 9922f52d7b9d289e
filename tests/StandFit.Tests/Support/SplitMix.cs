namespace StandFit.Tests.Support;

/// <summary>
/// Deterministic test inputs: Vigna's splitmix64 (a fixed algorithm, unlike System.Random's, which
/// .NET does not promise to keep), uniform doubles with 53 random bits.
/// </summary>
public sealed class SplitMix(ulong seed)
{
    private ulong _state = seed;

    public double NextDouble() => (Next() >> 11) * (1.0 / 9007199254740992.0);

    /// <summary>A whole number in [0, bound).</summary>
    public int Next(int bound) => (int)(NextDouble() * bound);

    private ulong Next()
    {
        unchecked
        {
            _state += 0x9E3779B97F4A7C15UL;
            var z = _state;
            z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9UL;
            z = (z ^ (z >> 27)) * 0x94D049BB133111EBUL;
            return z ^ (z >> 31);
        }
    }
}
