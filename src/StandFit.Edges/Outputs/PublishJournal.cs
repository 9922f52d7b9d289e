using System.Text.Json;
using StandFit.Core.Problems;

namespace StandFit.Edges.Outputs;

/// <summary>
/// The publish journal: per worker, <c>output/journal/WORKER.jsonl</c>, append-only between
/// compactions, one JSON object a line, each line flushed to disk before the next step
/// (<see cref="JournalFile"/>). A batch line is the commit point of a batch: it is written after the
/// batch's Parquet files are on disk under their temporary names and before they are renamed, so a
/// crash on either side of it repeats nothing and loses nothing. A <c>{"logged":ID}</c> line follows
/// once the batch's pass/fail lines are on disk.
/// <para>
/// The keys live on disk. Once the journal holds <see cref="CompactUnits"/> units and nothing in it
/// is unfinished, <see cref="CompactIfDue"/> folds its keys into the worker's index files
/// (<c>WORKER.GGGGGG.idx</c>, sorted, checksummed, immutable) and replaces the journal by one header
/// line naming them (<see cref="JournalCompactor"/>). So the journal and the keys in memory stay
/// bounded, whatever the number of units ever published, and the index on disk grows by about
/// 160 bytes a unit.
/// </para>
/// <para>
/// Read at start: the own journal's header (its index files, each checked whole), then its lines:
/// the recent keys, the batches whose pass/fail lines may be missing, the claimed inputs whose work
/// is committed but not finished; and the other workers' journals and index files (read again as
/// they grow or compact, <see cref="OtherJournals"/>), so duplicates and retests are known across
/// workers. A torn last line (a crash in the middle of an append) is cut off; a damaged line
/// elsewhere, or a missing or damaged index file, is fatal (<see cref="JournalCorruptException"/>).
/// </para>
/// </summary>
public sealed class PublishJournal : IDisposable
{
    /// <summary>The default of <c>output.journal_compact_units</c>.</summary>
    public const int DefaultCompactUnits = 10_000;

    private readonly string _folder;
    private readonly string _workerId;
    private readonly JournalFile _file;
    private readonly OtherJournals _others;
    private readonly Dictionary<string, (JournalUnit Unit, DateTime At)> _committedClaims = new(StringComparer.Ordinal);
    private readonly List<JournalBatch> _unlogged = [];
    private KeyIndex _index = KeyIndex.Empty();
    private int _units;

    private PublishJournal(string outputFolder, string workerId, int compactUnits)
    {
        _folder = Path.Combine(outputFolder, "journal");
        _workerId = workerId;
        _file = JournalFile.Open(IndexFiles.JournalPath(_folder, workerId));
        _others = new OtherJournals(_folder, _file.Path);
        CompactUnits = compactUnits;
    }

    public string OwnFile => _file.Path;

    /// <summary>Compact once the journal holds this many units.</summary>
    public int CompactUnits { get; }

    /// <summary>Units in the journal file now (since its header).</summary>
    public int UnitsInJournal => _units;

    /// <summary>Batches committed but not yet marked logged (their lines may be missing), oldest first.</summary>
    public IReadOnlyList<JournalBatch> Unlogged => _unlogged;

    /// <summary>Claimed inputs whose batch is committed but which were not yet moved on, by claim name.</summary>
    public IReadOnlyDictionary<string, (JournalUnit Unit, DateTime At)> CommittedClaims => _committedClaims;

    /// <summary>Unit keys known: this worker's (index files and journal) and the other workers'.</summary>
    public long PublishedCount => _index.KeyCount + _others.KeyCount;

    /// <summary>This worker's index files now, oldest first.</summary>
    internal IReadOnlyList<string> IndexFileNames => [.. _index.Segments.Select(s => s.Name)];

    /// <summary>Reads every journal of the output folder. <paramref name="liveClaims"/>: the claim names now in the worker's claim folder.</summary>
    public static PublishJournal Open(string outputFolder, string workerId, IReadOnlySet<string> liveClaims, int compactUnits = DefaultCompactUnits)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(compactUnits, 1);
        if (!Directory.Exists(Path.Combine(outputFolder, "journal")))
        {
            return new PublishJournal(outputFolder, workerId, compactUnits);
        }

