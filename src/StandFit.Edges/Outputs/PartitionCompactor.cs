using System.Globalization;
using System.Text.Json;
using System.Text.Json.Serialization;
using Parquet;
using Parquet.Schema;
using Parquet.Serialization;

namespace StandFit.Edges.Outputs;

/// <summary>The tables <c>standfit compact</c> can merge.</summary>
public enum CompactTable
{
    Summaries,
    Points,
    Runs,
}

/// <summary>Another <c>standfit compact</c> holds the table's lock.</summary>
public sealed class CompactBusyException(string message, Exception inner) : IOException(message, inner);

/// <summary>How a compaction published its merged file.</summary>
public enum CompactProtocol
{
    /// <summary>The folder was swapped for a staged copy in one step (Linux): every reader, a plain glob too, sees each row once.</summary>
    Swap,

    /// <summary>Rename the merged file in, then delete the inputs (Windows, or a file system that refuses the swap): a reader must follow <see cref="CompactionManifest.Superseded"/>.</summary>
    Files,
}

/// <summary>What compacting one folder did (or, in a dry run, would do).</summary>
public sealed record CompactionResult(CompactTable Table, string Folder, IReadOnlyList<string> Inputs, string? Merged, long Rows, int RowGroups, long BytesBefore, long BytesAfter, IReadOnlyList<string> Skipped, int Resolved)
{
    /// <summary>How the merged file was published; null when nothing was merged.</summary>
    public CompactProtocol? Protocol { get; init; }

    /// <summary>Why the swap could not be used and the file protocol was (the errno of the refused call), or null.</summary>
    public string? SwapRefused { get; init; }
}

/// <summary>Tests only: a kill at a step of a compaction, stood for by the <see cref="PartitionCompactor.AfterStep"/> hook throwing. Nothing is cleaned up after it, as after a real kill.</summary>
internal sealed class CompactionKilledException(string step, Exception inner) : IOException("compaction killed after step " + step, inner);

/// <summary>
/// A compaction's manifest, <c>.compact~ID.json</c> in the folder it merges: the merged file's name
/// and its inputs. With the folder swap it is written into the staged folder, so it arrives in the
/// live folder with the merged file, in the swap; with the file protocol it is written (temporary
/// name, flushed, renamed) after the merged file is on disk under its temporary name and before it
/// is renamed: that protocol's commit point. Kept after the compaction (and carried into every
/// later swap) as the record that the inputs' rows now live in the merged file (a worker's recovery
/// reads it, see <see cref="ParquetSummaryWriter.RollForward"/>).
/// </summary>
public sealed record CompactionManifest
{
    [JsonPropertyName("merged")]
    public required string Merged { get; init; }

    [JsonPropertyName("inputs")]
    public required IReadOnlyList<string> Inputs { get; init; }

    [JsonPropertyName("rows")]
    public long Rows { get; init; }

    internal const string Prefix = ".compact~";

    private static readonly JsonSerializerOptions Json = new() { WriteIndented = false };

    /// <summary>Every manifest in a folder (unreadable ones are left out: a torn temporary never has the final name).</summary>
    public static IReadOnlyList<CompactionManifest> ReadAll(string folder)
    {
        if (!Directory.Exists(folder))
        {
            return [];
        }

        var manifests = new List<CompactionManifest>();
        foreach (var path in Directory.EnumerateFiles(folder, Prefix + "*.json").Order(StringComparer.Ordinal))
        {
            try
            {
                if (JsonSerializer.Deserialize<CompactionManifest>(File.ReadAllBytes(path), Json) is { } m)
                {
                    manifests.Add(m);
                }
            }
            catch (Exception e) when (e is IOException or JsonException or UnauthorizedAccessException)
            {
                // A manifest is renamed into place whole; one that cannot be read now is read at the next try.
            }
        }

        return manifests;
    }

