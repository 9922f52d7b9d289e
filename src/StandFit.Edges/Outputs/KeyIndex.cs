using StandFit.Core.Problems;

namespace StandFit.Edges.Outputs;

/// <summary>
/// One worker's key index as this process sees it: the index files its journal's header names
/// (oldest first) and the recent keys of the batches after the header. Invariant: every key the
/// worker published is in exactly one of them, and the newer holder wins for a part and serial:
/// the recent keys, then the index files newest first. Memory: the recent keys (bounded by the
/// compaction threshold) and one open handle per index file; the files are searched on disk.
/// </summary>
internal sealed class KeyIndex : IDisposable
{
    private List<IndexSegment> _segments;

    private delegate bool SegmentSearch<T>(IndexSegment segment, out T record);

    private KeyIndex(int generation, List<IndexSegment> segments)
    {
        Generation = generation;
        _segments = segments;
    }

    /// <summary>The generation of the journal's header (0: no header, nothing folded yet).</summary>
    public int Generation { get; private set; }

    public IReadOnlyList<IndexSegment> Segments => _segments;

    public RecentKeys Recent { get; } = new();

    public long KeyCount => Recent.Count + _segments.Sum(s => s.Keys.Count);

    public long FileBytes => _segments.Sum(s => s.Bytes);

    public static KeyIndex Empty() => new(0, []);

    /// <summary>
    /// Opens the index files a header names, each checked whole. Throws <see cref="InvalidDataException"/>
    /// when a name is not one of <paramref name="workerId"/>'s index files or a file is damaged, and
    /// <see cref="FileNotFoundException"/> when one is missing.
    /// </summary>
    public static KeyIndex Open(string folder, string workerId, int generation, IReadOnlyList<string> names) =>
        new(generation, OpenAll(folder, workerId, names, []));

    /// <summary>
    /// Follows a later header of the same worker (another worker's journal, compacted since): opens
    /// the files it names that are not open yet (files are immutable, so one already open under
    /// its name is kept), closes the others, and forgets the recent keys (they are read again from
    /// the new journal). Throws as <see cref="Open"/>, leaving this index as it was.
    /// </summary>
    public void Follow(string folder, string workerId, int generation, IReadOnlyList<string> names)
    {
        Advance(generation, OpenAll(folder, workerId, names, _segments));
    }

    private static List<IndexSegment> OpenAll(string folder, string workerId, IReadOnlyList<string> names, List<IndexSegment> open)
    {
        var segments = new List<IndexSegment>(names.Count);
        try
        {
            foreach (var name in names)
            {
                if (!IndexFiles.IsSegmentOf(name, workerId))
                {
                    throw new InvalidDataException(Messages.IndexFileForeignName(name, workerId));
                }

                segments.Add(open.Find(s => s.Name == name) ?? IndexSegment.Open(Path.Combine(folder, name)));
            }
        }
        catch
        {
            segments.Where(s => !open.Contains(s)).ToList().ForEach(s => s.Dispose());
            throw;
        }

        return segments;
    }

    public bool TryFirst(UnitKeyBits key, out KeyRecord record) =>
        Recent.TryFind(key, out record) || TryNewestFirst((IndexSegment s, out KeyRecord r) => s.TryFind(key, out r), out record);

    public bool TryLatest(UInt128 serial, out SerialRecord record) =>
        Recent.TryFind(serial, out record) || TryNewestFirst((IndexSegment s, out SerialRecord r) => s.TryFind(serial, out r), out record);

    /// <summary>After a compaction: the new generation and files; the recent keys are in them now. Files no longer named are closed.</summary>
    public void Advance(int generation, List<IndexSegment> segments)
    {
        foreach (var old in _segments.Where(s => !segments.Contains(s)))
        {
            old.Dispose();
        }

        Generation = generation;
        _segments = segments;
        Recent.Clear();
    }

    public void Dispose()
    {
        _segments.ForEach(s => s.Dispose());
        _segments = [];
    }

    private bool TryNewestFirst<T>(SegmentSearch<T> search, out T record)
        where T : struct
    {
        for (var i = _segments.Count - 1; i >= 0; i--)
        {
            if (search(_segments[i], out record))
            {
                return true;
            }
        }

        record = default;
        return false;
    }
}
