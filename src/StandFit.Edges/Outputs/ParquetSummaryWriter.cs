using System.Globalization;
using Parquet;
using Parquet.Serialization;

namespace StandFit.Edges.Outputs;

/// <summary>
/// Writes summary rows to <c>output/summaries/date=YYYY-MM-DD/</c>, one Parquet file per batch and
/// partition (the date is the unit's test start, or its processing time when the file gives none),
/// Zstd-compressed, and the per-point rows of the same units to <c>output/points/date=YYYY-MM-DD/</c>
/// under the same file name (a unit's points go to its summary row's partition). Publishing is
/// two-phase so that a journal entry can sit between the phases: <see cref="PrepareAsync(IReadOnlyList{SummaryRecord}, IReadOnlyList{PointRecord}, CancellationToken)"/>
/// writes each file (summaries and points alike) under a hidden temporary name in its destination
/// folder and flushes it to disk; <see cref="PreparedSummaries.Complete"/> renames them to their
/// final names (atomic within one volume). The journal names both kinds of file, so recovery
/// renames both: a unit's points are published exactly when its summary row is. A reader globbing
/// <c>*.parquet</c> never sees a half-written file, and a file is never overwritten. From the first
/// temporary file to the last rename the writer holds the tables' <see cref="PublishLock"/> shared,
/// so that <c>standfit compact</c> never swaps a partition folder while a file is in flight into it.
/// </summary>
public sealed class ParquetSummaryWriter : ISummarySink
{
    private static readonly ParquetOptions Options = new()
    {
        CompressionMethod = CompressionMethod.Zstd,
        CompressionLevel = System.IO.Compression.CompressionLevel.Optimal,
    };

    private readonly string _output;
    private readonly string _root;
    private readonly string _pointsRoot;
    private readonly string _filePrefix;
    private readonly string _temporaryPrefix;
    private int _sequence;

    /// <param name="outputFolder">The configured output folder.</param>
    /// <param name="filePrefix">Unique per writer instance (run id), so two runs never collide.</param>
    /// <param name="workerId">Marks this worker's temporary files, so that only its own leftovers are cleaned.</param>
    public ParquetSummaryWriter(string outputFolder, string filePrefix, string workerId = "worker")
    {
        _output = outputFolder;
        _root = Path.Combine(outputFolder, "summaries");
        _pointsRoot = Path.Combine(outputFolder, "points");
        _filePrefix = filePrefix;
        _temporaryPrefix = "." + workerId + "~";
    }

    public static string PartitionOf(SummaryRecord record) =>
        "date=" + (record.TestStart ?? record.ProcessedAt).ToString("yyyy-MM-dd", CultureInfo.InvariantCulture);

    /// <summary>The hidden temporary name a final file is first written under.</summary>
    public string TemporaryOf(string finalPath) => Path.Combine(Path.GetDirectoryName(finalPath)!, _temporaryPrefix + Path.GetFileName(finalPath) + ".tmp");

    /// <summary>A path relative to the output folder, with '/' (as the journal stores it).</summary>
    public string Relative(string path) => Path.GetRelativePath(_output, path).Replace('\\', '/');

    /// <summary>The absolute path of a path relative to the output folder.</summary>
    public string Absolute(string relative) => Path.GetFullPath(Path.Combine(_output, relative));

    public Task<PreparedSummaries> PrepareAsync(IReadOnlyList<SummaryRecord> records, CancellationToken cancellationToken) =>
        PrepareAsync(records, [], cancellationToken);

    /// <summary>Writes the batch's summary rows and the per-point rows of its fitted units, each file flushed under its temporary name.</summary>
    public async Task<PreparedSummaries> PrepareAsync(IReadOnlyList<SummaryRecord> records, IReadOnlyList<PointRecord> points, CancellationToken cancellationToken)
    {
        if (!Directory.Exists(_output))
        {
            throw new DirectoryNotFoundException($"The output folder {_output} does not exist (removed, or a share not mounted); inputs are held until it is back.");
        }

        var partitionOfKey = new Dictionary<string, string>(StringComparer.Ordinal);
        foreach (var record in records)
        {
            partitionOfKey[record.UnitKey] = PartitionOf(record);
        }

        var pointsByPartition = new Dictionary<string, List<PointRecord>>(StringComparer.Ordinal);
        foreach (var point in points)
        {
            if (!partitionOfKey.TryGetValue(point.UnitKey, out var partition))
            {
                throw new ArgumentException($"Point rows of unit {point.UnitKey} come without its summary row.", nameof(points));
            }

            if (!pointsByPartition.TryGetValue(partition, out var list))
            {
                pointsByPartition[partition] = list = [];
            }

            list.Add(point);
        }

        var prepared = new PreparedSummaries(this);
        try
        {
            if (records.Count > 0)
            {
                prepared.Hold(PublishLock.Shared(_root));
            }

            if (points.Count > 0)
            {
                prepared.Hold(PublishLock.Shared(_pointsRoot));
            }

            foreach (var group in records.GroupBy(PartitionOf).OrderBy(g => g.Key, StringComparer.Ordinal))
            {
                var sequence = Interlocked.Increment(ref _sequence);
                var name = string.Create(CultureInfo.InvariantCulture, $"{_filePrefix}-{sequence:D5}.parquet");
                await WriteFileAsync(prepared, Path.Combine(_root, group.Key, name), group.ToList(), cancellationToken).ConfigureAwait(false);
                if (pointsByPartition.TryGetValue(group.Key, out var rows))
                {
                    await WriteFileAsync(prepared, Path.Combine(_pointsRoot, group.Key, name), rows, cancellationToken).ConfigureAwait(false);
                }
            }
        }
        catch
        {
            prepared.Abandon();
            throw;
        }

        return prepared;
    }

