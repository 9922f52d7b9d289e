using System.Diagnostics;
using System.Globalization;
using Microsoft.Extensions.Logging;
using StandFit.Core.Judging;
using StandFit.Core.Problems;
using StandFit.Edges.Folders;
using StandFit.Edges.Logging;
using StandFit.Edges.Outputs;
using StandFit.Edges.RecipeFiles;

namespace StandFit.Edges.Processing;

/// <summary>
/// Processes inputs in batches, exactly once. For each batch: take the inputs (claim them out of the
/// inbox, or read them in place); judge every unit (in parallel; the core is pure); sort out
/// duplicates (a unit key already published: not judged again, no row) and link retests (the
/// latest earlier key of the same part and serial); write the batch's Parquet files (summary rows,
/// and the per-point rows of its fitted units) under temporary names (flushed); commit the batch to the journal (flushed); rename the Parquet files; append the
/// pass/fail lines (flushed) and mark them logged in the journal; only then move each input on.
/// At the start of every pass, work the journal holds as committed but unfinished (after a crash,
/// a stop or an output fault) is finished first, from the journal alone: files renamed, lines
/// written again, inputs moved on, with no new row. So a crash at any instant repeats no row and
/// loses no input. Failure policy per stage: reading or judging a unit never stops the batch; an
/// output failure throws before any input of the uncommitted batch is moved (inputs stay claimed;
/// try again later); the pass/fail log failing throws <see cref="AuditSinkException"/>. With
/// <see cref="HoldUncoveredParts"/> (<c>watch</c>), a claimed unit whose part no recipe lists is
/// held: it stays claimed, unjudged and unpublished, is warned about once, and is read again on
/// the first pass under other recipes; without it (<c>run</c>), it is rejected (<c>input.no_recipe</c>).
/// <para>
/// Flush policy (<c>output.flush_units</c>, <c>output.flush_seconds</c>): judged units wait in memory,
/// their inputs still claimed and nothing of them written, until a batch is due: as soon as
/// <c>flush_units</c> units wait, those are published as one batch; and when the oldest waiting unit
/// was taken <see cref="FlushAge"/> ago or more, everything waiting is published. With
/// <see cref="FlushAge"/> zero (<c>run</c>) every pass publishes what it judged. Waiting units are not
/// committed: a crash loses only their judgement, and their claimed inputs are judged again at the
/// next start, as leftovers; the journal stays the commit point.
/// </para>
/// <para>
/// Judging and publishing overlap: batch N+1 is read and judged on all cores (<see cref="Judge"/>,
/// which changes no state of the runner) while batch N is admitted to the waiting list and the
/// batches due are published, on one thread, in input order. A waiting unit keeps only its rows
/// (<see cref="JudgedUnit"/>), so the batch published, the batch judged and the units waiting
/// (fewer than one batch) are all that is held in memory.
/// </para>
/// </summary>
public sealed class BatchRunner(
    UnitProcessor processor,
    ParquetSummaryWriter summaries,
    IAuditSink audit,
    FileDisposer disposer,
    IInputIntake intake,
    string outputFolder,
    string workerId,
    string runId,
    TimeProvider clock,
    string toolVersion,
    int batchSize,
    ILogger logger) : IDisposable
{
    // A summary row's processing time until its batch is published (then the batch's time is set).
    private static readonly DateTime NotYetPublished = DateTime.UnixEpoch;

    private readonly Dictionary<string, long> _unreadableLogged = new(StringComparer.Ordinal);

    // Claimed inputs held for want of a recipe: claim path -> (part, the recipes they were last read under).
    private readonly Dictionary<string, (string Part, RecipeCatalog Under)> _held = new(StringComparer.Ordinal);

    private readonly Lock _publishedGate = new();
    private readonly BatchCounts _published = new();
    private readonly HeapGuard _heap = new(HeapGuard.DefaultLimitBytes);
    private PublishJournal? _journal;
    private int _batchSequence;

    // Judged units waiting for their batch (claimed, not committed), oldest first, with when each was taken (clock's UTC).
    private readonly List<(JudgedUnit Unit, DateTimeOffset Taken)> _pending = [];
    private readonly HashSet<string> _pendingPaths = new(StringComparer.Ordinal);

    /// <summary>Called once per published unit, in input order (the command line prints these).</summary>
    public Action<SummaryRecord>? OnPublished { get; init; }

    /// <summary>Called once per duplicate input, with the line written for it.</summary>
    public Action<SummaryRecord>? OnDuplicate { get; init; }

    /// <summary>
    /// <c>watch</c>: a claimed unit whose part no recipe in force lists is held in the claim folder
    /// (not judged, not rejected, no row, no pass/fail line) until a recipe lists the part. Off
    /// (<c>run</c>, which must finish): such a unit is rejected with <c>input.no_recipe</c>.
    /// </summary>
    public bool HoldUncoveredParts { get; init; }

    /// <summary>Inputs held now because no recipe lists their part.</summary>
    public int HeldForRecipe
    {
        get
        {
            lock (_held)
            {
                return _held.Count;
            }
        }
    }

    /// <summary>How often the same unreadable input is logged again.</summary>
    public TimeSpan RepeatLogInterval { get; init; } = TimeSpan.FromMinutes(5);

    /// <summary>
    /// Publish the waiting units once the oldest was taken this long ago (<c>output.flush_seconds</c>,
    /// in <c>watch</c>). Zero (the default, <c>run</c>): every pass publishes all it judged.
    /// </summary>
    public TimeSpan FlushAge { get; init; } = TimeSpan.Zero;

    /// <summary>Units judged and waiting for their batch (not yet published).</summary>
    public int Pending
    {
        get
        {
            lock (_pending)
            {
                return _pending.Count;
            }
        }
    }

    /// <summary>How long until the waiting units are due by age (zero when due now), or null when none waits.</summary>
    public TimeSpan? UntilFlush()
    {
        lock (_pending)
        {
            if (_pending.Count == 0)
            {
                return null;
            }

            var left = _pending[0].Taken + FlushAge - clock.GetUtcNow();
            return left > TimeSpan.Zero ? left : TimeSpan.Zero;
        }
    }

    /// <summary>Compact the journal once it holds this many units (<c>output.journal_compact_units</c>).</summary>
    public int JournalCompactUnits { get; init; } = PublishJournal.DefaultCompactUnits;

    /// <summary>When set, the batch stages' time (claim, records, write, journal, log, move) is added here (<c>run --stats</c>).</summary>
    public StageTimes? Times { get; init; }

    /// <summary>Called once per input read and judged (or found unreadable), from the thread that did it (progress).</summary>
    public Action? OnUnitDone { get; init; }

    public IInputIntake Intake => intake;

    public string WorkerId => workerId;

    /// <summary>The run id that names this runner's Parquet files and journal batches.</summary>
    public string RunId => runId;

    /// <summary>
    /// A copy of what this runner published itself since it was made: rows by ruling, and
    /// duplicates. Work of an earlier process finished from the journal is not counted (its rows
    /// belong to that process's run). Safe to call from another thread.
    /// </summary>
    public BatchCounts Published()
    {
        var copy = new BatchCounts();
        lock (_publishedGate)
        {
            copy.Add(_published);
        }

        return copy;
    }

    public PublishJournal Journal => _journal ?? throw new InvalidOperationException("Start the runner first.");

    /// <summary>Reads the journal and removes this worker's temporary files that no commit needs. Throws <see cref="JournalCorruptException"/>.</summary>
    public void Start()
    {
        var live = intake.Leftovers().Select(i => i.Claim).OfType<string>().ToHashSet(StringComparer.Ordinal);
        _journal?.Dispose();
        _journal = null;
        _journal = PublishJournal.Open(outputFolder, workerId, live, JournalCompactUnits);
        var keep = _journal.Unlogged.SelectMany(b => b.Files).ToHashSet(StringComparer.Ordinal);
        var orphans = 0;
        try
        {
            orphans = summaries.DeleteOrphans(keep);
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            // Left for the next start; hidden temporary names are never read.
        }

        Log.JournalOpened(logger, _journal.PublishedCount, _journal.CommittedClaims.Count, orphans);
    }

    /// <summary>Inputs in hand that are not moved on yet (claimed and waiting).</summary>
    public int Held() => intake.Leftovers().Count;

    /// <summary>
    /// Finishes committed work, then judges every leftover and every candidate and publishes the
    /// batches that are due (<see cref="FlushAge"/>); stops between units when <paramref name="stop"/>
    /// is cancelled. Returns what was published (and skipped or held) in this pass.
    /// </summary>
    public async Task<BatchCounts> ProcessAsync(IReadOnlyList<string> candidates, CancellationToken stop)
    {
        if (_journal is null)
        {
            Start();
        }

        var total = FinishCommitted();
        Journal.Refresh();
        List<InputFile> leftovers;
        lock (_pending)
        {
            leftovers = [.. SkipHeld(intake.Leftovers()).Where(i => !_pendingPaths.Contains(i.Path))];
        }

        // Two stages overlap: batch N+1 is judged (on all cores) while batch N is admitted to the
        // waiting list and the batches due are published (one thread: Parquet, journal, log,
        // moves), in input order. Judging is pure; holding, duplicates and retests are sorted out
        // on the publishing thread, after every earlier batch is committed, so the overlap changes
        // no row and no flush decision.
        Task<JudgedBatch>? judging = null;
        using var batches = Batches(leftovers, candidates).GetEnumerator();
        try
        {
            while (!stop.IsCancellationRequested && batches.MoveNext())
            {
                var taken = batches.Current;
                var takenAt = clock.GetUtcNow();
                var next = Task.Run(() => Judge(taken, takenAt, stop), CancellationToken.None);
                if (judging is not null)
                {
                    var previous = judging;
                    judging = next;
                    total.Add(Admit(await previous.ConfigureAwait(false)));
                    total.Add(await PublishFullBatchesAsync().ConfigureAwait(false));
                }
                else
                {
                    judging = next;
                }
            }

            if (judging is not null)
            {
                var last = judging;
                judging = null;
                total.Add(Admit(await last.ConfigureAwait(false)));
                total.Add(await PublishFullBatchesAsync().ConfigureAwait(false));
            }
        }
        catch when (judging is not null)
        {
            // A batch could not be published: the one being judged is never admitted and stays
            // claimed (a leftover for the next pass), like the waiting units already taken off.
            await Task.WhenAny(judging).ConfigureAwait(false);
            throw;
        }

        if (UntilFlush() == TimeSpan.Zero)
        {
            total.Add(await FlushAsync().ConfigureAwait(false));
        }

        return total;
    }

    /// <summary>The batches of a pass, taken as they are asked for: the leftovers, then the candidates claimed (those another worker took first left out).</summary>
    private IEnumerable<IReadOnlyList<InputFile>> Batches(List<InputFile> leftovers, IReadOnlyList<string> candidates)
    {
        for (var start = 0; start < leftovers.Count; start += batchSize)
        {
            yield return leftovers.GetRange(start, Math.Min(batchSize, leftovers.Count - start));
        }

        for (var start = 0; start < candidates.Count; start += batchSize)
        {
            var chunk = new string[Math.Min(batchSize, candidates.Count - start)];
            for (var i = 0; i < chunk.Length; i++)
            {
                chunk[i] = candidates[start + i];
            }

            var claimStarted = Stopwatch.GetTimestamp();
            var taken = intake.Take(chunk);
            Times?.Add(Stage.Claim, claimStarted);
            if (taken.Count > 0)
            {
                yield return taken;
            }
        }
    }

    /// <summary>Publishes every waiting unit now, whatever its age (a clean stop of <c>watch</c>).</summary>
    public async Task<BatchCounts> FlushAsync()
    {
        var total = new BatchCounts();
        while (TakePending(batchSize) is { Count: > 0 } batch)
        {
            total.Add(await PublishAsync(batch).ConfigureAwait(false));
        }

        return total;
    }

    private async Task<BatchCounts> PublishFullBatchesAsync()
    {
        var total = new BatchCounts();
        while (Pending >= batchSize)
        {
            total.Add(await PublishAsync(TakePending(batchSize)).ConfigureAwait(false));
        }

        return total;
    }

    /// <summary>
    /// The oldest waiting units, up to <paramref name="count"/>, taken off the waiting list. If
    /// publishing them fails they are forgotten: their inputs stay claimed and are judged again as
    /// leftovers on the next pass.
    /// </summary>
    private List<JudgedUnit> TakePending(int count)
    {
        lock (_pending)
        {
            var n = Math.Min(count, _pending.Count);
            var taken = _pending.Take(n).Select(p => p.Unit).ToList();
            _pending.RemoveRange(0, n);
            foreach (var unit in taken)
            {
                _pendingPaths.Remove(unit.Input.Path);
            }

            return taken;
        }
    }

    /// <summary>
    /// A batch judged, not yet admitted to the waiting list: each input's unit (null when a stop
    /// came first, or unreadable), the inputs a stop came before, the counts so far, and when the
    /// batch was taken (clock's UTC: the age the flush policy measures from).
    /// </summary>
    private sealed record JudgedBatch(JudgedUnit?[] Processed, IReadOnlyList<InputFile> NotStarted, BatchCounts Counts, DateTimeOffset Taken);

    /// <summary>
    /// What publishing needs of a judged unit: its summary row (made on the judging thread; its
    /// processing time is set when the batch is published), its point rows, its ruling and why. The
    /// evaluation itself (fit, resampling replicates, the parsed table) is not kept, so the units
    /// waiting for their batch, and the batch being published, hold little memory.
    /// </summary>
    private sealed record JudgedUnit(InputFile Input, string Name, Ruling Ruling, Problem? Problem, SummaryRecord Record, IReadOnlyList<PointRecord> Points, string? UncoveredPart, RecipeCatalog? Catalog);

    /// <summary>
    /// The leftovers to process: all but the inputs held for want of a recipe that were last read
    /// under the recipes still in force (nothing has changed for them). Held inputs that are gone
    /// (removed by hand) are forgotten.
    /// </summary>
    private List<InputFile> SkipHeld(IReadOnlyList<InputFile> leftovers)
    {
        lock (_held)
        {
            if (_held.Count == 0)
            {
                return [.. leftovers];
            }

            var present = leftovers.Select(i => i.Path).ToHashSet(StringComparer.Ordinal);
            foreach (var gone in _held.Keys.Where(k => !present.Contains(k)).ToList())
            {
                _held.Remove(gone);
            }

            var now = processor.Recipes;
            return [.. leftovers.Where(i => !(_held.TryGetValue(i.Path, out var h) && ReferenceEquals(h.Under, now)))];
        }
    }

    /// <summary>
    /// Holds the unit when it names a part no recipe lists and holding is on: true when held. The
    /// warning is logged once per input, when it is first held.
    /// </summary>
    private bool Hold(JudgedUnit unit, BatchCounts counts)
    {
        if (!HoldUncoveredParts || unit.UncoveredPart is not { } part || unit.Input.Claim is null || unit.Catalog is null)
        {
            return false;
        }

        bool first;
        lock (_held)
        {
            first = !_held.ContainsKey(unit.Input.Path);
            _held[unit.Input.Path] = (part, unit.Catalog);
        }

        if (first)
        {
            counts.AddHeldForRecipe();
            var name = Printable.Of(unit.Input.Name);
            var shown = Printable.Of(part);
            Log.UnitHeldNoRecipe(logger, name, shown);
        }

        return true;
    }

    /// <summary>Forgets a held input that has now been judged, and says so.</summary>
    private void Unhold(JudgedUnit unit)
    {
        string? part;
        lock (_held)
        {
            part = _held.Remove(unit.Input.Path, out var h) ? h.Part : null;
        }

        if (part is not null)
        {
            var name = Printable.Of(unit.Input.Name);
            var shown = Printable.Of(part);
            Log.UnitHeldReleased(logger, name, shown);
        }
    }

    /// <summary>Finishes, from the journal alone, the batches committed before a crash, a stop or an output fault; counts the inputs it moved on.</summary>
    private BatchCounts FinishCommitted()
    {
        var counts = new BatchCounts();
        var journal = Journal;
        var batches = 0;
        foreach (var batch in journal.Unlogged.ToList())
        {
            foreach (var file in batch.Files)
            {
                if (!summaries.RollForward(file))
                {
                    Log.CommittedFileMissing(logger, file, batch.Id);
                }
            }

            audit.AppendLines([.. batch.Units.Select(u => u.Line)]);
            journal.MarkLogged(batch.Id);
            batches++;
        }

        var moved = 0;
        if (journal.CommittedClaims.Count > 0)
        {
            var present = intake.Leftovers().Where(i => i.Claim is not null).ToDictionary(i => i.Claim!, StringComparer.Ordinal);
            foreach (var (claim, (unit, at)) in journal.CommittedClaims.ToList())
            {
                if (present.TryGetValue(claim, out var input))
                {
                    Dispose(input, unit, at);
                    moved++;
                    if (unit.Outcome == JournalOutcomes.Duplicate)
                    {
                        counts.AddDuplicate();
                    }
                    else
                    {
                        counts.Add(unit.Ruling switch { "pass" => Ruling.Pass, "fail" => Ruling.Fail, "retest" => Ruling.Retest, _ => Ruling.Rejected });
                    }
                }

                journal.ClaimDone(claim);
            }
        }

        if (batches > 0 || moved > 0)
        {
            Log.Recovered(logger, batches, moved);
        }

        return counts;
    }

    /// <summary>
    /// Reads and judges a batch on all cores. Pure as far as the runner goes: it changes no
    /// waiting list, hold or claim (only the unreadable-input log), so it can run while the
    /// batch before it is published; <see cref="Admit"/> then takes its result in.
    /// </summary>
    private JudgedBatch Judge(IReadOnlyList<InputFile> batch, DateTimeOffset taken, CancellationToken stop)
    {
        var processed = new JudgedUnit?[batch.Count];
        var counts = new BatchCounts();
        var parallel = new ParallelOptions { MaxDegreeOfParallelism = Environment.ProcessorCount };
        var unreadable = new bool[batch.Count];
        Parallel.For(0, batch.Count, parallel, (i, state) =>
        {
            if (stop.IsCancellationRequested)
            {
                state.Stop();
                return;
            }

            try
            {
                var unit = processor.Process(batch[i]);
                var record = SummaryRecordFactory.Create(unit.Evaluation, unit.File.Sha256, NotYetPublished, toolVersion, unit.File.Metadata);
                processed[i] = new JudgedUnit(unit.Input, unit.File.Name, unit.Evaluation.Ruling, unit.Evaluation.Problem, record, unit.Points, unit.UncoveredPart, unit.Catalog);
                Times?.Lap(Stage.Records);
            }
            catch (Exception e) when (e is IOException or UnauthorizedAccessException)
            {
                unreadable[i] = true;
                LogUnreadable(batch[i].Name, e.Message);
            }

            OnUnitDone?.Invoke();
        });

        var notStarted = new List<InputFile>();
        for (var i = 0; i < batch.Count; i++)
        {
            if (unreadable[i])
            {
                counts.AddSkipped();
            }
            else if (processed[i] is null)
            {
                notStarted.Add(batch[i]);
            }
        }

        return new JudgedBatch(processed, notStarted, counts, taken);
    }

    /// <summary>
    /// On the publishing thread: gives back the inputs a stop came before, holds the units whose
    /// part no recipe lists, and adds the rest to the waiting list with the time their batch was
    /// taken; counts the skipped and newly held ones.
    /// </summary>
    private BatchCounts Admit(JudgedBatch judged)
    {
        var (processed, notStarted, counts, taken) = judged;
        foreach (var input in notStarted)
        {
            intake.Release(input); // not started because of a stop: ready again
        }

        foreach (var unit in processed.OfType<JudgedUnit>())
        {
            if (!Hold(unit, counts))
            {
                Unhold(unit);
                lock (_pending)
                {
                    if (_pendingPaths.Add(unit.Input.Path))
                    {
                        _pending.Add((unit, taken));
                    }
                }
            }
        }

        return counts;
    }

    /// <summary>Publishes judged units as one batch: duplicates and retests, Parquet files, commit, renames, pass/fail lines, then the inputs moved on.</summary>
    private async Task<BatchCounts> PublishAsync(IReadOnlyList<JudgedUnit> units)
    {
        var counts = new BatchCounts();
        if (units.Count == 0)
        {
            return counts;
        }

        var stageStarted = Stopwatch.GetTimestamp();
        var processedAt = clock.GetUtcNow().UtcDateTime;
        processedAt = new DateTime(processedAt.Ticks - (processedAt.Ticks % TimeSpan.TicksPerMillisecond), DateTimeKind.Utc);
        var journal = Journal;
        var records = new List<SummaryRecord>(units.Count);
        var points = new List<PointRecord>();
        var entries = new List<JournalUnit>(units.Count);
        var published = new List<(JudgedUnit Unit, SummaryRecord Record, JournalUnit Entry)>(units.Count);
        var duplicates = new List<(JudgedUnit Unit, SummaryRecord Record, JournalUnit Entry, string FirstAt, string FirstRuling)>();
        var keysInBatch = new Dictionary<string, (DateTime At, string Ruling, string File)>(StringComparer.Ordinal);
        var latestInBatch = new Dictionary<string, string>(StringComparer.Ordinal);
        foreach (var unit in units)
        {
            var record = unit.Record;
            record.ProcessedAt = processedAt;
            var first = journal.Lookup(record.UnitKey);
            if (first is not null || keysInBatch.ContainsKey(record.UnitKey))
            {
                var (firstAt, firstRuling, firstFile) = first is { } f ? (f.At, f.Ruling, (string?)null) : keysInBatch[record.UnitKey];
                var at = firstAt.ToString("yyyy-MM-dd'T'HH:mm:ss.fff'Z'", CultureInfo.InvariantCulture);
                var why = firstFile is null ? Messages.DuplicateOfPublished(at, firstRuling, record.UnitKey) : Messages.Duplicate(at, firstFile, firstRuling);
                var entry = Entry(unit, record, JournalOutcomes.Duplicate, PassFailLog.FormatLine(record, "duplicate", [ReasonCodes.InputDuplicate.Code]));
                entry.Code = ReasonCodes.InputDuplicate.Code;
                entry.Where = unit.Name;
                entry.Why = why;
                entries.Add(entry);
                duplicates.Add((unit, record, entry, at, firstRuling));
                continue;
            }

            var serialKey = (record.Part ?? "").ToUpperInvariant() + "\n" + record.Serial;
            if (record.Serial is not null)
            {
                record.RetestOf = latestInBatch.GetValueOrDefault(serialKey) ?? journal.LatestFor(record.Part, record.Serial);
                latestInBatch[serialKey] = record.UnitKey;
            }

            keysInBatch[record.UnitKey] = (processedAt, record.Ruling, unit.Name);
            var outcome = unit.Ruling == Ruling.Rejected ? JournalOutcomes.Reject : JournalOutcomes.Archive;
            var published1 = Entry(unit, record, outcome, PassFailLog.FormatLine(record));
            if (unit.Problem is { } problem)
            {
                published1.Code = problem.Code;
                published1.Where = problem.Location.ToString();
                published1.Why = problem.Message;
            }

            records.Add(record);
            if (unit.Points.Count > 0 && unit.Points[0].UnitKey != record.UnitKey)
            {
                throw new InvalidOperationException($"The points of {unit.Name} carry the unit key {unit.Points[0].UnitKey}, its summary row {record.UnitKey}.");
            }

            points.AddRange(unit.Points);
            entries.Add(published1);
            published.Add((unit, record, published1));
        }

        Times?.Add(Stage.Records, stageStarted);

        // Phase 1: the rows (summaries and points) on disk under temporary names. Phase 2: the commit line. Then the renames.
        stageStarted = Stopwatch.GetTimestamp();
        var prepared = records.Count > 0 ? await summaries.PrepareAsync(records, points, CancellationToken.None).ConfigureAwait(false) : null;
        var committed = new JournalBatch
        {
            Id = string.Create(CultureInfo.InvariantCulture, $"{runId}-b{Interlocked.Increment(ref _batchSequence):D6}"),
            At = processedAt,
            Files = prepared is null ? [] : [.. prepared.RelativeFinals],
            Units = entries,
        };
        Times?.Add(Stage.Write, stageStarted);
        stageStarted = Stopwatch.GetTimestamp();
        try
        {
            journal.Commit(committed);
        }
        catch
        {
            prepared?.Abandon();
            throw;
        }

        Times?.Add(Stage.Journal, stageStarted);
        stageStarted = Stopwatch.GetTimestamp();
        prepared?.Complete();
        Times?.Add(Stage.Write, stageStarted);
        stageStarted = Stopwatch.GetTimestamp();
        audit.AppendLines([.. entries.Select(e => e.Line)]);
        Times?.Add(Stage.Log, stageStarted);
        stageStarted = Stopwatch.GetTimestamp();
        journal.MarkLogged(committed.Id);
        Times?.Add(Stage.Journal, stageStarted);
        stageStarted = Stopwatch.GetTimestamp();

        foreach (var (unit, record, entry) in published)
        {
            var name = Printable.Of(unit.Name);
            if (unit.Ruling == Ruling.Rejected)
            {
                var where = Printable.Of(entry.Where);
                var why = Printable.Of(entry.Why);
                Log.UnitRejected(logger, name, entry.Code!, where, why);
            }
            else if (logger.IsEnabled(LogLevel.Debug))
            {
                var serial = Printable.Of(record.Serial);
                var reasons = string.Join(',', record.ReasonCodes);
                Log.UnitJudged(logger, serial, name, record.Ruling, reasons);
            }
        }

        foreach (var (unit, record, _, firstAt, firstRuling) in duplicates)
        {
            var name = Printable.Of(unit.Name);
            Log.UnitDuplicate(logger, name, record.UnitKey, firstAt, firstRuling);
        }

        Times?.Add(Stage.Log, stageStarted);

        // Last: move each input on. A failure here leaves the rest claimed and committed: finished next pass.
        stageStarted = Stopwatch.GetTimestamp();
        foreach (var (unit, record, entry) in published)
        {
            Dispose(unit.Input, entry, processedAt);
            counts.Add(unit.Ruling);
            OnPublished?.Invoke(record);
        }

        foreach (var (unit, record, entry, _, _) in duplicates)
        {
            Dispose(unit.Input, entry, processedAt);
            counts.AddDuplicate();
            OnDuplicate?.Invoke(record);
        }

        Times?.Add(Stage.Move, stageStarted);
        lock (_publishedGate)
        {
            _published.Add(counts);
        }

        Log.BatchPublished(logger, counts.Processed, counts.Passed, counts.Failed, counts.Retest, counts.Rejected);
        if (journal.CompactIfDue() is { } compacted)
        {
            Log.JournalCompacted(logger, compacted.Units, compacted.Generation, compacted.IndexFiles, compacted.IndexKeys, compacted.IndexBytes, compacted.JournalBytesBefore, compacted.JournalBytesAfter);
        }

        _heap.AfterBatch();

        return counts;
    }

    public void Dispose() => _journal?.Dispose();

    private void Dispose(InputFile input, JournalUnit unit, DateTime at)
    {
        if (unit.Outcome == JournalOutcomes.Archive)
        {
            disposer.Archive(input, unit.Sha256, at);
        }
        else
        {
            disposer.Reject(input, unit.Sha256, at, new RejectionNote(unit.Code ?? ReasonCodes.InternalError.Code, unit.Where ?? input.Name, unit.Why ?? ""));
        }

        if (input.Claim is { } claim)
        {
            Journal.ClaimDone(claim);
        }
    }

    private static JournalUnit Entry(JudgedUnit unit, SummaryRecord record, string outcome, string line) => new()
    {
        Claim = unit.Input.Claim,
        Name = unit.Input.Name,
        Key = record.UnitKey,
        Part = record.Part,
        Serial = record.Serial,
        Outcome = outcome,
        Ruling = record.Ruling,
        Line = line,
    };

    private void LogUnreadable(string name, string why)
    {
        var now = clock.GetTimestamp();
        lock (_unreadableLogged)
        {
            if (_unreadableLogged.TryGetValue(name, out var last) && clock.GetElapsedTime(last, now) < RepeatLogInterval)
            {
                return;
            }

            _unreadableLogged[name] = now;
            if (_unreadableLogged.Count > 10_000)
            {
                _unreadableLogged.Clear();
            }
        }

        var shown = Printable.Of(name);
        Log.InputUnreadable(logger, shown, why);
    }
}
