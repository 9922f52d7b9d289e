using System.Buffers.Binary;
using System.Security.Cryptography;
using System.Text;
using System.Text.Json;
using System.Text.Json.Serialization;

namespace StandFit.Edges.Outputs;

/// <summary>What became of one input of a committed batch.</summary>
public static class JournalOutcomes
{
    public const string Archive = "archive";
    public const string Reject = "reject";
    public const string Duplicate = "duplicate";
}

/// <summary>One input of a committed batch, as the journal keeps it: enough to finish its work after a crash without judging it again.</summary>
public sealed class JournalUnit
{
    /// <summary>Its claim name in the worker's claim folder; null when it was read in place.</summary>
    [JsonPropertyName("claim")]
    public string? Claim { get; set; }

    /// <summary>The name it was dropped under.</summary>
    [JsonPropertyName("name")]
    public string Name { get; set; } = "";

    [JsonPropertyName("key")]
    public string Key { get; set; } = "";

    [JsonPropertyName("part")]
    public string? Part { get; set; }

    [JsonPropertyName("serial")]
    public string? Serial { get; set; }

    /// <summary><c>archive</c>, <c>reject</c> or <c>duplicate</c>.</summary>
    [JsonPropertyName("outcome")]
    public string Outcome { get; set; } = "";

    [JsonPropertyName("ruling")]
    public string Ruling { get; set; } = "";

    [JsonPropertyName("code")]
    public string? Code { get; set; }

    [JsonPropertyName("where")]
    public string? Where { get; set; }

    [JsonPropertyName("why")]
    public string? Why { get; set; }

    /// <summary>Its pass/fail line, exactly as appended (appended again, identical, if a crash came before the batch was marked logged).</summary>
    [JsonPropertyName("line")]
    public string Line { get; set; } = "";

    [JsonIgnore]
    public string Sha256 => Key.Length >= 64 ? Key[..64] : Key;
}

/// <summary>One committed batch: its Parquet files (relative to the output folder) and its inputs.</summary>
public sealed class JournalBatch
{
    [JsonPropertyName("batch")]
    public string Id { get; set; } = "";

    [JsonPropertyName("at")]
    public DateTime At { get; set; }

    [JsonPropertyName("files")]
    public List<string> Files { get; set; } = [];

    [JsonPropertyName("units")]
    public List<JournalUnit> Units { get; set; } = [];
}

/// <summary>The first result of a unit key: when it was published and its ruling.</summary>
public readonly record struct FirstResult(DateTime At, string Ruling);

/// <summary>The worker's own journal has a damaged line that is not its last: what was published cannot be known.</summary>
public sealed class JournalCorruptException(string message) : Exception(message);

/// <summary>
/// The publish journal: an append-only file per worker, <c>output/journal/WORKER.jsonl</c>, one JSON
/// object per line, each line written in one append and flushed to disk (fsync) before the next step.
/// A batch line is the commit point of a batch: it is written after the batch's Parquet files are
/// on disk under their temporary names and before they are renamed, so a crash on either side of it
/// repeats nothing and loses nothing. A <c>{"logged":ID}</c> line follows once the batch's pass/fail
/// lines are on disk. Read at start (every worker's file in the folder, so duplicates are known
/// across workers; the others' files are read again as they grow): the unit keys published, the
/// latest key of each part and serial (for <c>retest_of</c>), the batches whose lines may be missing,
/// and the claimed inputs whose work is committed but not finished. A torn last line (a crash in the
/// middle of an append) is cut off; a damaged line elsewhere is fatal.
/// </summary>
public sealed class PublishJournal
{
    private static readonly JsonSerializerOptions Json = new() { DefaultIgnoreCondition = JsonIgnoreCondition.WhenWritingNull };
    private static readonly string[] Rulings = ["pass", "fail", "retest", "rejected"];
    private readonly string _folder;
    private readonly string _own;
    private readonly Dictionary<KeyBits, (long AtTicks, byte Ruling)> _published = [];
    private readonly Dictionary<UInt128, KeyBits> _latestBySerial = [];
    private readonly Dictionary<string, long> _otherOffsets = new(StringComparer.Ordinal);
    private readonly Dictionary<string, (JournalUnit Unit, DateTime At)> _committedClaims = new(StringComparer.Ordinal);
    private readonly List<JournalBatch> _unlogged = [];
    private long _length;

