using System.Buffers.Binary;
using System.Security.Cryptography;
using System.Text;

namespace StandFit.Core.Uncertainty.Resampling;

/// <summary>
/// The 64-bit seed of one unit's random stream: the first 8 bytes (little-endian) of
/// SHA-256("standfit-resampling-1" 0x00 seed(8 bytes, little-endian) serial(UTF-8) 0x00 source-sha256(ASCII hex)).
/// Every unit gets its own stream, fixed by the recipe's seed and the unit's identity, so results do
/// not depend on the order in which units are judged or on how many threads judge them.
/// </summary>
public static class StreamSeed
{
    private static readonly byte[] Domain = Encoding.ASCII.GetBytes("standfit-resampling-1\0");

    public static ulong Derive(ulong recipeSeed, string serial, string sourceSha256)
    {
        ArgumentNullException.ThrowIfNull(serial);
        ArgumentNullException.ThrowIfNull(sourceSha256);
        var serialBytes = Encoding.UTF8.GetBytes(serial);
        var shaBytes = Encoding.ASCII.GetBytes(sourceSha256);
        var message = new byte[Domain.Length + 8 + serialBytes.Length + 1 + shaBytes.Length];
        var span = message.AsSpan();
        Domain.CopyTo(span);
        BinaryPrimitives.WriteUInt64LittleEndian(span[Domain.Length..], recipeSeed);
        serialBytes.CopyTo(span[(Domain.Length + 8)..]);
        span[Domain.Length + 8 + serialBytes.Length] = 0;
        shaBytes.CopyTo(span[(Domain.Length + 8 + serialBytes.Length + 1)..]);
        Span<byte> digest = stackalloc byte[32];
        SHA256.HashData(message, digest);
        return BinaryPrimitives.ReadUInt64LittleEndian(digest);
    }
}
