using System.Globalization;
using System.Security.Cryptography;
using System.Text;
using Microsoft.Extensions.Logging.Abstractions;
using StandFit.Edges.Configuration;
using StandFit.Edges.Folders;
using StandFit.Edges.Outputs;
using StandFit.Edges.Processing;
using StandFit.Tests.Support;

namespace StandFit.Tests.Worker;

/// <summary>
/// The journal's compaction into on-disk index files: duplicates and retests across compactions and
/// restarts, a bounded journal, other workers reading a compacting worker, old journals, damaged
/// index files, and a kill at each step of a compaction (the files each step can leave, laid out
/// one state at a time).
/// </summary>
public sealed class JournalCompactionTests
{
    private const string Worker = "w";
    private static readonly DateTime Start = new(2026, 12, 1, 6, 0, 0, DateTimeKind.Utc);

    [Fact]
    public async Task After_compactions_the_same_bytes_are_a_duplicate_and_the_same_serial_a_retest_even_after_a_restart()
    {
        using var root = new TempFolder();
        var options = ConfigLoader.Load(WorkerConfig.Write(root, flushUnits: 4, journalCompactUnits: 8)).Value;
        Assert.Empty(ConfigLoader.PrepareFolders(options, needInbox: true));
        for (var i = 0; i < 30; i++)
        {
            SweepFiles.Drop(options.Inbox, string.Create(CultureInfo.InvariantCulture, $"unit-{i:D3}.csv"), SweepFiles.Text(i, 99));
        }

        Assert.Equal(30, (await PassAsync(options)).Processed);
        var journal = Path.Combine(options.Output, "journal");
        Assert.NotEmpty(Directory.EnumerateFiles(journal, "test-worker.*.idx"));
        Assert.StartsWith("{\"index\":", File.ReadAllText(Path.Combine(journal, "test-worker.jsonl")), StringComparison.Ordinal);

        // A new process: the first unit's bytes again, and new readings for the second unit's serial.
        SweepFiles.Drop(options.Inbox, "again.csv", SweepFiles.Text(0, 99));
        SweepFiles.Drop(options.Inbox, "retest.csv", SweepFiles.Text(1, 100));
        var second = await PassAsync(options);
        Assert.Equal(1, second.Duplicates);
        Assert.Equal(1, second.Processed);

        // And once more after further compactions: the retest is the serial's latest now.
        for (var i = 30; i < 50; i++)
        {
            SweepFiles.Drop(options.Inbox, string.Create(CultureInfo.InvariantCulture, $"unit-{i:D3}.csv"), SweepFiles.Text(i, 99));
        }

        SweepFiles.Drop(options.Inbox, "retest-2.csv", SweepFiles.Text(1, 101));
        SweepFiles.Drop(options.Inbox, "again-2.csv", SweepFiles.Text(5, 99));
        var third = await PassAsync(options);
        Assert.Equal(1, third.Duplicates);
        Assert.Equal(21, third.Processed);

        var rows = Duck.Query($"SELECT source_file, unit_key, retest_of FROM read_parquet({Duck.Literal(Path.Combine(options.Output, "summaries", "**", "*.parquet"))})")
            .ToDictionary(r => (string)r["source_file"]!, StringComparer.Ordinal);
        Assert.Equal(52, rows.Count);
        Assert.False(rows.ContainsKey("again.csv"));
        Assert.False(rows.ContainsKey("again-2.csv"));
        Assert.Equal(rows["unit-001.csv"]["unit_key"], rows["retest.csv"]["retest_of"]);
        Assert.Equal(rows["retest.csv"]["unit_key"], rows["retest-2.csv"]["retest_of"]);
        var sidecars = Directory.EnumerateFiles(options.Rejected, "*.rejected.txt", SearchOption.AllDirectories).Select(File.ReadAllText).ToList();
        Assert.Equal(2, sidecars.Count(s => s.Contains("code: input.duplicate\n", StringComparison.Ordinal)));
        Assert.Contains(sidecars, s => s.Contains((string)rows["unit-000.csv"]["unit_key"]!, StringComparison.Ordinal));
    }