    /// <summary>
    /// The reader's rule: the files whose rows a published merged file already holds (a manifest
    /// whose merged file is present lists them). A reader leaves them out, so between the merged
    /// file's rename and the inputs' deletion it still sees each row once. Give
    /// <paramref name="listed"/>, the names a reader listed, to judge by that listing (read the
    /// manifests after listing: a merged file's manifest is always written before its rename).
    /// </summary>
    public static IReadOnlySet<string> Superseded(string folder, IReadOnlySet<string>? listed = null)
    {
        var superseded = new HashSet<string>(StringComparer.Ordinal);
        foreach (var m in ReadAll(folder).Where(m => listed?.Contains(m.Merged) ?? File.Exists(Path.Combine(folder, m.Merged))))
        {
            superseded.UnionWith(m.Inputs);
        }

        return superseded;
    }

    /// <summary>True when a compaction took this file in (its rows are in a merged file now, or about to be).</summary>
    public static bool WasCompacted(string folder, string name) => ReadAll(folder).Any(m => m.Inputs.Contains(name, StringComparer.Ordinal));

    internal static string PathOf(string folder, string id) => Path.Combine(folder, Prefix + id + ".json");

    internal void Write(string path)
    {
        var temporary = path + ".tmp";
        using (var stream = new FileStream(temporary, FileMode.Create, FileAccess.Write, FileShare.None))
        {
            JsonSerializer.Serialize(stream, this, Json);
            stream.Flush(flushToDisk: true);
        }

        File.Move(temporary, path, overwrite: false);
    }
}

/// <summary>
/// <c>standfit compact</c>: merges the small Parquet files of one folder of a table (a
/// <c>date=YYYY-MM-DD</c> partition of the summary or per-point table, or the runs folder) into
/// one file, in row groups of at most <see cref="SummaryRowGroupRows"/>, <see cref="PointRowGroupRows"/> rows.
/// <para>
/// Choosing the inputs: published files (final <c>*.parquet</c> names; a worker writes under a
/// hidden temporary name and never changes a published file) that no manifest supersedes, last
/// written at least <see cref="MinimumAge"/> ago, of the current schema of the table (files of
/// another schema version are left as they are), and for the runs table only rows of runs that
/// have ended (a running <c>watch</c> rewrites its file). Fewer than two: nothing to do.
/// </para>
/// <para>
/// <b>Swap</b> (Linux; <see cref="CompactProtocol.Swap"/>): the merged file is written, flushed and
/// counted back in a staged folder <c>OUTPUT/.compact/TABLE~FOLDER~ID/</c> (outside every table
/// folder, so no glob of a table sees it) with the manifest; then, holding
/// <see cref="PublishLock"/> exclusively, the live folder is listed and every entry but the
/// inputs (files published meanwhile, files left as they are, earlier manifests, a crashed worker's
/// temporary files) gets a hard link in the staged folder, and <c>renameat2(RENAME_EXCHANGE)</c>
/// swaps the two folders: the commit point, one step in which the folder's name passes from the
/// old directory (inputs) to the new one (merged file). The old directory, now under the staged name,
/// is renamed <c>….retired~TIME</c> and never changed again, so a reader that was listing it when
/// the swap came finishes a whole listing; it is deleted by a compaction at least
/// <see cref="RetiredGrace"/> later. Resolution of a killed swap: a staged folder whose id has no
/// manifest in the live folder was never swapped in (deleted); one whose id has is the old
/// directory (retired).
/// </para>
/// <para>
/// <b>Files</b> (Windows, no atomic directory exchange; or a file system that refuses a hard link or
/// the exchange, such as NFS, SMB or FAT; <see cref="CompactProtocol.Files"/>):
/// <list type="number">
/// <item>Write the merged file under a hidden temporary name (<c>.compact~compact-ID.parquet.tmp</c>),
/// flush it to disk, and read back its row count.</item>
/// <item>Write the manifest <c>.compact~ID.json</c> (temporary name, flushed, renamed): the commit
/// point.</item>
/// <item>Rename the merged file to <c>compact-ID.parquet</c>. From here a reader following the rule
/// of <see cref="CompactionManifest.Superseded"/> leaves the inputs out.</item>
/// <item>Delete the inputs.</item>
/// </list>
/// Resolution of a killed file protocol, at the start of the next (and by readers): a temporary
/// merged file without a manifest is deleted (the inputs are in force); a manifest whose merged file
/// is still temporary is rolled forward (rename, then step 4); a manifest whose merged file is
/// published has its remaining inputs deleted; a manifest with neither is void and deleted when its
/// inputs are still all there.
/// </para>
/// One compaction at a time per table: <c>TABLE/.compact.lock</c>, held exclusively while it runs
/// (released by the system if the process dies).
/// </summary>
public sealed class PartitionCompactor(string outputFolder, TimeProvider clock)
{
    /// <summary>Rows per row group of a merged summary file (rows are wide: about 100 columns with lists).</summary>
    public const int SummaryRowGroupRows = 10_000;

