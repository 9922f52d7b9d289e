namespace StandFit.Edges.Outputs;

/// <summary>
/// Folds a worker's recent keys into its index files and rotates its journal, in three steps, each
/// of which leaves a folder that a restart reads correctly if the process is killed there:
/// <list type="number">
/// <item>Write the new index file <c>WORKER.G.idx</c> (G: the next generation): the recent keys
/// merged with the newest index files the policy picks, under a temporary name, flushed, renamed.
/// Killed before the journal is replaced, this leaves an index file (or a temporary) that no header
/// names: removed at the next start, and the old journal, still in place, says everything.</item>
/// <item>Replace the journal by one header line naming the index files in force (temporary name,
/// flush, rename). This rename is the commit point: the old journal's keys are in the files the new
/// header names, which are whole.</item>
/// <item>Delete the index files that were merged into the new one. Killed before, they are named by
/// no header: removed at the next start.</item>
/// </list>
/// Precondition (the caller's): nothing in the journal is unfinished (no batch waits for its
/// pass/fail lines, no claimed input for its move), so the new journal needs nothing of the old one
/// but its keys. Merge policy, a binary counter: the recent keys take in the newest index file while
/// it holds fewer than twice the records taken so far. So each file holds at least twice the records
/// of the next newer one, a worker has at most about log2(units / threshold) + 1 files, and a key is
/// rewritten about as many times over its life.
/// </summary>
internal static class JournalCompactor
{
    /// <summary>How many of the newest index files (record counts oldest first) to merge with the recent records.</summary>
    public static int ChooseMerge(IReadOnlyList<long> segmentRecords, long recentRecords)
    {
        var gathered = recentRecords;
        var take = 0;
        for (var i = segmentRecords.Count - 1; i >= 0 && segmentRecords[i] < 2 * gathered; i--)
        {
            gathered += segmentRecords[i];
            take++;
        }

        return take;
    }

    /// <summary>Compacts; <paramref name="units"/> is how many units the journal held (for the report). Throws on I/O failure, leaving the old state in force.</summary>
    public static CompactionReport Compact(string folder, string workerId, KeyIndex index, JournalFile journal, int units)
    {
        var generation = index.Generation + 1;
        var segments = index.Segments;
        var take = index.Recent.Count == 0 ? 0 : ChooseMerge([.. segments.Select(s => s.Records)], index.Recent.Records);
        var merged = segments.Skip(segments.Count - take).ToList();
        var inForce = segments.Take(segments.Count - take).ToList();
        var before = journal.Length;

        // Step 1: the new index file.
        IndexSegment? created = null;
        try
        {
            if (index.Recent.Count > 0)
            {
                var path = Path.Combine(folder, IndexFiles.SegmentName(workerId, generation));
                IndexSegment.Write(
                    path,
                    SortedMerge.Merge([.. merged.Select(s => s.Keys.ReadAll()), index.Recent.SortedKeys()], keepNewest: false),
                    SortedMerge.Merge([.. merged.Select(s => s.Serials.ReadAll()), index.Recent.SortedSerials()], keepNewest: true));
                created = IndexSegment.Open(path);
                inForce.Add(created);
            }

            // Step 2: the commit point.
            journal.Replace(JournalLine.Header(generation, inForce.Select(s => s.Name)));
        }
        catch
        {
            created?.Dispose();
            if (index.Recent.Count > 0)
            {
                IndexFiles.TryDelete(Path.Combine(folder, IndexFiles.SegmentName(workerId, generation)));
            }

            throw;
        }

        // Step 3: the merged files go.
        index.Advance(generation, inForce);
        foreach (var old in merged)
        {
            IndexFiles.TryDelete(old.Path);
        }

        return new CompactionReport(units, generation, inForce.Count, index.KeyCount, index.FileBytes, before, journal.Length);
    }
}

/// <summary>Merges sorted runs of index records into one sorted run with each key once.</summary>
internal static class SortedMerge
{
    /// <summary>
    /// <paramref name="runs"/>: each strictly ascending, oldest first. A key in several runs is
    /// taken from the oldest (a first result) or, with <paramref name="keepNewest"/>, the newest
    /// (a latest key).
    /// </summary>
    public static IEnumerable<T> Merge<T>(IReadOnlyList<IEnumerable<T>> runs, bool keepNewest)
        where T : struct, IIndexRecord<T>
    {
        var cursors = runs.Select(r => r.GetEnumerator()).ToArray();
        try
        {
            var live = cursors.Select(c => c.MoveNext()).ToArray();
            while (true)
            {
                var chosen = -1;
                for (var i = 0; i < cursors.Length; i++)
                {
                    if (!live[i])
                    {
                        continue;
                    }

                    var c = chosen < 0 ? -1 : T.CompareKeys(cursors[i].Current, cursors[chosen].Current);
                    if (c < 0 || (c == 0 && keepNewest))
                    {
                        chosen = i;
                    }
                }

                if (chosen < 0)
                {
                    yield break;
                }

                var record = cursors[chosen].Current;
                yield return record;
                for (var i = 0; i < cursors.Length; i++)
                {
                    if (live[i] && T.CompareKeys(cursors[i].Current, record) == 0)
                    {
                        live[i] = cursors[i].MoveNext();
                    }
                }
            }
        }
        finally
        {
            foreach (var cursor in cursors)
            {
                cursor.Dispose();
            }
        }
    }
}