    [Fact]
    public void The_journal_and_the_keys_in_memory_stay_bounded_however_many_units_pass()
    {
        using var root = new TempFolder();
        var ledger = new Ledger();
        var journal = PublishJournal.Open(root.Path, Worker, Empty, compactUnits: 100);
        try
        {
            long largest = 0, largestBatch = 0;
            var compactions = 0;
            for (var batch = 0; batch < 200; batch++)
            {
                if (journal.CompactIfDue() is { } report)
                {
                    compactions++;
                    Assert.InRange(report.Units, 100, 125);
                    Assert.True(report.JournalBytesAfter < 200, $"the journal is {report.JournalBytesAfter} bytes after compaction");
                }

                Assert.True(journal.UnitsInJournal < 100);
                var size = File.Exists(journal.OwnFile) ? new FileInfo(journal.OwnFile).Length : 0;
                ledger.Commit(journal, 25, serials: 3_000);
                var grown = new FileInfo(journal.OwnFile).Length;
                largestBatch = Math.Max(largestBatch, grown - size); // a batch line and its logged mark
                largest = Math.Max(largest, grown);
            }

            Assert.Equal(49, compactions);
            Assert.True(largest <= (4 * largestBatch) + 200, $"the journal grew to {largest} bytes; four batches take {4 * largestBatch}");
            Assert.True(journal.IndexFileNames.Count <= Math.Log2(49) + 1, string.Join(", ", journal.IndexFileNames));
            ledger.AssertKnownBy(journal);
        }
        finally
        {
            journal.Dispose();
        }

        using var reopened = PublishJournal.Open(root.Path, Worker, Empty, compactUnits: 100);
        ledger.AssertKnownBy(reopened);
        Assert.Equal(5_000, reopened.PublishedCount);
        Assert.NotNull(reopened.Compact());
        ledger.AssertKnownBy(reopened, "compacted after the restart");

        // On disk: each key once (73 bytes), a serial's latest key once per index file it is in (88 bytes).
        var files = Directory.EnumerateFiles(Path.Combine(root.Path, "journal"), "*.idx").Select(IndexSegment.Open).ToList();
        try
        {
            Assert.Equal(5_000, files.Sum(f => f.Keys.Count));
            Assert.InRange(files.Sum(f => f.Serials.Count), 3_000, 5_000);
            Assert.Equal(files.Sum(f => (f.Keys.Count * 73) + (f.Serials.Count * 88) + 64), files.Sum(f => new FileInfo(f.Path).Length));
        }
        finally
        {
            files.ForEach(f => f.Dispose());
        }
    }

    [Fact]
    public void Compaction_waits_while_a_batch_in_the_journal_is_unfinished()
    {
        using var root = new TempFolder();
        var ledger = new Ledger();
        using var journal = PublishJournal.Open(root.Path, Worker, Empty, compactUnits: 10);
        var batch = ledger.Batch(20, claims: true);
        journal.Commit(batch);

        Assert.Null(journal.CompactIfDue()); // its pass/fail lines are not marked written
        journal.MarkLogged(batch.Id);
        Assert.Null(journal.CompactIfDue()); // its inputs are not moved on
        foreach (var unit in batch.Units)
        {
            journal.ClaimDone(unit.Claim!);
        }

        Assert.NotNull(journal.CompactIfDue());
        ledger.AssertKnownBy(journal);
    }