    /// <summary>Rows per row group of a merged points file (narrow rows: 21 a unit for the demo's sweeps, so about 4,800 units a group).</summary>
    public const int PointRowGroupRows = 100_000;

    /// <summary>The folder of staged and retired folders, in the output folder (beside the tables, in none of them).</summary>
    public const string StagingFolderName = ".compact";

    private const string RetiredMark = ".retired~";

    private const string StampFormat = "yyyyMMdd'T'HHmmssfff";

    private static readonly ParquetOptions Options = new()
    {
        CompressionMethod = CompressionMethod.Zstd,
        CompressionLevel = System.IO.Compression.CompressionLevel.Optimal,
    };

    /// <summary>Only files last written at least this long ago are merged.</summary>
    public TimeSpan MinimumAge { get; init; } = TimeSpan.FromMinutes(10);

    /// <summary>Report what would be merged, change nothing (no resolution either).</summary>
    public bool DryRun { get; init; }

    /// <summary>How long a retired folder is kept after its swap before a compaction deletes it (a reader listing it at the swap finishes its listing long before).</summary>
    public TimeSpan RetiredGrace { get; init; } = TimeSpan.FromMinutes(10);

    /// <summary>How long the swap waits for writers to finish the files they have in flight (<see cref="PublishLock"/>) before it leaves the folder for the next compact.</summary>
    public TimeSpan SwapWait { get; init; } = TimeSpan.FromSeconds(30);

    /// <summary>Whether to swap folders where the system can (Linux); false forces the file protocol (tests of the Windows protocol).</summary>
    internal bool UseSwap { get; init; } = DirectorySwap.IsAvailable;

    /// <summary>
    /// Tests only: called after each step (swap: <c>written</c>, <c>linked</c>, <c>swapped</c>,
    /// <c>retired</c>; files: <c>written</c>, <c>committed</c>, <c>renamed</c>, <c>deleted-one</c>);
    /// throwing there stands for a kill at that point (nothing is cleaned up).
    /// </summary>
    internal Action<string>? AfterStep { get; init; }

    private string StagingRoot => Path.Combine(outputFolder, StagingFolderName);

    public static string TableFolderName(CompactTable table) => table switch
    {
        CompactTable.Summaries => "summaries",
        CompactTable.Points => "points",
        _ => "runs",
    };

    /// <summary>The folders of a table to compact: the partitions within the dates (inclusive; null is open), or the runs folder.</summary>
    public IReadOnlyList<string> Folders(CompactTable table, DateOnly? from, DateOnly? to)
    {
        var root = TableRoot(table);
        if (table == CompactTable.Runs)
        {
            return Directory.Exists(root) ? [root] : [];
        }

        if (!Directory.Exists(root))
        {
            return [];
        }

        return [.. Directory.EnumerateDirectories(root, "date=*")
            .Select(d => (Folder: d, Ok: DateOnly.TryParseExact(Path.GetFileName(d)["date=".Length..], "yyyy-MM-dd", CultureInfo.InvariantCulture, DateTimeStyles.None, out var day), Day: day))
            .Where(d => d.Ok && (from is null || d.Day >= from) && (to is null || d.Day <= to))
            .OrderBy(d => d.Day)
            .Select(d => d.Folder)];
    }

