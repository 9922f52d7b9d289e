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

/// <summary>What a compaction did: the units it folded into the index, the index it left, the journal's size before and after.</summary>
public sealed record CompactionReport(int Units, int Generation, int IndexFiles, long IndexKeys, long IndexBytes, long JournalBytesBefore, long JournalBytesAfter);

/// <summary>The worker's own journal (or an index file it names) is damaged: what was published cannot be known.</summary>
public sealed class JournalCorruptException(string message) : Exception(message);

/// <summary>
/// One line of a journal file. Exactly one of three shapes: the index header
/// (<c>{"index":GEN,"segments":[...]}</c>, only ever the first line), a committed batch
/// (<c>{"batch":ID,"at":..,"files":[..],"units":[..]}</c>) or a logged mark (<c>{"logged":ID}</c>).
/// </summary>
internal sealed class JournalLine
{
    /// <summary>The header's index generation: the keys of every batch before this file are in <see cref="Segments"/>.</summary>
    [JsonPropertyName("index")]
    public int? Index { get; set; }

    /// <summary>The header's index files, oldest first, by name in the journal folder.</summary>
    [JsonPropertyName("segments")]
    public List<string>? Segments { get; set; }

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

    /// <summary>The bytes every header line starts with (the serializer writes properties in declaration order, nulls left out).</summary>
    public static ReadOnlySpan<byte> HeaderPrefix => "{\"index\":"u8;

    public bool IsHeader => Index is not null;

    public DateTime AtUtc => DateTime.SpecifyKind(At ?? default, DateTimeKind.Utc);

    public static JournalLine Header(int generation, IEnumerable<string> segments) => new() { Index = generation, Segments = [.. segments] };

    public static JournalLine Committed(JournalBatch batch) => new() { Batch = batch.Id, At = batch.At, Files = batch.Files, Units = batch.Units };

    public static JournalLine LoggedMark(string batchId) => new() { Logged = batchId };
}
