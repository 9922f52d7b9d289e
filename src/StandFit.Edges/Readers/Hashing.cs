using System.Security.Cryptography;

namespace StandFit.Edges.Readers;

/// <summary>SHA-256 as lower-case hex, the content key of sweep and recipe files.</summary>
public static class Hashing
{
    public static string Sha256Hex(ReadOnlySpan<byte> bytes) => Convert.ToHexStringLower(SHA256.HashData(bytes));

    public static string Sha256OfFile(string path)
    {
        using var stream = File.OpenRead(path);
        return Convert.ToHexStringLower(SHA256.HashData(stream));
    }
}