    /// <summary>Takes the table's lock for the life of the returned object. Throws <see cref="CompactBusyException"/>.</summary>
    public IDisposable Lock(CompactTable table)
    {
        var root = TableRoot(table);
        Directory.CreateDirectory(root);
        var path = Path.Combine(root, ".compact.lock");
        try
        {
            return new FileStream(path, FileMode.OpenOrCreate, FileAccess.ReadWrite, FileShare.None);
        }
        catch (IOException e)
        {
            throw new CompactBusyException($"Another 'standfit compact' works on {root} (its lock {path} is held).", e);
        }
    }

    /// <summary>A new compaction id: the UTC time and a random part, so that names sort by time and never repeat.</summary>
    public string NewId() =>
        clock.GetUtcNow().UtcDateTime.ToString(StampFormat, CultureInfo.InvariantCulture) + "-" + Convert.ToHexStringLower(System.Security.Cryptography.RandomNumberGenerator.GetBytes(4));

    /// <summary>Compacts one folder of a table (the caller holds the table's lock). <paramref name="id"/> names the merged file (give the summaries and points of one partition the same id, so that their files keep sharing names).</summary>
    public async Task<CompactionResult> CompactAsync(CompactTable table, string folder, string id, CancellationToken cancellationToken = default) => table switch
    {
        CompactTable.Summaries => await CompactAsync<SummaryRecord>(table, folder, id, SummaryRowGroupRows, _ => true, cancellationToken).ConfigureAwait(false),
        CompactTable.Points => await CompactAsync<PointRecord>(table, folder, id, PointRowGroupRows, _ => true, cancellationToken).ConfigureAwait(false),
        _ => await CompactAsync<RunRecord>(table, folder, id, int.MaxValue, r => r.State != RunStates.Running, cancellationToken).ConfigureAwait(false),
    };

    /// <summary>Finishes or undoes what killed file-protocol compactions left in a folder; returns how many it resolved.</summary>
    public static int Resolve(string folder)
    {
        if (!Directory.Exists(folder))
        {
            return 0;
        }

        var resolved = 0;
        var named = new HashSet<string>(StringComparer.Ordinal);
        foreach (var m in CompactionManifest.ReadAll(folder))
        {
            var final = Path.Combine(folder, m.Merged);
            var temporary = TemporaryOf(folder, m.Merged);
            named.Add(Path.GetFileName(temporary));
            if (!File.Exists(final) && File.Exists(temporary))
            {
                File.Move(temporary, final, overwrite: false); // committed but not renamed: roll forward
                resolved++;
            }

            if (File.Exists(final))
            {
                foreach (var input in m.Inputs.Where(i => File.Exists(Path.Combine(folder, i))))
                {
                    File.Delete(Path.Combine(folder, input));
                    resolved++;
                }
            }
            else if (m.Inputs.All(i => File.Exists(Path.Combine(folder, i))))
            {
                // Neither the merged file nor its temporary, inputs all there: the compaction never happened.
                File.Delete(CompactionManifest.PathOf(folder, Id(m.Merged)));
                resolved++;
            }
        }

        // Merged files written but never committed, and torn manifest temporaries.
        foreach (var orphan in Directory.EnumerateFiles(folder, CompactionManifest.Prefix + "*.tmp").Where(p => !named.Contains(Path.GetFileName(p))))
        {
            File.Delete(orphan);
            resolved++;
        }

        return resolved;
    }

    /// <summary>
    /// Resolves the staged folders killed swaps of <paramref name="folder"/> left (one never swapped
    /// in is deleted; one that was is the old directory, retired), and deletes its retired folders
    /// older than <see cref="RetiredGrace"/>; returns how many it resolved. The caller holds the table's lock.
    /// </summary>
    public int ResolveStaged(string folder)
    {
        if (!Directory.Exists(StagingRoot))
        {
            return 0;
        }

        var prefix = StagedPrefix(folder);
        var resolved = 0;
        foreach (var staged in Directory.EnumerateDirectories(StagingRoot).Where(d => Path.GetFileName(d).StartsWith(prefix, StringComparison.Ordinal)).ToList())
        {
            var id = Path.GetFileName(staged)[prefix.Length..];
            if (id.Contains(RetiredMark, StringComparison.Ordinal))
            {
                continue;
            }

            if (File.Exists(CompactionManifest.PathOf(folder, id)))
            {
                Retire(staged); // swapped: this is the old directory
            }
            else
            {
                Directory.Delete(staged, recursive: true); // never swapped in: the live folder is as it was
            }

            resolved++;
        }

        return resolved + SweepRetired(prefix);
    }

