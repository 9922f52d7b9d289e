using System.Globalization;
using Microsoft.Win32.SafeHandles;

namespace StandFit.Edges.Outputs;

/// <summary>
/// The names of a worker's files in the journal folder, and the removal of those a crash left
/// behind: <c>WORKER.jsonl</c> (the journal), <c>WORKER.GGGGGG.idx</c> (an index file, GGGGGG the
/// generation that wrote it, six or more digits) and the hidden temporary <c>.NAME.tmp</c> of
/// either. A name belongs to a worker only in exactly one of these forms for its id: worker ids may
/// hold dots, and <c>a.000001.idx</c> (worker <c>a</c>) and <c>a.000001.000002.idx</c> (worker
/// <c>a.000001</c>) must never be taken for each other, since a worker deletes its own leftovers.
/// </summary>
internal static class IndexFiles
{
    private const string JournalExtension = ".jsonl";
    private const string SegmentExtension = ".idx";
    private const string TemporaryExtension = ".tmp";
    private static readonly System.Buffers.SearchValues<char> Digits = System.Buffers.SearchValues.Create("0123456789");

    public static string JournalPath(string folder, string workerId) => Path.Combine(folder, workerId + JournalExtension);

    /// <summary>The worker a journal file belongs to: its name without <c>.jsonl</c>.</summary>
    public static string WorkerOfJournal(string journalPath) => Path.GetFileName(journalPath)[..^JournalExtension.Length];

    public static string SegmentName(string workerId, int generation) =>
        workerId + "." + generation.ToString("D6", CultureInfo.InvariantCulture) + SegmentExtension;

    /// <summary>The hidden temporary name a file is written under before it is renamed to <paramref name="path"/>.</summary>
    public static string TemporaryOf(string path) => Path.Combine(Path.GetDirectoryName(path)!, "." + Path.GetFileName(path) + TemporaryExtension);

    /// <summary>True when <paramref name="name"/> is an index file of <paramref name="workerId"/> (a plain name, no folder).</summary>
    public static bool IsSegmentOf(string name, string workerId)
    {
        if (name.Length <= workerId.Length + 1 + SegmentExtension.Length
            || !name.StartsWith(workerId + ".", StringComparison.Ordinal)
            || !name.EndsWith(SegmentExtension, StringComparison.Ordinal))
        {
            return false;
        }

        var generation = name.AsSpan(workerId.Length + 1, name.Length - workerId.Length - 1 - SegmentExtension.Length);
        return generation.Length >= 6 && !generation.ContainsAnyExcept(Digits);
    }

    /// <summary>
    /// Deletes what a crash in a compaction may have left of <paramref name="workerId"/>'s files:
    /// index files the journal does not name, and its temporaries. Returns how many it removed.
    /// Only the worker itself calls this, holding its lock; files it cannot remove now are left.
    /// </summary>
    public static int RemoveLeftovers(string folder, string workerId, IReadOnlySet<string> referenced)
    {
        var journalTemporary = "." + workerId + JournalExtension + TemporaryExtension;
        var removed = 0;
        foreach (var path in Directory.EnumerateFiles(folder))
        {
            var name = Path.GetFileName(path);
            var segmentTemporary = name.Length > 1 + TemporaryExtension.Length
                && name[0] == '.'
                && name.EndsWith(TemporaryExtension, StringComparison.Ordinal)
                && IsSegmentOf(name[1..^TemporaryExtension.Length], workerId);
            var leftover = segmentTemporary
                || string.Equals(name, journalTemporary, StringComparison.Ordinal)
                || (IsSegmentOf(name, workerId) && !referenced.Contains(name));
            if (leftover && TryDelete(path))
            {
                removed++;
            }
        }

        return removed;
    }

    public static bool TryDelete(string path)
    {
        try
        {
            File.Delete(path);
            return true;
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            return false; // a leftover that is never read; removed at a later start
        }
    }

    /// <summary>Reads exactly <paramref name="buffer"/>'s length at <paramref name="position"/>; a file that ends first throws <see cref="EndOfStreamException"/>.</summary>
    public static void ReadExactly(SafeFileHandle file, Span<byte> buffer, long position)
    {
        for (var done = 0; done < buffer.Length;)
        {
            var read = RandomAccess.Read(file, buffer[done..], position + done);
            if (read == 0)
            {
                throw new EndOfStreamException();
            }

            done += read;
        }
    }
}
