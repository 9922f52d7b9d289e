using System.Text.Json;

namespace StandFit.Edges.Outputs;

/// <summary>
/// What this worker knows of the other workers that share the output folder: for each other
/// journal file, a <see cref="KeyIndex"/> of the index files its header names and of the batches
/// after its header, read on as the file grows. A journal that its worker has compacted since (a new
/// header generation, or a file shorter than what was read) is read anew: its index files opened,
/// its lines read from the top. Nothing of another worker stops this one: a journal, line or index
/// file that cannot be read or is damaged is skipped and tried again at the next refresh, and the
/// last view that was read stays in use meanwhile (its keys are still true; only newer ones are
/// missing). Memory: per other worker, its recent keys (bounded by its compaction threshold) and one
/// handle per index file.
/// </summary>
internal sealed class OtherJournals(string folder, string ownJournal) : IDisposable
{
    private const int ChunkBytes = 64 * 1024;
    private readonly Dictionary<string, View> _views = new(StringComparer.Ordinal);

    public long KeyCount => _views.Values.Sum(v => v.Index.KeyCount);

    public void Refresh()
    {
        if (!Directory.Exists(folder))
        {
            return;
        }

        var own = Path.GetFullPath(ownJournal);
        var present = new HashSet<string>(StringComparer.Ordinal);
        foreach (var path in Directory.EnumerateFiles(folder, "*.jsonl"))
        {
            if (string.Equals(Path.GetFullPath(path), own, StringComparison.Ordinal))
            {
                continue;
            }

            present.Add(path);
            try
            {
                Read(path);
            }
            catch (Exception e) when (e is IOException or UnauthorizedAccessException or InvalidDataException)
            {
                // Another worker's journal or index file that cannot be read now is read on a later pass.
            }
        }

        foreach (var gone in _views.Keys.Where(p => !present.Contains(p)).ToList())
        {
            _views[gone].Dispose();
            _views.Remove(gone);
        }
    }

    public bool TryFirst(UnitKeyBits key, out KeyRecord record)
    {
        foreach (var view in _views.Values)
        {
            if (view.Index.TryFirst(key, out record))
            {
                return true;
            }
        }

        record = default;
        return false;
    }

    /// <summary>Each other worker's latest key of a part and serial.</summary>
    public IEnumerable<SerialRecord> Latest(UInt128 serial)
    {
        foreach (var view in _views.Values)
        {
            if (view.Index.TryLatest(serial, out var record))
            {
                yield return record;
            }
        }
    }

    public void Dispose()
    {
        foreach (var view in _views.Values)
        {
            view.Dispose();
        }

        _views.Clear();
    }

    private void Read(string path)
    {
        using var stream = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.ReadWrite | FileShare.Delete);
        var (generation, segments, bodyStart) = ReadHeader(stream);
        _views.TryGetValue(path, out var view);
        var worker = IndexFiles.WorkerOfJournal(path);
        if (view is not null && generation > view.Index.Generation)
        {
            view.Index.Follow(folder, worker, generation, segments); // compacted since: the files it kept stay open
            view.Offset = bodyStart;
        }
        else if (view is null || view.Index.Generation != generation || stream.Length < view.Offset)
        {
            var index = generation == 0 ? KeyIndex.Empty() : KeyIndex.Open(folder, worker, generation, segments);
            view?.Dispose();
            view = new View(index, bodyStart);
            _views[path] = view;
        }

        if (stream.Length > view.Offset)
        {
            view.Offset = ReadLines(stream, view.Offset, view.Index.Recent);
        }
    }

    /// <summary>The header's generation and index files, and where the batches start; generation 0 and offset 0 for a journal with no header.</summary>
    private static (int Generation, IReadOnlyList<string> Segments, long BodyStart) ReadHeader(FileStream stream)
    {
        var buffer = new byte[ChunkBytes];
        stream.Position = 0;
        var read = stream.ReadAtLeast(buffer, buffer.Length, throwOnEndOfStream: false);
        var prefix = JournalLine.HeaderPrefix;
        if (read < prefix.Length || !buffer.AsSpan(0, prefix.Length).SequenceEqual(prefix))
        {
            return (0, [], 0);
        }

        var end = Array.IndexOf(buffer, (byte)'\n', 0, read);
        if (end < 0)
        {
            throw new InvalidDataException("The journal's header line is incomplete or too long."); // being written, or damaged: read later
        }

        JournalLine? header;
        try
        {
            header = JsonSerializer.Deserialize<JournalLine>(buffer.AsSpan(0, end), JournalFile.Json);
        }
        catch (JsonException e)
        {
            throw new InvalidDataException(e.Message, e);
        }

        return header?.Index is { } generation ? (generation, header.Segments ?? [], end + 1) : (0, [], 0);
    }

    /// <summary>Takes the keys of the whole lines from <paramref name="offset"/> on; returns the offset after the last whole line.</summary>
    private static long ReadLines(FileStream stream, long offset, RecentKeys keys)
    {
        stream.Position = offset;
        var chunk = new byte[ChunkBytes];
        using var partial = new MemoryStream();
        long position = offset, end = offset;
        int read;
        while ((read = stream.Read(chunk)) > 0)
        {
            var start = 0;
            for (int i; (i = Array.IndexOf(chunk, (byte)'\n', start, read - start)) >= 0; start = i + 1)
            {
                if (partial.Length == 0)
                {
                    Take(chunk.AsSpan(start, i - start), keys);
                }
                else
                {
                    partial.Write(chunk, start, i - start);
                    Take(partial.GetBuffer().AsSpan(0, (int)partial.Length), keys);
                    partial.SetLength(0);
                }

                end = position + i + 1;
            }

            partial.Write(chunk, start, read - start);
            position += read;
        }

        return end;
    }

    private static void Take(ReadOnlySpan<byte> line, RecentKeys keys)
    {
        if (line.IsEmpty)
        {
            return;
        }

        try
        {
            if (JsonSerializer.Deserialize<JournalLine>(line, JournalFile.Json) is { Batch: not null, Units: { } units } batch)
            {
                foreach (var unit in units)
                {
                    keys.Add(unit, batch.AtUtc);
                }
            }
        }
        catch (JsonException)
        {
            // Another worker's damaged line: it does not stop this worker.
        }
    }

    private sealed class View(KeyIndex index, long offset) : IDisposable
    {
        public KeyIndex Index { get; } = index;

        public long Offset { get; set; } = offset;

        public void Dispose() => Index.Dispose();
    }
}
