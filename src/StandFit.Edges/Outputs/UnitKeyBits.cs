using System.Buffers;
using System.Buffers.Binary;
using System.Security.Cryptography;
using System.Text;

namespace StandFit.Edges.Outputs;

/// <summary>
/// A unit key in 64 bytes: the sweep's SHA-256 and the recipe's (zero for <c>none</c>). Its byte
/// form is big-endian, so the order of the bytes (as the index files sort them) is the order of
/// the four numbers.
/// </summary>
internal readonly record struct UnitKeyBits(UInt128 S0, UInt128 S1, UInt128 R0, UInt128 R1)
{
    public const int Size = 64;

    public static bool TryParse(string key, out UnitKeyBits bits)
    {
        bits = default;
        if (key.Length < 66 || key[64] != ':')
        {
            return false;
        }

        Span<byte> bytes = stackalloc byte[Size];
        if (Convert.FromHexString(key.AsSpan(0, 64), bytes[..32], out _, out var written) != OperationStatus.Done || written != 32)
        {
            return false;
        }

        var rest = key.AsSpan(65);
        if (rest.SequenceEqual("none"))
        {
            bytes[32..].Clear();
        }
        else if (rest.Length != 64 || Convert.FromHexString(rest, bytes[32..], out _, out written) != OperationStatus.Done || written != 32)
        {
            return false;
        }

        bits = Read(bytes);
        return true;
    }

    public static UnitKeyBits Read(ReadOnlySpan<byte> bytes) => new(
        BinaryPrimitives.ReadUInt128BigEndian(bytes),
        BinaryPrimitives.ReadUInt128BigEndian(bytes[16..]),
        BinaryPrimitives.ReadUInt128BigEndian(bytes[32..]),
        BinaryPrimitives.ReadUInt128BigEndian(bytes[48..]));

    public void Write(Span<byte> bytes)
    {
        BinaryPrimitives.WriteUInt128BigEndian(bytes, S0);
        BinaryPrimitives.WriteUInt128BigEndian(bytes[16..], S1);
        BinaryPrimitives.WriteUInt128BigEndian(bytes[32..], R0);
        BinaryPrimitives.WriteUInt128BigEndian(bytes[48..], R1);
    }

    public static int Compare(UnitKeyBits a, UnitKeyBits b)
    {
        var c = a.S0.CompareTo(b.S0);
        c = c != 0 ? c : a.S1.CompareTo(b.S1);
        c = c != 0 ? c : a.R0.CompareTo(b.R0);
        return c != 0 ? c : a.R1.CompareTo(b.R1);
    }

    public override string ToString()
    {
        Span<byte> bytes = stackalloc byte[Size];
        Write(bytes);
        var recipe = R0 == 0 && R1 == 0 ? "none" : Convert.ToHexStringLower(bytes[32..]);
        return Convert.ToHexStringLower(bytes[..32]) + ":" + recipe;
    }
}

/// <summary>A part and serial in 16 bytes: the first half of the SHA-256 of the upper-cased part, a line end and the serial.</summary>
internal static class SerialBits
{
    public static UInt128 Of(string? part, string serial)
    {
        var hash = SHA256.HashData(Encoding.UTF8.GetBytes((part ?? "").ToUpperInvariant() + "\n" + serial));
        return BinaryPrimitives.ReadUInt128BigEndian(hash);
    }
}
