using System.Buffers;
using System.Buffers.Binary;
using Microsoft.Win32.SafeHandles;

namespace StandFit.Edges.Outputs;

/// <summary>
/// A run of fixed-size records in a file, sorted ascending by their leading key bytes, searched in
/// place: no more of it is in memory than one window of <see cref="Window"/> records, for one
/// search. The keys are hashes, spread evenly, so the search interpolates: it reads the window
/// where the key should lie, and if the key is outside it, narrows to that side and interpolates
/// again (two or three reads at any size). After <see cref="InterpolatedSteps"/> misses (keys that
/// are not spread evenly, which only a hand-made file has) it halves instead, so no search takes
/// more than about log2(count / window) further reads.
/// </summary>
internal sealed class SortedSection<T>(SafeFileHandle file, long offset, long count)
    where T : struct, IIndexRecord<T>
{
    public const int Window = 64;
    private const int InterpolatedSteps = 4;
    private const int ScanRecords = 1024;

    public long Count => count;

    /// <summary>The record whose key bytes equal <paramref name="key"/>, if there is one.</summary>
    public bool TryFind(ReadOnlySpan<byte> key, out T record)
    {
        record = default;
        if (count == 0)
        {
            return false;
        }

        var size = T.Size;
        var buffer = ArrayPool<byte>.Shared.Rent(Window * size);
        try
        {
            // Invariants: the key, if present, is at an index in [lo, hi); its leading 8 bytes,
            // read as a number, lie in [loValue, hiValue].
            long lo = 0, hi = count;
            ulong loValue = 0, hiValue = ulong.MaxValue;
            var target = BinaryPrimitives.ReadUInt64BigEndian(key);
            var misses = 0;
            while (hi - lo > Window)
            {
                var center = misses < InterpolatedSteps && hiValue > loValue
                    ? lo + (long)((double)(target - loValue) / (hiValue - loValue) * (hi - lo))
                    : lo + ((hi - lo) / 2);
                var start = Math.Clamp(center - (Window / 2), lo, hi - Window);
                var window = Read(buffer, start, Window);
                var first = window[..T.KeySize];
                var last = window.Slice((Window - 1) * size, T.KeySize);
                if (key.SequenceCompareTo(first) < 0)
                {
                    hi = start;
                    hiValue = BinaryPrimitives.ReadUInt64BigEndian(first);
                }
                else if (key.SequenceCompareTo(last) > 0)
                {
                    lo = start + Window;
                    loValue = BinaryPrimitives.ReadUInt64BigEndian(last);
                }
                else
                {
                    return Search(window, Window, key, out record);
                }

                misses++;
            }

            var rest = (int)(hi - lo);
            return rest > 0 && Search(Read(buffer, lo, rest), rest, key, out record);
        }
        finally
        {
            ArrayPool<byte>.Shared.Return(buffer);
        }
    }

    /// <summary>Every record in order, read in chunks (for merging).</summary>
    public IEnumerable<T> ReadAll()
    {
        var size = T.Size;
        var buffer = new byte[ScanRecords * size];
        for (long start = 0; start < count; start += ScanRecords)
        {
            var n = (int)Math.Min(ScanRecords, count - start);
            Read(buffer, start, n);
            for (var i = 0; i < n; i++)
            {
                yield return T.Read(buffer.AsSpan(i * size, size));
            }
        }
    }

    private static bool Search(ReadOnlySpan<byte> records, int n, ReadOnlySpan<byte> key, out T record)
    {
        var size = T.Size;
        int lo = 0, hi = n - 1;
        while (lo <= hi)
        {
            var mid = lo + ((hi - lo) / 2);
            var slice = records.Slice(mid * size, size);
            var c = slice[..T.KeySize].SequenceCompareTo(key);
            if (c == 0)
            {
                record = T.Read(slice);
                return true;
            }

            if (c < 0)
            {
                lo = mid + 1;
            }
            else
            {
                hi = mid - 1;
            }
        }

        record = default;
        return false;
    }

    private ReadOnlySpan<byte> Read(byte[] buffer, long start, int n)
    {
        var span = buffer.AsSpan(0, n * T.Size);
        IndexFiles.ReadExactly(file, span, offset + (start * T.Size));
        return span;
    }
}