    [Fact]
    public void A_kill_at_any_step_of_a_compaction_leaves_a_folder_that_restarts_with_every_key()
    {
        // Before: one index file and a journal of as many units again, so the compaction merges the file.
        using var work = new TempFolder();
        var ledger = new Ledger();
        string[] before;
        Dictionary<string, byte[]> beforeFiles, afterFiles;
        using (var journal = PublishJournal.Open(work.Path, Worker, Empty, compactUnits: 1_000))
        {
            ledger.Commit(journal, 60, serials: 40);
            Assert.NotNull(journal.Compact());
            ledger.Commit(journal, 60, serials: 40);
            before = [.. journal.IndexFileNames];
            beforeFiles = Snapshot(work.Path);
            Assert.NotNull(journal.Compact());
            afterFiles = Snapshot(work.Path);
            Assert.NotEqual(before, journal.IndexFileNames);
        }

        var created = afterFiles.Keys.Single(n => n.EndsWith(".idx", StringComparison.Ordinal) && !beforeFiles.ContainsKey(n));
        var merged = before.Single();
        Assert.False(afterFiles.ContainsKey(merged));
        byte[] Half(byte[] bytes) => bytes[..(bytes.Length / 2)];
        var states = new (string Step, Dictionary<string, byte[]> Files)[]
        {
            ("before the compaction", beforeFiles),
            ("writing the new index file", With(beforeFiles, ("." + created + ".tmp", Half(afterFiles[created])))),
            ("the new index file written, not renamed", With(beforeFiles, ("." + created + ".tmp", afterFiles[created]))),
            ("the new index file renamed", With(beforeFiles, (created, afterFiles[created]))),
            ("writing the new journal", With(beforeFiles, (created, afterFiles[created]), (".w.jsonl.tmp", Half(afterFiles["w.jsonl"])))),
            ("the new journal written, not renamed", With(beforeFiles, (created, afterFiles[created]), (".w.jsonl.tmp", afterFiles["w.jsonl"]))),
            ("the new journal renamed, the merged file not deleted", With(afterFiles, (merged, beforeFiles[merged]))),
            ("after the compaction", afterFiles),
        };

        foreach (var (step, files) in states)
        {
            using var root = new TempFolder();
            var folder = root.Sub("journal");
            foreach (var (name, bytes) in files)
            {
                File.WriteAllBytes(Path.Combine(folder, name), bytes);
            }

            using var journal = PublishJournal.Open(root.Path, Worker, Empty, compactUnits: 1_000);

            var inForce = journal.IndexFileNames.Append("w.jsonl").Order(StringComparer.Ordinal);
            Assert.True(inForce.SequenceEqual(Directory.EnumerateFiles(folder).Select(Path.GetFileName).Order(StringComparer.Ordinal)!), $"{step}: leftovers were not removed");
            Assert.Empty(journal.Unlogged);
            ledger.AssertKnownBy(journal, step);

            // And it goes on: more units, another compaction, a restart.
            var more = ledger.Fork();
            more.Commit(journal, 30, serials: 40);
            Assert.NotNull(journal.Compact());
            more.AssertKnownBy(journal, step + ", then compacted again");
            journal.Dispose();
            using var restarted = PublishJournal.Open(root.Path, Worker, Empty, compactUnits: 1_000);
            more.AssertKnownBy(restarted, step + ", then compacted again and restarted");
        }
    }

    [Fact]
    public void Another_worker_knows_the_keys_of_a_worker_that_compacts_before_and_after_each_compaction()
    {
        using var root = new TempFolder();
        var ledger = new Ledger();
        using var a = PublishJournal.Open(root.Path, "a", Empty, compactUnits: 50);
        ledger.Commit(a, 10, serials: 1_000);
        using var b = PublishJournal.Open(root.Path, "b", Empty, compactUnits: 50);
        ledger.AssertKnownBy(b, "before a compacts");
        for (var round = 0; round < 12; round++)
        {
            ledger.Commit(a, 20, serials: 1_000);
            a.CompactIfDue();
            b.Refresh();
            ledger.AssertKnownBy(b, string.Create(CultureInfo.InvariantCulture, $"round {round}"));
        }

        var aFiles = Directory.EnumerateFiles(Path.Combine(root.Path, "journal"), "a.*.idx").Select(Path.GetFileName).Order(StringComparer.Ordinal);
        Assert.Equal(a.IndexFileNames.Order(StringComparer.Ordinal), aFiles); // the merged ones are gone

        // b's own retest of a serial a published links to a's key; a later retest by a links to b's.
        var serial = Ledger.SerialOf(3);
        var unit = Ledger.Unit(9_999, serial);
        b.Commit(new JournalBatch { Id = "b-1", At = Start.AddDays(1), Units = [unit] });
        a.Refresh();
        Assert.Equal(unit.Key, a.LatestFor("KP-250", serial));
    }

