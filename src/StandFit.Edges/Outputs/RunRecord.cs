using System.Text.Json.Serialization;
using Microsoft.Extensions.Logging;
using Parquet;
using Parquet.Serialization;
using Parquet.Serialization.Attributes;
using StandFit.Edges.Logging;
using StandFit.Edges.Processing;

namespace StandFit.Edges.Outputs;

/// <summary>
/// One row of the runs table (output/runs/RUN-ID.parquet): one <c>standfit run</c>, or one life of
/// a <c>standfit watch</c> worker, with its counts. docs/outputs.md documents every column; an
/// approval test pins the schema. Timestamps are UTC, INT64 milliseconds.
/// </summary>
public sealed class RunRecord
{
    /// <summary>Bumped whenever a column is added, removed or changes meaning.</summary>
    public const int CurrentSchemaVersion = 1;

    [JsonPropertyName("schema_version")]
    public int SchemaVersion { get; set; } = CurrentSchemaVersion;

    /// <summary>The run id that names the run's summary and point files.</summary>
    [JsonPropertyName("run_id")]
    [ParquetRequired]
    public string RunId { get; set; } = "";

    /// <summary><c>run</c> or <c>watch</c>.</summary>
    [JsonPropertyName("command")]
    [ParquetRequired]
    public string Command { get; set; } = "";

    [JsonPropertyName("worker_id")]
    [ParquetRequired]
    public string WorkerId { get; set; } = "";

    /// <summary><c>running</c> (a snapshot while watch works), <c>finished</c> or <c>failed</c>.</summary>
    [JsonPropertyName("state")]
    [ParquetRequired]
    public string State { get; set; } = "";

    [JsonPropertyName("started_at")]
    [ParquetTimestamp(ParquetTimestampResolution.Milliseconds, useLogicalTimestamp: true, isAdjustedToUTC: true)]
    public DateTime StartedAt { get; set; }

    /// <summary>When the run ended; for a <c>running</c> snapshot, when the snapshot was taken.</summary>
    [JsonPropertyName("ended_at")]
    [ParquetTimestamp(ParquetTimestampResolution.Milliseconds, useLogicalTimestamp: true, isAdjustedToUTC: true)]
    public DateTime EndedAt { get; set; }

    [JsonPropertyName("tool_version")]
    [ParquetRequired]
    public string ToolVersion { get; set; } = "";

    /// <summary>SHA-256 of the configuration file's bytes, in lower-case hex.</summary>
    [JsonPropertyName("config_hash")]
    [ParquetRequired]
    public string ConfigHash { get; set; } = "";

    /// <summary>Inputs given a summary row by this run (pass + fail + retest + rejected).</summary>
    [JsonPropertyName("processed")]
    public int Processed { get; set; }

    [JsonPropertyName("pass")]
    public int Pass { get; set; }

    [JsonPropertyName("fail")]
    public int Fail { get; set; }

    [JsonPropertyName("retest")]
    public int Retest { get; set; }

    [JsonPropertyName("rejected")]
    public int Rejected { get; set; }

    /// <summary>Inputs recognised as duplicates: no summary row, not counted in <see cref="Processed"/>.</summary>
    [JsonPropertyName("duplicate")]
    public int Duplicate { get; set; }
}

/// <summary>The run states a runs row can hold.</summary>
public static class RunStates
{
    public const string Running = "running";
    public const string Finished = "finished";
    public const string Failed = "failed";
}

/// <summary>
/// Writes the runs row of one process: <c>output/runs/RUN-ID.parquet</c>, one file holding one row,
/// replaced as a whole (temporary name in the same folder, flushed to disk, renamed over the old
/// one) each time it is written, so a reader sees the last complete version. <c>run</c> writes it
/// at its end; <c>watch</c> now and then while it works (state <c>running</c>) and at shutdown.
/// Failure policy: the runs table is a report, not the record of rulings: a write that fails
/// throws, and the caller logs it and goes on (the summaries and the pass/fail log are untouched).
/// </summary>
public sealed class RunRecorder(string outputFolder, string runId, string command, string workerId, DateTime startedAtUtc, string toolVersion, string configHash) : IDisposable
{
    private static readonly ParquetOptions Options = new()
    {
        CompressionMethod = CompressionMethod.Zstd,
        CompressionLevel = System.IO.Compression.CompressionLevel.Optimal,
    };

