using System.Buffers.Binary;

namespace StandFit.Edges.Outputs;

/// <summary>
/// A fixed-size record of an index file, sorted by its first <see cref="KeySize"/> bytes (the
/// sort key, big-endian, so byte order and number order agree).
/// </summary>
internal interface IIndexRecord<TSelf>
    where TSelf : struct, IIndexRecord<TSelf>
{
    /// <summary>The record's length on disk, in bytes.</summary>
    static abstract int Size { get; }

    /// <summary>How many leading bytes of the record are its sort key.</summary>
    static abstract int KeySize { get; }

    static abstract TSelf Read(ReadOnlySpan<byte> bytes);

    /// <summary>Compares two records by their sort keys (the same order as their leading bytes).</summary>
    static abstract int CompareKeys(TSelf a, TSelf b);

    void Write(Span<byte> bytes);
}

/// <summary>A published unit key with its first result: when it was published (UTC ticks) and its ruling. 73 bytes.</summary>
internal readonly record struct KeyRecord(UnitKeyBits Key, long AtTicks, byte Ruling) : IIndexRecord<KeyRecord>
{
    private static readonly string[] Rulings = ["pass", "fail", "retest", "rejected"];

    public static int Size => UnitKeyBits.Size + 8 + 1;

    public static int KeySize => UnitKeyBits.Size;

    public FirstResult First => new(new DateTime(AtTicks, DateTimeKind.Utc), Rulings[Ruling < Rulings.Length ? Ruling : 0]);

    public static byte RulingCode(string ruling) => (byte)Math.Max(0, Array.IndexOf(Rulings, ruling));

    public static KeyRecord Read(ReadOnlySpan<byte> bytes) =>
        new(UnitKeyBits.Read(bytes), BinaryPrimitives.ReadInt64BigEndian(bytes[UnitKeyBits.Size..]), bytes[UnitKeyBits.Size + 8]);

    public static int CompareKeys(KeyRecord a, KeyRecord b) => UnitKeyBits.Compare(a.Key, b.Key);

    public void Write(Span<byte> bytes)
    {
        Key.Write(bytes);
        BinaryPrimitives.WriteInt64BigEndian(bytes[UnitKeyBits.Size..], AtTicks);
        bytes[UnitKeyBits.Size + 8] = Ruling;
    }
}

/// <summary>The latest unit key of a part and serial (<see cref="SerialBits"/>), with when it was published (UTC ticks). 88 bytes.</summary>
internal readonly record struct SerialRecord(UInt128 Serial, UnitKeyBits Key, long AtTicks) : IIndexRecord<SerialRecord>
{
    public static int Size => 16 + UnitKeyBits.Size + 8;

    public static int KeySize => 16;

    public static SerialRecord Read(ReadOnlySpan<byte> bytes) =>
        new(BinaryPrimitives.ReadUInt128BigEndian(bytes), UnitKeyBits.Read(bytes[16..]), BinaryPrimitives.ReadInt64BigEndian(bytes[(16 + UnitKeyBits.Size)..]));

    public static int CompareKeys(SerialRecord a, SerialRecord b) => a.Serial.CompareTo(b.Serial);

    public void Write(Span<byte> bytes)
    {
        BinaryPrimitives.WriteUInt128BigEndian(bytes, Serial);
        Key.Write(bytes[16..]);
        BinaryPrimitives.WriteInt64BigEndian(bytes[(16 + UnitKeyBits.Size)..], AtTicks);
    }
}