    /// <summary>Deletes the retired folders of a table older than <see cref="RetiredGrace"/> (the caller holds the table's lock); returns how many.</summary>
    public int SweepRetired(CompactTable table) => DryRun ? 0 : SweepRetired(TableFolderName(table) + "~");

    private int SweepRetired(string prefix)
    {
        if (!Directory.Exists(StagingRoot))
        {
            return 0;
        }

        var now = clock.GetUtcNow().UtcDateTime;
        var swept = 0;
        foreach (var retired in Directory.EnumerateDirectories(StagingRoot).Where(d => Path.GetFileName(d).StartsWith(prefix, StringComparison.Ordinal)).ToList())
        {
            var name = Path.GetFileName(retired);
            var at = name.IndexOf(RetiredMark, StringComparison.Ordinal);
            if (at >= 0
                && DateTime.TryParseExact(name[(at + RetiredMark.Length)..], StampFormat, CultureInfo.InvariantCulture, DateTimeStyles.AdjustToUniversal | DateTimeStyles.AssumeUniversal, out var when)
                && now - when >= RetiredGrace)
            {
                Directory.Delete(retired, recursive: true);
                swept++;
            }
        }

        return swept;
    }

    private string TableRoot(CompactTable table) => Path.Combine(outputFolder, TableFolderName(table));

    /// <summary><c>summaries~date=2026-12-01~</c> for a partition, <c>runs~</c> for the runs folder: the folder's path in the output folder, '~' for each separator.</summary>
    private string StagedPrefix(string folder) => Path.GetRelativePath(outputFolder, folder).Replace('\\', '/').Replace('/', '~') + "~";

    private void Retire(string staged) =>
        Directory.Move(staged, staged + RetiredMark + clock.GetUtcNow().UtcDateTime.ToString(StampFormat, CultureInfo.InvariantCulture));

    private static string Id(string mergedName) => mergedName["compact-".Length..^".parquet".Length];

    private static string MergedName(string id) => "compact-" + id + ".parquet";

    private static string TemporaryOf(string folder, string mergedName) => Path.Combine(folder, CompactionManifest.Prefix + mergedName + ".tmp");

    private void Step(string step)
    {
        if (AfterStep is null)
        {
            return;
        }

        try
        {
            AfterStep(step);
        }
        catch (Exception e)
        {
            throw new CompactionKilledException(step, e);
        }
    }

    private async Task<CompactionResult> CompactAsync<T>(CompactTable table, string folder, string id, int rowGroupRows, Func<T, bool> closed, CancellationToken cancellationToken)
        where T : class, new()
    {
        var resolved = DryRun ? 0 : Resolve(folder) + (UseSwap ? ResolveStaged(folder) : 0);
        var superseded = CompactionManifest.Superseded(folder);
        var expected = typeof(T).GetParquetSchema(forWriting: true);
        var now = clock.GetUtcNow().UtcDateTime;
        var inputs = new List<string>();
        var skipped = new List<string>();
        long bytesBefore = 0;
        var candidates = Directory.EnumerateFiles(folder, "*.parquet")
            .Where(p => !Path.GetFileName(p).StartsWith('.') && !superseded.Contains(Path.GetFileName(p)))
            .Order(StringComparer.Ordinal)
            .ToList();
        foreach (var path in candidates)
        {
            var name = Path.GetFileName(path);
            if (now - File.GetLastWriteTimeUtc(path) < MinimumAge)
            {
                skipped.Add(name + ": written less than the minimum age ago");
                continue;
            }

            var (schemaOk, allClosed) = await InspectAsync(path, expected, closed, table == CompactTable.Runs, cancellationToken).ConfigureAwait(false);
            if (!schemaOk)
            {
                skipped.Add(name + ": another schema (version) than this tool writes");
                continue;
            }

            if (!allClosed)
            {
                skipped.Add(name + ": a run still running");
                continue;
            }

            inputs.Add(name);
            bytesBefore += new FileInfo(path).Length;
        }

        if (inputs.Count < 2)
        {
            return new CompactionResult(table, folder, inputs.Count == 1 ? [] : inputs, null, 0, 0, bytesBefore, bytesBefore, skipped, resolved);
        }

        var merged = MergedName(id);
        if (DryRun)
        {
            return new CompactionResult(table, folder, inputs, merged, -1, 0, bytesBefore, 0, skipped, 0);
        }

        string? refused = null;
        if (UseSwap)
        {
            var (result, why) = await SwapAsync<T>(table, folder, id, inputs, rowGroupRows, bytesBefore, skipped, resolved, cancellationToken).ConfigureAwait(false);
            if (result is not null)
            {
                return result;
            }

            refused = why;
        }

        return (await FilesAsync<T>(table, folder, id, inputs, rowGroupRows, bytesBefore, skipped, resolved, cancellationToken).ConfigureAwait(false)) with { SwapRefused = refused };
    }