    private PublishJournal(string outputFolder, string workerId)
    {
        _folder = Path.Combine(outputFolder, "journal");
        _own = Path.Combine(_folder, workerId + ".jsonl");
    }

    public string OwnFile => _own;

    /// <summary>Batches committed but not yet marked logged (their lines may be missing), oldest first.</summary>
    public IReadOnlyList<JournalBatch> Unlogged => _unlogged;

    /// <summary>Claimed inputs whose batch is committed but which were not yet moved on, by claim name.</summary>
    public IReadOnlyDictionary<string, (JournalUnit Unit, DateTime At)> CommittedClaims => _committedClaims;

    public int PublishedCount => _published.Count;

    /// <summary>Reads every journal of the output folder. <paramref name="liveClaims"/>: the claim names now in the worker's claim folder.</summary>
    public static PublishJournal Open(string outputFolder, string workerId, IReadOnlySet<string> liveClaims)
    {
        var journal = new PublishJournal(outputFolder, workerId);
        if (!Directory.Exists(journal._folder))
        {
            return journal;
        }

        journal._length = CutTornTail(journal._own);
        if (File.Exists(journal._own))
        {
            var number = 0;
            foreach (var line in File.ReadLines(journal._own, Encoding.UTF8))
            {
                number++;
                if (line.Length == 0)
                {
                    continue;
                }

                Entry? entry;
                try
                {
                    entry = JsonSerializer.Deserialize<Entry>(line, Json);
                }
                catch (JsonException e)
                {
                    throw new JournalCorruptException($"Line {number} of the journal {journal._own} is damaged ({e.Message}). It is not the last line, so it was not a crash in mid-write; the journal was edited. Restore it from a backup, or move it aside to start a new one (earlier units are then no longer known as duplicates).");
                }

                if (entry is not null)
                {
                    journal.Apply(entry, liveClaims, own: true);
                }
            }
        }

        journal.Refresh();
        return journal;
    }