    private readonly SemaphoreSlim _gate = new(1, 1);
    private volatile bool _faultLogged;

    /// <summary>The runs file of this process.</summary>
    public string File => Path.Combine(outputFolder, "runs", runId + ".parquet");

    public RunRecord Record(BatchCounts counts, DateTime endedAtUtc, string state) => new()
    {
        RunId = runId,
        Command = command,
        WorkerId = workerId,
        State = state,
        StartedAt = Millis(startedAtUtc),
        EndedAt = Millis(endedAtUtc),
        ToolVersion = toolVersion,
        ConfigHash = configHash,
        Processed = counts.Processed,
        Pass = counts.Passed,
        Fail = counts.Failed,
        Retest = counts.Retest,
        Rejected = counts.Rejected,
        Duplicate = counts.Duplicates,
    };

    /// <summary>Writes (or replaces) the run's row. Throws <see cref="IOException"/> or <see cref="UnauthorizedAccessException"/> when it cannot.</summary>
    public async Task<RunRecord> WriteAsync(BatchCounts counts, DateTime endedAtUtc, string state, CancellationToken cancellationToken = default)
    {
        var record = Record(counts, endedAtUtc, state);
        await _gate.WaitAsync(cancellationToken).ConfigureAwait(false);
        try
        {
            if (!Directory.Exists(outputFolder))
            {
                throw new DirectoryNotFoundException($"The output folder {outputFolder} does not exist.");
            }

            var folder = Path.GetDirectoryName(File)!;
            using var held = PublishLock.Shared(folder); // never in flight while compact swaps the runs folder
            var temporary = Path.Combine(folder, "." + runId + ".parquet.tmp");
            try
            {
                await using (var stream = new FileStream(temporary, FileMode.Create, FileAccess.Write, FileShare.None, 16 * 1024, FileOptions.Asynchronous))
                {
                    await ParquetSerializer.SerializeAsync([record], stream, Options, cancellationToken: cancellationToken).ConfigureAwait(false);
                    await stream.FlushAsync(cancellationToken).ConfigureAwait(false);
                    stream.Flush(flushToDisk: true);
                }

                System.IO.File.Move(temporary, File, overwrite: true);
                return record;
            }
            catch
            {
                try
                {
                    System.IO.File.Delete(temporary);
                }
                catch (Exception e) when (e is IOException or UnauthorizedAccessException)
                {
                    // A hidden name, never read; the next write reuses it.
                }

                throw;
            }
        }
        finally
        {
            _gate.Release();
        }
    }

    /// <summary>
    /// Writes the run's row and returns it; when it cannot, logs event 2009 (once until a write
    /// succeeds again) and returns null. Never throws for an I/O fault: the runs table must not
    /// stop the work.
    /// </summary>
    public async Task<RunRecord?> TryWriteAsync(BatchCounts counts, DateTime endedAtUtc, string state, ILogger logger)
    {
        try
        {
            var record = await WriteAsync(counts, endedAtUtc, state).ConfigureAwait(false);
            _faultLogged = false;
            return record;
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            if (!_faultLogged)
            {
                _faultLogged = true;
                Log.RunRecordUnwritable(logger, File, e.Message);
            }

            return null;
        }
    }

    public void Dispose() => _gate.Dispose();

    private static DateTime Millis(DateTime utc)
    {
        var u = utc.ToUniversalTime();
        return new DateTime(u.Ticks - (u.Ticks % TimeSpan.TicksPerMillisecond), DateTimeKind.Utc);
    }
}