    [Fact]
    public void A_journal_written_before_compaction_existed_is_read_and_then_compacted()
    {
        using var root = new TempFolder();
        var ledger = new Ledger();
        var folder = root.Sub("journal");
        var lines = new StringBuilder();
        for (var batch = 0; batch < 6; batch++)
        {
            var b = ledger.Batch(10);
            lines.Append(System.Text.Json.JsonSerializer.Serialize(b)).Append('\n');
            lines.Append("{\"logged\":\"").Append(b.Id).Append("\"}\n");
        }

        File.WriteAllText(Path.Combine(folder, "w.jsonl"), lines.ToString());

        using var journal = PublishJournal.Open(root.Path, Worker, Empty, compactUnits: 50);
        ledger.AssertKnownBy(journal, "read as it was");
        Assert.Equal(66, journal.UnitsInJournal); // with one duplicate a batch
        Assert.NotNull(journal.CompactIfDue());
        ledger.AssertKnownBy(journal, "compacted");
        Assert.Single(journal.IndexFileNames);
    }

    [Theory]
    [InlineData("missing")]
    [InlineData("damaged")]
    [InlineData("another worker's")]
    public void An_index_file_the_header_names_that_is_missing_or_damaged_stops_the_worker(string fault)
    {
        using var root = new TempFolder();
        var ledger = new Ledger();
        string name;
        using (var journal = PublishJournal.Open(root.Path, Worker, Empty, compactUnits: 10))
        {
            ledger.Commit(journal, 10);
            journal.Compact();
            name = journal.IndexFileNames.Single();
        }

        var path = Path.Combine(root.Path, "journal", name);
        var own = Path.Combine(root.Path, "journal", "w.jsonl");
        switch (fault)
        {
            case "missing":
                File.Delete(path);
                break;
            case "damaged":
                var bytes = File.ReadAllBytes(path);
                bytes[10] ^= 0xff;
                File.WriteAllBytes(path, bytes);
                break;
            default:
                File.WriteAllText(own, File.ReadAllText(own).Replace(name, "../x/" + name, StringComparison.Ordinal));
                break;
        }

        var e = Assert.Throws<JournalCorruptException>(() => PublishJournal.Open(root.Path, Worker, Empty));
        Assert.Contains(own, e.Message, StringComparison.Ordinal);
        Assert.Contains("WORKER.*.idx", e.Message, StringComparison.Ordinal);
    }

    private static readonly IReadOnlySet<string> Empty = new HashSet<string>(StringComparer.Ordinal);

    private static async Task<BatchCounts> PassAsync(StandFitOptions options)
    {
        using var pipeline = Pipeline.Build(options, NullLoggerFactory.Instance, DispositionMode.Move, TimeProvider.System);
        return await pipeline.Runner.ProcessAsync(DropFolder.ListReady(options.Inbox), CancellationToken.None);
    }

    private static Dictionary<string, byte[]> Snapshot(string output) =>
        Directory.EnumerateFiles(Path.Combine(output, "journal")).ToDictionary(p => Path.GetFileName(p), File.ReadAllBytes, StringComparer.Ordinal);

    private static Dictionary<string, byte[]> With(Dictionary<string, byte[]> files, params (string Name, byte[] Bytes)[] more)
    {
        var copy = new Dictionary<string, byte[]>(files, StringComparer.Ordinal);
        foreach (var (name, bytes) in more)
        {
            copy[name] = bytes;
        }

        return copy;
    }

