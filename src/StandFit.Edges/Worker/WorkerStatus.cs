using System.Text.Json;
using System.Text.Json.Serialization;
using StandFit.Edges.Processing;

namespace StandFit.Edges.Worker;

/// <summary>
/// What a plant monitor reads in the status file: counters since the worker started, inputs held,
/// the last error, the time of the last unit. Thread-safe: the loop updates it, a timer writes it.
/// </summary>
public sealed class WorkerStatus(string workerId, string version, DateTime startedAtUtc)
{
    public const int FormatVersion = 1;
    private static readonly JsonSerializerOptions Json = new() { WriteIndented = true };
    private readonly Lock _gate = new();
    private readonly BatchCounts _counts = new();
    private int _held;
    private int _awaitingRecipe;
    private string _state = "starting";
    private DateTime? _lastUnitAt;
    private DateTime? _lastErrorAt;
    private string? _lastError;

    public void Add(BatchCounts counts, DateTime nowUtc)
    {
        lock (_gate)
        {
            _counts.Add(counts);
            if (counts.Processed + counts.Duplicates > 0)
            {
                _lastUnitAt = nowUtc;
            }
        }
    }

    /// <summary>Inputs in the claim folder not moved on yet, and how many of them wait for a recipe that lists their part.</summary>
    public void SetHeld(int held, int awaitingRecipe = 0)
    {
        lock (_gate)
        {
            _held = held;
            _awaitingRecipe = awaitingRecipe;
        }
    }

    public void SetState(string state)
    {
        lock (_gate)
        {
            _state = state;
        }
    }

    public void SetError(string message, DateTime nowUtc)
    {
        lock (_gate)
        {
            _lastError = message;
            _lastErrorAt = nowUtc;
        }
    }

    public string ToJson(DateTime nowUtc)
    {
        lock (_gate)
        {
            var snapshot = new Snapshot
            {
                Version = FormatVersion,
                ToolVersion = version,
                WorkerId = workerId,
                ProcessId = Environment.ProcessId,
                State = _state,
                StartedAt = startedAtUtc,
                UpdatedAt = nowUtc,
                LastUnitAt = _lastUnitAt,
                Counters = new Counters
                {
                    Processed = _counts.Processed,
                    Passed = _counts.Passed,
                    Failed = _counts.Failed,
                    Retest = _counts.Retest,
                    Rejected = _counts.Rejected,
                    Duplicates = _counts.Duplicates,
                    Held = _held,
                    AwaitingRecipe = _awaitingRecipe,
                },
                LastError = _lastError is null ? null : new LastErrorInfo { At = _lastErrorAt!.Value, Message = _lastError },
                Memory = new MemoryInfo { WorkingSetBytes = Environment.WorkingSet, ManagedHeapBytes = GC.GetTotalMemory(forceFullCollection: false) },
            };
            return JsonSerializer.Serialize(snapshot, Json) + "\n";
        }
    }

    private sealed class Snapshot
    {
        [JsonPropertyName("status_version")]
        public int Version { get; set; }

        [JsonPropertyName("tool_version")]
        public string ToolVersion { get; set; } = "";

        [JsonPropertyName("worker_id")]
        public string WorkerId { get; set; } = "";

        [JsonPropertyName("pid")]
        public int ProcessId { get; set; }

        [JsonPropertyName("state")]
        public string State { get; set; } = "";

        [JsonPropertyName("started_at")]
        public DateTime StartedAt { get; set; }

        [JsonPropertyName("updated_at")]
        public DateTime UpdatedAt { get; set; }

        [JsonPropertyName("last_unit_at")]
        public DateTime? LastUnitAt { get; set; }

        [JsonPropertyName("counters")]
        public Counters Counters { get; set; } = new();

        [JsonPropertyName("last_error")]
        public LastErrorInfo? LastError { get; set; }

        [JsonPropertyName("memory")]
        public MemoryInfo Memory { get; set; } = new();
    }

    private sealed class MemoryInfo
    {
        [JsonPropertyName("working_set_bytes")]
        public long WorkingSetBytes { get; set; }

        [JsonPropertyName("managed_heap_bytes")]
        public long ManagedHeapBytes { get; set; }
    }

    private sealed class Counters
    {
        [JsonPropertyName("processed")]
        public int Processed { get; set; }

        [JsonPropertyName("passed")]
        public int Passed { get; set; }

        [JsonPropertyName("failed")]
        public int Failed { get; set; }

        [JsonPropertyName("retest")]
        public int Retest { get; set; }

        [JsonPropertyName("rejected")]
        public int Rejected { get; set; }

        [JsonPropertyName("duplicates")]
        public int Duplicates { get; set; }

        [JsonPropertyName("held")]
        public int Held { get; set; }

        [JsonPropertyName("awaiting_recipe")]
        public int AwaitingRecipe { get; set; }
    }

    private sealed class LastErrorInfo
    {
        [JsonPropertyName("at")]
        public DateTime At { get; set; }

        [JsonPropertyName("message")]
        public string Message { get; set; } = "";
    }
}