    /// <summary>The swap; (null, why) when the file system refuses a hard link or the exchange (the staged folder is gone again and the live one untouched: use the file protocol).</summary>
    private async Task<(CompactionResult? Result, string? Refused)> SwapAsync<T>(CompactTable table, string folder, string id, List<string> inputs, int rowGroupRows, long bytesBefore, List<string> skipped, int resolved, CancellationToken cancellationToken)
        where T : class, new()
    {
        var merged = MergedName(id);
        Directory.CreateDirectory(StagingRoot);
        var staged = Path.Combine(StagingRoot, StagedPrefix(folder) + id);
        if (Directory.Exists(staged))
        {
            throw new IOException($"The staged folder {staged} exists already; compaction ids never repeat, so something else made it.");
        }

        Directory.CreateDirectory(staged);
        var swapped = false;
        try
        {
            // The merged file and its manifest in the staged folder, flushed; no glob of a table reaches it.
            var (rows, groups) = await WriteMergedAsync<T>(Path.Combine(staged, merged), folder, inputs, rowGroupRows, cancellationToken).ConfigureAwait(false);
            Step("written");
            new CompactionManifest { Merged = merged, Inputs = inputs, Rows = rows }.Write(CompactionManifest.PathOf(staged, id));

            using (var held = PublishLock.Exclusive(TableRoot(table), SwapWait))
            {
                if (held is null)
                {
                    Directory.Delete(staged, recursive: true);
                    skipped.Add(string.Create(CultureInfo.InvariantCulture, $"the whole folder: writers kept files in flight ({TableFolderName(table)}/{PublishLock.FileName} held) for over {SwapWait.TotalSeconds:F0} s; left for the next compact"));
                    return (new CompactionResult(table, folder, [], null, 0, 0, bytesBefore, bytesBefore, skipped, resolved), null);
                }

                // No writer has a file in flight now: what the live folder holds besides the inputs goes into the staged one, as a second name.
                var entries = Directory.EnumerateFileSystemEntries(folder).ToList();
                if (entries.Any(Directory.Exists))
                {
                    Directory.Delete(staged, recursive: true);
                    return (null, "the folder holds a folder, which cannot be linked");
                }

                var names = entries.Select(e => Path.GetFileName(e)).ToHashSet(StringComparer.Ordinal);
                if (inputs.FirstOrDefault(i => !names.Contains(i)) is { } gone)
                {
                    throw new InvalidDataException($"{Path.Combine(folder, gone)} was removed while it was being merged (only StandFit may change the tables' folders); nothing was changed.");
                }

                foreach (var name in names.Where(n => !inputs.Contains(n, StringComparer.Ordinal)).Order(StringComparer.Ordinal))
                {
                    var errno = DirectorySwap.Link(Path.Combine(folder, name), Path.Combine(staged, name));
                    if (errno != 0)
                    {
                        if (DirectorySwap.IsUnsupported(errno))
                        {
                            Directory.Delete(staged, recursive: true);
                            return (null, string.Create(CultureInfo.InvariantCulture, $"the file system refuses hard links (errno {errno})"));
                        }

                        throw new IOException(string.Create(CultureInfo.InvariantCulture, $"{Path.Combine(folder, name)} cannot be linked into {staged} (errno {errno})."));
                    }
                }

                DirectorySwap.Sync(staged);
                Step("linked");

                // The commit point: the folder's name passes to the staged directory in one step.
                var exchange = DirectorySwap.Exchange(folder, staged);
                if (exchange != 0)
                {
                    if (DirectorySwap.IsUnsupported(exchange))
                    {
                        Directory.Delete(staged, recursive: true);
                        return (null, string.Create(CultureInfo.InvariantCulture, $"the file system refuses to exchange folders (errno {exchange})"));
                    }

                    throw new IOException(string.Create(CultureInfo.InvariantCulture, $"{folder} and {staged} cannot be exchanged (errno {exchange}); nothing was changed."));
                }

                swapped = true;
                DirectorySwap.Sync(Path.GetDirectoryName(folder)!);
                DirectorySwap.Sync(StagingRoot);
                Step("swapped");
            }

            // The old directory, under the staged name: retired, never changed again, deleted after the grace.
            Retire(staged);
            Step("retired");
            resolved += SweepRetired(StagedPrefix(folder));
            return (new CompactionResult(table, folder, inputs, merged, rows, groups, bytesBefore, new FileInfo(Path.Combine(folder, merged)).Length, skipped, resolved) { Protocol = CompactProtocol.Swap }, null);
        }
        catch (Exception e) when (e is not CompactionKilledException && !swapped)
        {
            TryDeleteFolder(staged);
            throw;
        }
    }

