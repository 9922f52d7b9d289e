namespace StandFit.Core.Uncertainty.Resampling;

/// <summary>
/// What every resampler shares: the interface <see cref="ResamplingAnalysis"/> drives, the
/// leverage-adjusted residuals, and the errors of one residual or wild resample, drawn from the
/// unit's stream exactly as docs/uncertainty.md ("Reproducibility") says, whatever model is refitted.
/// </summary>
internal interface IResampler
{
    /// <summary>Points n of the fit.</summary>
    int Points { get; }

    /// <summary>Figures resampled (parameters, then derived figures).</summary>
    int Figures { get; }

    /// <summary>The figures on the original data.</summary>
    ReadOnlySpan<double> Estimates { get; }

    /// <summary>Figure k with group g left out to <c>output[k * groups + g]</c>, the cause of any failure to <c>failures[g]</c> (NaN written for a failed deletion).</summary>
    void LeaveOut(ReadOnlySpan<int> groupOf, int groups, Span<double> output, Span<ResampleFailure> failures);

    /// <summary>Figure k of the s-th successful resample to <c>output[k * resamples + s]</c>; failed resamples counted by cause, not written.</summary>
    BootstrapCounts Bootstrap(BootstrapScheme scheme, int resamples, ref Xoshiro256StarStar rng, Span<double> output, Span<int> recordIndices = default);
}

internal static class ResampleDraws
{
    /// <summary>1 - h_ii at or below this is a point of leverage 1: its adjusted residual is 0.</summary>
    public const double LeverageOneRoom = 1e-12;

    private const double MammenLow = -0.6180339887498949;   // -(sqrt 5 - 1) / 2
    private const double MammenHigh = 1.618033988749895;    // (sqrt 5 + 1) / 2
    private const double MammenLowChance = 0.7236067977499790; // (sqrt 5 + 1) / (2 sqrt 5)

    /// <summary>
    /// The arguments of <see cref="IResampler.Bootstrap"/> every resampler checks: at least one
    /// resample, room for figures x resamples outputs and, when indices are recorded, for resamples
    /// x points indices. A bug in the caller, so it throws.
    /// </summary>
    public static void CheckBootstrapBuffers(int figures, int points, int resamples, Span<double> output, Span<int> recordIndices)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(resamples, 1);
        if (output.Length < figures * resamples)
        {
            throw new ArgumentException("The output buffer holds figures x resamples values.", nameof(output));
        }

        if (!recordIndices.IsEmpty && recordIndices.Length < resamples * points)
        {
            throw new ArgumentException("The index buffer holds resamples x points values.", nameof(recordIndices));
        }
    }

    /// <summary>
    /// <c>adjusted[i] = e_i / sqrt(1 - h_ii)</c> (0 for a point of leverage 1) and
    /// <c>centred</c> the same minus their mean.
    /// </summary>
    public static void Adjust(ReadOnlySpan<double> residuals, ReadOnlySpan<double> leverage, Span<double> adjusted, Span<double> centred)
    {
        var n = residuals.Length;
        var mean = 0.0;
        for (var i = 0; i < n; i++)
        {
            var room = 1.0 - leverage[i];
            adjusted[i] = room > LeverageOneRoom ? residuals[i] / Math.Sqrt(room) : 0.0;
            mean += adjusted[i];
        }

        mean /= n;
        for (var i = 0; i < n; i++)
        {
            centred[i] = adjusted[i] - mean;
        }
    }

    /// <summary>
    /// The errors e* of one residual or wild resample into <paramref name="errors"/>: residual, the
    /// centred adjusted residuals at n indices drawn with replacement (the indices left in
    /// <paramref name="drawn"/>); Rademacher, each adjusted residual with its sign flipped by one bit
    /// of successive draws (low bit first); Mammen, each adjusted residual times Mammen's two-point
    /// weight chosen by a 53-bit uniform.
    /// </summary>
    public static void Errors(BootstrapScheme scheme, ref Xoshiro256StarStar rng, ReadOnlySpan<double> adjusted, ReadOnlySpan<double> centred, uint threshold, Span<int> drawn, Span<double> errors)
    {
        var n = adjusted.Length;
        switch (scheme)
        {
            case BootstrapScheme.Residual:
                rng.FillBelow(drawn, (uint)n, threshold);
                for (var i = 0; i < n; i++)
                {
                    errors[i] = centred[drawn[i]];
                }

                break;
            case BootstrapScheme.WildRademacher:
                ulong bits = 0;
                for (var i = 0; i < n; i++)
                {
                    if ((i & 63) == 0)
                    {
                        bits = rng.NextUInt64();
                    }

                    // Bit 1 flips the sign: the residual's sign bit XOR the weight's.
                    errors[i] = BitConverter.Int64BitsToDouble(BitConverter.DoubleToInt64Bits(adjusted[i]) ^ (long)((bits & 1) << 63));
                    bits >>= 1;
                }

                break;
            case BootstrapScheme.WildMammen:
                for (var i = 0; i < n; i++)
                {
                    errors[i] = adjusted[i] * (rng.NextDouble() < MammenLowChance ? MammenLow : MammenHigh);
                }

                break;
            default:
                throw new ArgumentOutOfRangeException(nameof(scheme), scheme, "Pairs resamples draw points, not errors.");
        }
    }
}