    public async Task WriteAsync(IReadOnlyList<SummaryRecord> records, CancellationToken cancellationToken) =>
        await WriteAsync(records, [], cancellationToken).ConfigureAwait(false);

    public async Task WriteAsync(IReadOnlyList<SummaryRecord> records, IReadOnlyList<PointRecord> points, CancellationToken cancellationToken)
    {
        var prepared = await PrepareAsync(records, points, cancellationToken).ConfigureAwait(false);
        prepared.Complete();
    }

    private async Task WriteFileAsync<T>(PreparedSummaries prepared, string final, IReadOnlyCollection<T> rows, CancellationToken cancellationToken)
    {
        Directory.CreateDirectory(Path.GetDirectoryName(final)!);
        var temporary = TemporaryOf(final);
        prepared.Add(temporary, final);
        await using var stream = new FileStream(temporary, FileMode.CreateNew, FileAccess.Write, FileShare.None, 64 * 1024, FileOptions.Asynchronous);
        await ParquetSerializer.SerializeAsync(rows, stream, Options, cancellationToken: cancellationToken).ConfigureAwait(false);
        await stream.FlushAsync(cancellationToken).ConfigureAwait(false);
        stream.Flush(flushToDisk: true);
    }

    /// <summary>
    /// Renames a prepared file to its final name if that has not happened yet (recovery of a batch
    /// the journal holds). True too when <c>standfit compact</c> has merged the published file into
    /// another (a compaction manifest of its folder names it). False when the file is nowhere.
    /// </summary>
    public bool RollForward(string relativeFinal)
    {
        var final = Absolute(relativeFinal);
        if (!Directory.Exists(TableFolderOf(final)))
        {
            return false;
        }

        using var held = PublishLock.Shared(TableFolderOf(final));
        if (File.Exists(final))
        {
            return true;
        }

        var temporary = TemporaryOf(final);
        if (!File.Exists(temporary))
        {
            return CompactionManifest.WasCompacted(Path.GetDirectoryName(final)!, Path.GetFileName(final));
        }

        File.Move(temporary, final, overwrite: false);
        return true;
    }

    /// <summary>The table folder (<c>summaries</c> or <c>points</c>) of a file in one of its partitions.</summary>
    private static string TableFolderOf(string file) => Path.GetDirectoryName(Path.GetDirectoryName(file)!)!;

    /// <summary>Deletes this worker's temporary files (summaries and points) that no journal entry needs (a crash before the entry was written).</summary>
    public int DeleteOrphans(IReadOnlySet<string> keepRelativeFinals)
    {
        var deleted = 0;
        foreach (var root in new[] { _root, _pointsRoot })
        {
            if (!Directory.Exists(root))
            {
                continue;
            }

            using var held = PublishLock.Shared(root);
            foreach (var temporary in Directory.EnumerateFiles(root, _temporaryPrefix + "*.tmp", SearchOption.AllDirectories))
            {
                var name = Path.GetFileName(temporary);
                var final = Path.Combine(Path.GetDirectoryName(temporary)!, name[_temporaryPrefix.Length..^".tmp".Length]);
                if (!keepRelativeFinals.Contains(Relative(final)))
                {
                    File.Delete(temporary);
                    deleted++;
                }
            }
        }

        return deleted;
    }
}

/// <summary>
/// Summary and point files written and flushed under temporary names, waiting to be renamed. Holds
/// the tables' <see cref="PublishLock"/> shared until <see cref="Complete"/> or <see cref="Abandon"/>
/// (the system releases it if the process dies).
/// </summary>
public sealed class PreparedSummaries
{
    private readonly ParquetSummaryWriter _writer;
    private readonly List<(string Temporary, string Final)> _files = [];
    private readonly List<IDisposable> _locks = [];

    internal PreparedSummaries(ParquetSummaryWriter writer) => _writer = writer;

    /// <summary>The final paths, relative to the output folder.</summary>
    public IReadOnlyList<string> RelativeFinals => [.. _files.Select(f => _writer.Relative(f.Final))];

    internal void Add(string temporary, string final) => _files.Add((temporary, final));

    internal void Hold(IDisposable publishLock) => _locks.Add(publishLock);

    /// <summary>Renames every file to its final name (already renamed ones are left as they are), then releases the publish locks.</summary>
    public void Complete()
    {
        try
        {
            foreach (var (temporary, final) in _files)
            {
                if (!File.Exists(final))
                {
                    File.Move(temporary, final, overwrite: false);
                }
            }
        }
        finally
        {
            Release();
        }
    }

    /// <summary>Removes the temporary files (the batch was not committed), then releases the publish locks.</summary>
    public void Abandon()
    {
        foreach (var (temporary, _) in _files)
        {
            try
            {
                File.Delete(temporary);
            }
            catch (Exception e) when (e is IOException or UnauthorizedAccessException)
            {
                // The name is hidden and never read; the next start deletes it.
            }
        }

        Release();
    }

    private void Release()
    {
        foreach (var held in _locks)
        {
            held.Dispose();
        }

        _locks.Clear();
    }
}