    /// <summary>The file protocol (Windows, or where the swap is refused): rename the merged file in, then delete the inputs.</summary>
    private async Task<CompactionResult> FilesAsync<T>(CompactTable table, string folder, string id, List<string> inputs, int rowGroupRows, long bytesBefore, List<string> skipped, int resolved, CancellationToken cancellationToken)
        where T : class, new()
    {
        var merged = MergedName(id);

        // Step 1: the merged file under its temporary name, flushed to disk, its rows counted back.
        var temporary = TemporaryOf(folder, merged);
        long rows;
        int groups;
        try
        {
            (rows, groups) = await WriteMergedAsync<T>(temporary, folder, inputs, rowGroupRows, cancellationToken).ConfigureAwait(false);
            Step("written");

            // Step 2: the commit point.
            new CompactionManifest { Merged = merged, Inputs = inputs, Rows = rows }.Write(CompactionManifest.PathOf(folder, id));
        }
        catch (Exception e) when (e is not CompactionKilledException)
        {
            if (!File.Exists(CompactionManifest.PathOf(folder, id)))
            {
                TryDelete(temporary);
            }

            throw;
        }

        Step("committed");

        // Step 3: published; readers following the rule leave the inputs out from here.
        File.Move(temporary, Path.Combine(folder, merged), overwrite: false);
        Step("renamed");

        // Step 4: the inputs go.
        foreach (var input in inputs)
        {
            File.Delete(Path.Combine(folder, input));
            Step("deleted-one");
        }

        return new CompactionResult(table, folder, inputs, merged, rows, groups, bytesBefore, new FileInfo(Path.Combine(folder, merged)).Length, skipped, resolved) { Protocol = CompactProtocol.Files };
    }