        var journal = new PublishJournal(outputFolder, workerId, compactUnits);
        try
        {
            journal.ReadOwn(liveClaims);
            IndexFiles.RemoveLeftovers(journal._folder, workerId, journal._index.Segments.Select(s => s.Name).ToHashSet(StringComparer.Ordinal));
            journal.Refresh();
            return journal;
        }
        catch
        {
            journal.Dispose();
            throw;
        }
    }

    /// <summary>Reads what the other workers' journals gained since the last read.</summary>
    public void Refresh() => _others.Refresh();

    /// <summary>The first published result of a unit key, or null when it was never published.</summary>
    public FirstResult? Lookup(string unitKey) =>
        UnitKeyBits.TryParse(unitKey, out var key) && (_index.TryFirst(key, out var record) || _others.TryFirst(key, out record))
            ? record.First
            : null;

    /// <summary>
    /// The unit key of the latest published row of a part and serial, or null: this worker's latest
    /// (in the order it published them), unless another worker published one later by the clock.
    /// </summary>
    public string? LatestFor(string? part, string? serial)
    {
        if (serial is null)
        {
            return null;
        }

        var bits = SerialBits.Of(part, serial);
        SerialRecord? latest = _index.TryLatest(bits, out var own) ? own : null;
        foreach (var other in _others.Latest(bits))
        {
            if (latest is not { } l || other.AtTicks > l.AtTicks)
            {
                latest = other;
            }
        }

        return latest?.Key.ToString();
    }

    /// <summary>Writes a batch's commit line (flushed to disk), then takes its keys into the index.</summary>
    public void Commit(JournalBatch batch)
    {
        var line = JournalLine.Committed(batch);
        _file.Append(line);
        Apply(line, liveClaims: null, committedNow: true);
    }

    /// <summary>Writes that a batch's pass/fail lines are on disk.</summary>
    public void MarkLogged(string batchId)
    {
        _file.Append(JournalLine.LoggedMark(batchId));
        _unlogged.RemoveAll(b => b.Id == batchId);
    }

    /// <summary>A committed claimed input has been moved on.</summary>
    public void ClaimDone(string claim) => _committedClaims.Remove(claim);

    /// <summary>
    /// Compacts when the journal holds at least <see cref="CompactUnits"/> units and nothing in it is
    /// unfinished; otherwise does nothing and returns null. Throws on an I/O failure, with the journal
    /// and index as they were (tried again after the next batch).
    /// </summary>
    public CompactionReport? CompactIfDue() => _units >= CompactUnits ? Compact() : null;

    /// <summary>Compacts now, unless something in the journal is unfinished (then null).</summary>
    internal CompactionReport? Compact()
    {
        if (_unlogged.Count > 0 || _committedClaims.Count > 0)
        {
            return null;
        }

        Directory.CreateDirectory(_folder);
        var report = JournalCompactor.Compact(_folder, _workerId, _index, _file, _units);
        _units = 0;
        return report;
    }

    public void Dispose()
    {
        _index.Dispose();
        _others.Dispose();
    }

    private void ReadOwn(IReadOnlySet<string> liveClaims)
    {
        foreach (var (number, text) in _file.ReadLines())
        {
            JournalLine? line;
            try
            {
                line = JsonSerializer.Deserialize<JournalLine>(text, JournalFile.Json);
            }
            catch (JsonException e)
            {
                throw new JournalCorruptException(Messages.JournalDamagedLine(number, _file.Path, e.Message));
            }

            if (line is null)
            {
                continue;
            }

            if (line.IsHeader)
            {
                if (number != 1)
                {
                    throw new JournalCorruptException(Messages.JournalDamagedLine(number, _file.Path, Messages.JournalHeaderNotFirst()));
                }

                OpenIndex(line.Index!.Value, line.Segments ?? []);
                continue;
            }

            Apply(line, liveClaims, committedNow: false);
        }
    }

    private void OpenIndex(int generation, IReadOnlyList<string> names)
    {
        try
        {
            _index = KeyIndex.Open(_folder, _workerId, generation, names);
        }
        catch (FileNotFoundException e)
        {
            throw new JournalCorruptException(Messages.JournalIndexFileMissing(_file.Path, e.FileName ?? ""));
        }
        catch (Exception e) when (e is InvalidDataException or EndOfStreamException)
        {
            throw new JournalCorruptException(Messages.JournalIndexFileDamaged(_file.Path, e.Message));
        }
    }

    private void Apply(JournalLine line, IReadOnlySet<string>? liveClaims, bool committedNow)
    {
        if (line.Logged is { } logged)
        {
            _unlogged.RemoveAll(b => b.Id == logged);
            return;
        }

        if (line.Batch is null || line.Units is null)
        {
            return;
        }

        var at = line.AtUtc;
        foreach (var unit in line.Units)
        {
            _index.Recent.Add(unit, at);
            if (unit.Claim is { } claim && (committedNow || liveClaims?.Contains(claim) == true))
            {
                _committedClaims[claim] = (unit, at);
            }
        }

        _units += line.Units.Count;
        _unlogged.Add(new JournalBatch { Id = line.Batch, At = at, Files = line.Files ?? [], Units = committedNow ? line.Units : [.. line.Units] });
    }
}