    /// <summary>What a test committed, to hold a journal to: every key's first result, every serial's latest key.</summary>
    private sealed class Ledger
    {
        private readonly Dictionary<string, FirstResult> _first = new(StringComparer.Ordinal);
        private readonly Dictionary<string, string> _latest = new(StringComparer.Ordinal);
        private int _next;
        private int _batches;

        public Ledger Fork()
        {
            var copy = new Ledger { _next = _next, _batches = _batches };
            foreach (var (key, first) in _first)
            {
                copy._first[key] = first;
            }

            foreach (var (serial, key) in _latest)
            {
                copy._latest[serial] = key;
            }

            return copy;
        }

        public static string SerialOf(int n) => string.Create(CultureInfo.InvariantCulture, $"SN-{n:D5}");

        public static JournalUnit Unit(int content, string serial) => new()
        {
            Name = string.Create(CultureInfo.InvariantCulture, $"unit-{content}.csv"),
            Key = Convert.ToHexStringLower(SHA256.HashData(Encoding.UTF8.GetBytes(content.ToString(CultureInfo.InvariantCulture))))
                + ":" + Convert.ToHexStringLower(SHA256.HashData("recipe"u8)),
            Part = "KP-250",
            Serial = serial,
            Outcome = content % 7 == 0 ? JournalOutcomes.Reject : JournalOutcomes.Archive,
            Ruling = content % 7 == 0 ? "rejected" : (content % 3) switch { 0 => "pass", 1 => "fail", _ => "retest" },
            Line = "line",
        };

        /// <summary>A batch of new units; serials cycle through <paramref name="serials"/> values, so later units are retests of earlier ones.</summary>
        public JournalBatch Batch(int units, int serials = 1_000_000, bool claims = false)
        {
            var at = Start.AddMinutes(_batches);
            var batch = new JournalBatch { Id = string.Create(CultureInfo.InvariantCulture, $"b{_batches++:D5}"), At = at };
            for (var i = 0; i < units; i++, _next++)
            {
                var unit = Unit(_next, SerialOf(_next % serials));
                unit.Claim = claims ? string.Create(CultureInfo.InvariantCulture, $"c{_next}~{unit.Name}") : null;
                batch.Units.Add(unit);
                _first.TryAdd(unit.Key, new FirstResult(at, unit.Ruling));
                _latest[unit.Serial!] = unit.Key;
            }

            // One duplicate in each batch: it is journaled but not published, so it is no key's first result.
            var duplicate = Unit(_next - 1, "not-published");
            duplicate.Outcome = JournalOutcomes.Duplicate;
            duplicate.Ruling = "pass";
            duplicate.Claim = claims ? string.Create(CultureInfo.InvariantCulture, $"c{_next}-dup~{duplicate.Name}") : null;
            batch.Units.Add(duplicate);
            return batch;
        }

        public void Commit(PublishJournal journal, int units, int serials = 1_000_000)
        {
            var batch = Batch(units, serials);
            journal.Commit(batch);
            journal.MarkLogged(batch.Id);
        }

        public void AssertKnownBy(PublishJournal journal, string when = "")
        {
            foreach (var (key, first) in _first)
            {
                Assert.True(journal.Lookup(key) == first, $"{when}: key {key[..8]} is {journal.Lookup(key)?.ToString() ?? "unknown"}, not {first}");
            }

            foreach (var (serial, key) in _latest)
            {
                Assert.True(journal.LatestFor("kp-250", serial) == key, $"{when}: the latest key of {serial} is {journal.LatestFor("KP-250", serial)?[..8] ?? "none"}, not {key[..8]}");
            }

            Assert.Null(journal.LatestFor("KP-250", "not-published"));
            Assert.Null(journal.Lookup(new string('0', 64) + ":none"));
        }
    }
}