    /// <summary>Writes the inputs' rows into <paramref name="path"/> (a new file), flushes it to disk and checks its row count against the inputs'; returns the rows and row groups.</summary>
    private static async Task<(long Rows, int Groups)> WriteMergedAsync<T>(string path, string folder, List<string> inputs, int rowGroupRows, CancellationToken cancellationToken)
        where T : class, new()
    {
        long rows = 0;
        var groups = 0;
        await using (var stream = new FileStream(path, FileMode.CreateNew, FileAccess.ReadWrite, FileShare.None, 64 * 1024, FileOptions.Asynchronous))
        {
            var buffer = new List<T>();
            foreach (var input in inputs)
            {
                foreach (var row in await ReadAsync<T>(Path.Combine(folder, input), cancellationToken).ConfigureAwait(false))
                {
                    buffer.Add(row);
                    if (buffer.Count >= rowGroupRows)
                    {
                        await WriteGroupAsync(stream, buffer, groups++ > 0, cancellationToken).ConfigureAwait(false);
                        rows += buffer.Count;
                        buffer.Clear();
                    }
                }
            }

            if (buffer.Count > 0)
            {
                await WriteGroupAsync(stream, buffer, groups++ > 0, cancellationToken).ConfigureAwait(false);
                rows += buffer.Count;
            }

            await stream.FlushAsync(cancellationToken).ConfigureAwait(false);
            stream.Flush(flushToDisk: true);
        }

        long inputRows = 0;
        foreach (var input in inputs)
        {
            inputRows += await CountAsync(Path.Combine(folder, input), cancellationToken).ConfigureAwait(false);
        }

        var written = await CountAsync(path, cancellationToken).ConfigureAwait(false);
        if (written != rows || written != inputRows)
        {
            throw new InvalidDataException($"The merged file {path} holds {written} rows, its inputs {inputRows}: not published.");
        }

        return (rows, groups);
    }

    private static async Task WriteGroupAsync<T>(FileStream stream, List<T> rows, bool append, CancellationToken cancellationToken)
    {
        var options = new ParquetOptions
        {
            CompressionMethod = Options.CompressionMethod,
            CompressionLevel = Options.CompressionLevel,
            Append = append,
        };
        await ParquetSerializer.SerializeAsync(rows, stream, options, cancellationToken: cancellationToken).ConfigureAwait(false);
    }

    private static async Task<IList<T>> ReadAsync<T>(string path, CancellationToken cancellationToken)
        where T : class, new()
    {
        await using var stream = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.ReadWrite | FileShare.Delete, 64 * 1024, FileOptions.Asynchronous | FileOptions.SequentialScan);
        var result = await ParquetSerializer.DeserializeAsync<T>(stream, cancellationToken: cancellationToken).ConfigureAwait(false);
        return result.Data;
    }

    private static async Task<long> CountAsync(string path, CancellationToken cancellationToken)
    {
        await using var stream = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.ReadWrite | FileShare.Delete);
        await using var reader = await ParquetReader.CreateAsync(stream, cancellationToken: cancellationToken).ConfigureAwait(false);
        long rows = 0;
        for (var g = 0; g < reader.RowGroupCount; g++)
        {
            using var group = reader.OpenRowGroupReader(g);
            rows += group.RowCount;
        }

        return rows;
    }

    /// <summary>Whether a file has the schema this tool writes for <typeparamref name="T"/>, and (runs) whether every row's run has ended.</summary>
    private static async Task<(bool SchemaOk, bool Closed)> InspectAsync<T>(string path, ParquetSchema expected, Func<T, bool> closed, bool readRows, CancellationToken cancellationToken)
        where T : class, new()
    {
        try
        {
            await using (var stream = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.ReadWrite | FileShare.Delete))
            {
                await using var reader = await ParquetReader.CreateAsync(stream, cancellationToken: cancellationToken).ConfigureAwait(false);
                if (!reader.Schema.Equals(expected))
                {
                    return (false, false);
                }
            }

            return (true, !readRows || (await ReadAsync<T>(path, cancellationToken).ConfigureAwait(false)).All(closed));
        }
        catch (Exception e) when (e is InvalidDataException or IOException or NotSupportedException)
        {
            return (false, false);
        }
    }

    private static void TryDelete(string path)
    {
        try
        {
            File.Delete(path);
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            // Hidden; the next compaction deletes it.
        }
    }

    private static void TryDeleteFolder(string path)
    {
        try
        {
            Directory.Delete(path, recursive: true);
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            // Outside every table folder; the next compaction of the folder deletes it.
        }
    }
}