    /// <summary>Reads what the other workers' journals gained since the last read.</summary>
    public void Refresh()
    {
        if (!Directory.Exists(_folder))
        {
            return;
        }

        foreach (var path in Directory.EnumerateFiles(_folder, "*.jsonl"))
        {
            if (string.Equals(Path.GetFullPath(path), Path.GetFullPath(_own), StringComparison.Ordinal))
            {
                continue;
            }

            var offset = _otherOffsets.GetValueOrDefault(path);
            try
            {
                using var stream = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.ReadWrite | FileShare.Delete);
                if (stream.Length < offset)
                {
                    offset = 0; // replaced: read it again (keys are sets; nothing is counted twice)
                }

                if (stream.Length == offset)
                {
                    continue;
                }

                stream.Position = offset;
                var bytes = new byte[stream.Length - offset];
                stream.ReadExactly(bytes);
                var end = Array.LastIndexOf(bytes, (byte)'\n');
                if (end < 0)
                {
                    continue;
                }

                foreach (var line in Encoding.UTF8.GetString(bytes, 0, end).Split('\n'))
                {
                    if (line.Length == 0)
                    {
                        continue;
                    }

                    try
                    {
                        if (JsonSerializer.Deserialize<Entry>(line, Json) is { } entry)
                        {
                            Apply(entry, liveClaims: null, own: false);
                        }
                    }
                    catch (JsonException)
                    {
                        // Another worker's damaged line: it does not stop this worker.
                    }
                }

                _otherOffsets[path] = offset + end + 1;
            }
            catch (Exception e) when (e is IOException or UnauthorizedAccessException)
            {
                // Another worker's journal that cannot be read now is read on a later pass.
            }
        }
    }

    /// <summary>The first published result of a unit key, or null when it was never published.</summary>
    public FirstResult? Lookup(string unitKey) =>
        KeyBits.TryParse(unitKey, out var bits) && _published.TryGetValue(bits, out var first)
            ? new FirstResult(new DateTime(first.AtTicks, DateTimeKind.Utc), Rulings[first.Ruling])
            : null;

    /// <summary>The unit key of the latest published row of a part and serial, or null.</summary>
    public string? LatestFor(string? part, string? serial) =>
        serial is not null && _latestBySerial.TryGetValue(SerialBits(part, serial), out var bits) ? bits.ToString() : null;

    /// <summary>Writes a batch's commit line (flushed to disk), then takes its keys into the index.</summary>
    public void Commit(JournalBatch batch)
    {
        Append(new Entry { Batch = batch.Id, At = batch.At, Files = batch.Files, Units = batch.Units });
        Apply(new Entry { Batch = batch.Id, At = batch.At, Files = batch.Files, Units = batch.Units }, liveClaims: null, own: true, committedNow: true);
    }

    /// <summary>Writes that a batch's pass/fail lines are on disk.</summary>
    public void MarkLogged(string batchId)
    {
        Append(new Entry { Logged = batchId });
        _unlogged.RemoveAll(b => b.Id == batchId);
    }

    /// <summary>A committed claimed input has been moved on.</summary>
    public void ClaimDone(string claim) => _committedClaims.Remove(claim);

    /// <summary>Appends one entry as one line, streamed (a large batch makes no large string), then flushes it to disk.</summary>
    private void Append(Entry entry)
    {
        if (!Directory.Exists(Path.GetDirectoryName(_folder)))
        {
            throw new DirectoryNotFoundException($"The output folder {Path.GetDirectoryName(_folder)} does not exist.");
        }

        Directory.CreateDirectory(_folder);
        using var stream = new FileStream(_own, FileMode.OpenOrCreate, FileAccess.ReadWrite, FileShare.Read, 16 * 1024);
        if (stream.Length != _length)
        {
            // A failed append left a partial line, or the file was replaced: continue after its last whole line.
            _length = stream.Length > _length ? _length : LastLineEnd(stream);
            stream.SetLength(_length);
        }

        stream.Position = _length;
        try
        {
            JsonSerializer.Serialize(stream, entry, Json);
            stream.WriteByte((byte)'\n');
            stream.Flush(flushToDisk: true);
        }
        catch
        {
            TryCut(stream, _length);
            throw;
        }

        _length = stream.Position;
    }

    private static void TryCut(FileStream stream, long length)
    {
        try
        {
            stream.SetLength(length);
        }
        catch (IOException)
        {
            // The next append cuts the partial line before it writes.
        }
    }

    private void Apply(Entry entry, IReadOnlySet<string>? liveClaims, bool own, bool committedNow = false)
    {
        if (entry.Logged is { } logged)
        {
            if (own)
            {
                _unlogged.RemoveAll(b => b.Id == logged);
            }

            return;
        }

        if (entry.Batch is null || entry.Units is null)
        {
            return;
        }

        var at = DateTime.SpecifyKind(entry.At ?? default, DateTimeKind.Utc);
        foreach (var unit in entry.Units)
        {
            if (unit.Outcome != JournalOutcomes.Duplicate && KeyBits.TryParse(unit.Key, out var bits))
            {
                var ruling = (byte)Math.Max(0, Array.IndexOf(Rulings, unit.Ruling));
                _published.TryAdd(bits, (at.Ticks, ruling));
                if (unit.Serial is not null)
                {
                    _latestBySerial[SerialBits(unit.Part, unit.Serial)] = bits;
                }
            }

            if (own && unit.Claim is { } claim && (committedNow || liveClaims?.Contains(claim) == true))
            {
                _committedClaims[claim] = (unit, at);
            }
        }

        if (own)
        {
            _unlogged.Add(new JournalBatch { Id = entry.Batch, At = at, Files = entry.Files ?? [], Units = committedNow ? entry.Units : [.. entry.Units] });
        }
    }

    private static UInt128 SerialBits(string? part, string serial)
    {
        var hash = SHA256.HashData(Encoding.UTF8.GetBytes((part ?? "").ToUpperInvariant() + "\n" + serial));
        return BinaryPrimitives.ReadUInt128BigEndian(hash);
    }

    /// <summary>Cuts a torn last line (no final newline) off the file; returns the length kept.</summary>
    private static long CutTornTail(string path)
    {
        if (!File.Exists(path))
        {
            return 0;
        }

        using var stream = new FileStream(path, FileMode.Open, FileAccess.ReadWrite, FileShare.Read);
        var end = LastLineEnd(stream);
        if (end != stream.Length)
        {
            stream.SetLength(end);
            stream.Flush(flushToDisk: true);
        }

        return end;
    }

    /// <summary>The length up to and including the last newline.</summary>
    private static long LastLineEnd(FileStream stream)
    {
        var buffer = new byte[4096];
        var position = stream.Length;
        while (position > 0)
        {
            var take = (int)Math.Min(buffer.Length, position);
            position -= take;
            stream.Position = position;
            stream.ReadExactly(buffer, 0, take);
            var index = Array.LastIndexOf(buffer, (byte)'\n', take - 1, take);
            if (index >= 0)
            {
                return position + index + 1;
            }
        }

        return 0;
    }

    private sealed class Entry
    {
        [JsonPropertyName("batch")]
        public string? Batch { get; set; }

        [JsonPropertyName("at")]
        public DateTime? At { get; set; }

        [JsonPropertyName("files")]
        public List<string>? Files { get; set; }

        [JsonPropertyName("units")]
        public List<JournalUnit>? Units { get; set; }

        [JsonPropertyName("logged")]
        public string? Logged { get; set; }
    }

    /// <summary>A unit key in 64 bytes: the sweep's SHA-256 and the recipe's (zero for <c>none</c>).</summary>
    private readonly record struct KeyBits(UInt128 S0, UInt128 S1, UInt128 R0, UInt128 R1)
    {
        public static bool TryParse(string key, out KeyBits bits)
        {
            bits = default;
            if (key.Length < 66 || key[64] != ':')
            {
                return false;
            }

            Span<byte> sweep = stackalloc byte[32];
            Span<byte> recipe = stackalloc byte[32];
            if (Convert.FromHexString(key.AsSpan(0, 64), sweep, out _, out var written) != System.Buffers.OperationStatus.Done || written != 32)
            {
                return false;
            }

            var rest = key.AsSpan(65);
            if (rest.SequenceEqual("none"))
            {
                recipe.Clear();
            }
            else if (rest.Length != 64 || Convert.FromHexString(rest, recipe, out _, out written) != System.Buffers.OperationStatus.Done || written != 32)
            {
                return false;
            }

            bits = new KeyBits(
                BinaryPrimitives.ReadUInt128BigEndian(sweep),
                BinaryPrimitives.ReadUInt128BigEndian(sweep[16..]),
                BinaryPrimitives.ReadUInt128BigEndian(recipe),
                BinaryPrimitives.ReadUInt128BigEndian(recipe[16..]));
            return true;
        }

        public override string ToString()
        {
            Span<byte> bytes = stackalloc byte[64];
            BinaryPrimitives.WriteUInt128BigEndian(bytes, S0);
            BinaryPrimitives.WriteUInt128BigEndian(bytes[16..], S1);
            BinaryPrimitives.WriteUInt128BigEndian(bytes[32..], R0);
            BinaryPrimitives.WriteUInt128BigEndian(bytes[48..], R1);
            var recipe = R0 == 0 && R1 == 0 ? "none" : Convert.ToHexStringLower(bytes[32..]);
            return Convert.ToHexStringLower(bytes[..32]) + ":" + recipe;
        }
    }
}
