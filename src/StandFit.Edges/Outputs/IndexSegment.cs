using System.Buffers.Binary;
using System.Security.Cryptography;
using Microsoft.Win32.SafeHandles;
using StandFit.Core.Problems;

namespace StandFit.Edges.Outputs;

/// <summary>
/// One immutable index file, <c>journal/WORKER.GGGGGG.idx</c>: the unit keys (each with its first
/// result) and the latest unit key of each part and serial of a set of committed batches. Layout:
/// the key records (73 bytes each) sorted by key, the serial records (88 bytes each) sorted by
/// serial, then a 64-byte footer: <c>SFIDX001</c>, the two counts, 8 zero bytes and the SHA-256 of
/// everything before the checksum. Invariants: a file under its final name is whole (it is written
/// under a hidden temporary name, flushed to disk and only then renamed) and never changes; each
/// section is strictly ascending (checked as it is written); a file whose length, footer or
/// checksum is wrong is refused when it is opened, so a damaged file is never searched. Only a
/// handle is kept open: searches read the disk (<see cref="SortedSection{T}"/>).
/// </summary>
internal sealed class IndexSegment : IDisposable
{
    public const int FooterSize = 64;
    private const int CopyBuffer = 64 * 1024;
    private readonly SafeFileHandle _file;

    private IndexSegment(string path, SafeFileHandle file, long bytes, long keys, long serials)
    {
        Path = path;
        _file = file;
        Bytes = bytes;
        Keys = new SortedSection<KeyRecord>(file, 0, keys);
        Serials = new SortedSection<SerialRecord>(file, keys * KeyRecord.Size, serials);
    }

    private static ReadOnlySpan<byte> Magic => "SFIDX001"u8;

    public string Path { get; }

    public string Name => System.IO.Path.GetFileName(Path);

    public long Bytes { get; }

    public SortedSection<KeyRecord> Keys { get; }

    public SortedSection<SerialRecord> Serials { get; }

    /// <summary>Key and serial records together: the size the merge policy weighs.</summary>
    public long Records => Keys.Count + Serials.Count;

    /// <summary>Opens and checks a file. Throws <see cref="FileNotFoundException"/> when it is missing, <see cref="InvalidDataException"/> when it is damaged.</summary>
    public static IndexSegment Open(string path)
    {
        var file = File.OpenHandle(path, FileMode.Open, FileAccess.Read, FileShare.Read | FileShare.Delete);
        try
        {
            var length = RandomAccess.GetLength(file);
            var name = System.IO.Path.GetFileName(path);
            if (length < FooterSize)
            {
                throw new InvalidDataException(Messages.IndexFileNoFooter(name, length));
            }

            Span<byte> footer = stackalloc byte[FooterSize];
            IndexFiles.ReadExactly(file, footer, length - FooterSize);
            var keys = BinaryPrimitives.ReadInt64BigEndian(footer[8..]);
            var serials = BinaryPrimitives.ReadInt64BigEndian(footer[16..]);
            if (!footer[..8].SequenceEqual(Magic) || keys < 0 || serials < 0)
            {
                throw new InvalidDataException(Messages.IndexFileNoFooter(name, length));
            }

            var expected = (keys * KeyRecord.Size) + (serials * SerialRecord.Size) + FooterSize;
            if (expected != length)
            {
                throw new InvalidDataException(Messages.IndexFileWrongLength(name, length, keys, serials, expected));
            }

            if (!Checksum(file, length - 32).AsSpan().SequenceEqual(footer[32..]))
            {
                throw new InvalidDataException(Messages.IndexFileChecksum(name));
            }

            return new IndexSegment(path, file, length, keys, serials);
        }
        catch
        {
            file.Dispose();
            throw;
        }
    }

    /// <summary>
    /// Writes a file from sections already in order (a bug throws if they are not): under a hidden
    /// temporary name, flushed to disk, then renamed to <paramref name="path"/>. A failure leaves no
    /// temporary file behind if it can be removed; one that cannot is removed at the next start.
    /// </summary>
    public static void Write(string path, IEnumerable<KeyRecord> keys, IEnumerable<SerialRecord> serials)
    {
        var temporary = IndexFiles.TemporaryOf(path);
        try
        {
            using (var stream = new FileStream(temporary, FileMode.Create, FileAccess.Write, FileShare.None, CopyBuffer))
            using (var hash = IncrementalHash.CreateHash(HashAlgorithmName.SHA256))
            {
                var keyCount = WriteSection(stream, hash, keys);
                var serialCount = WriteSection(stream, hash, serials);
                Span<byte> footer = stackalloc byte[FooterSize];
                footer.Clear();
                Magic.CopyTo(footer);
                BinaryPrimitives.WriteInt64BigEndian(footer[8..], keyCount);
                BinaryPrimitives.WriteInt64BigEndian(footer[16..], serialCount);
                hash.AppendData(footer[..32]);
                hash.GetHashAndReset(footer[32..]);
                stream.Write(footer);
                stream.Flush(flushToDisk: true);
            }

            File.Move(temporary, path, overwrite: true);
        }
        catch
        {
            IndexFiles.TryDelete(temporary);
            throw;
        }
    }

    public bool TryFind(UnitKeyBits key, out KeyRecord record)
    {
        Span<byte> bytes = stackalloc byte[UnitKeyBits.Size];
        key.Write(bytes);
        return Keys.TryFind(bytes, out record);
    }

    public bool TryFind(UInt128 serial, out SerialRecord record)
    {
        Span<byte> bytes = stackalloc byte[16];
        BinaryPrimitives.WriteUInt128BigEndian(bytes, serial);
        return Serials.TryFind(bytes, out record);
    }

    public void Dispose() => _file.Dispose();

    private static long WriteSection<T>(Stream stream, IncrementalHash hash, IEnumerable<T> records)
        where T : struct, IIndexRecord<T>
    {
        var bytes = new byte[T.Size];
        long count = 0;
        T? previous = null;
        foreach (var record in records)
        {
            if (previous is { } p && T.CompareKeys(p, record) >= 0)
            {
                throw new InvalidOperationException("Index records must be written in strictly ascending key order.");
            }

            record.Write(bytes);
            hash.AppendData(bytes);
            stream.Write(bytes);
            previous = record;
            count++;
        }

        return count;
    }

    private static byte[] Checksum(SafeFileHandle file, long length)
    {
        using var hash = IncrementalHash.CreateHash(HashAlgorithmName.SHA256);
        var buffer = new byte[CopyBuffer];
        for (long position = 0; position < length;)
        {
            var take = (int)Math.Min(buffer.Length, length - position);
            IndexFiles.ReadExactly(file, buffer.AsSpan(0, take), position);
            hash.AppendData(buffer, 0, take);
            position += take;
        }

        return hash.GetHashAndReset();
    }
}
