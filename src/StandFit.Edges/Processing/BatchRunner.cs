using Microsoft.Extensions.Logging;
using StandFit.Core.Judging;
using StandFit.Edges.Folders;
using StandFit.Edges.Logging;
using StandFit.Edges.Outputs;

namespace StandFit.Edges.Processing;

/// <summary>
/// Processes a list of inputs in batches: judge every unit of a batch (in parallel; the core is
/// pure), publish the batch's summary rows, append their pass/fail lines, then move or copy each
/// input to archive/ or rejected/. That order means a crash can repeat a batch but never lose one.
/// Failure policy per stage: reading or judging a unit never stops the batch; a summary write
/// failure throws before any input is moved (inputs stay; try again later); a pass/fail log
/// failure throws <see cref="AuditSinkException"/> (fatal).
/// </summary>
public sealed class BatchRunner(
    UnitProcessor processor,
    ISummarySink summaries,
    IAuditSink audit,
    FileDisposer disposer,
    TimeProvider clock,
    string toolVersion,
    int batchSize,
    ILogger logger)
{
    /// <summary>Called once per published unit, in input order (the command line prints these).</summary>
    public Action<SummaryRecord>? OnPublished { get; init; }

    /// <summary>Processes every input; stops between units when <paramref name="stop"/> is cancelled.</summary>
    public async Task<BatchCounts> ProcessAsync(IReadOnlyList<string> inputs, CancellationToken stop)
    {
        var total = new BatchCounts();
        for (var start = 0; start < inputs.Count && !stop.IsCancellationRequested; start += batchSize)
        {
            var batch = inputs.Skip(start).Take(batchSize).ToArray();
            total.Add(await ProcessBatchAsync(batch, stop).ConfigureAwait(false));
        }

        return total;
    }

    private async Task<BatchCounts> ProcessBatchAsync(string[] batch, CancellationToken stop)
    {
        var processed = new ProcessedUnit?[batch.Length];
        var unreadable = 0;
        var counts = new BatchCounts();
        var parallel = new ParallelOptions { MaxDegreeOfParallelism = Environment.ProcessorCount };
        Parallel.For(0, batch.Length, parallel, (i, state) =>
        {
            if (stop.IsCancellationRequested)
            {
                state.Stop();
                return;
            }

            try
            {
                processed[i] = processor.Process(batch[i]);
            }
            catch (Exception e) when (e is IOException or UnauthorizedAccessException)
            {
                Interlocked.Increment(ref unreadable);
                Log.InputUnreadable(logger, Path.GetFileName(batch[i]), e.Message);
            }
        });

        var processedAt = clock.GetUtcNow().UtcDateTime;
        processedAt = new DateTime(processedAt.Ticks - (processedAt.Ticks % TimeSpan.TicksPerMillisecond), DateTimeKind.Utc);
        var units = processed.OfType<ProcessedUnit>().ToList();
        for (var i = 0; i < unreadable; i++)
        {
            counts.AddSkipped();
        }

        var records = units.Select(u => SummaryRecordFactory.Create(u.Evaluation, u.File.Sha256, processedAt, toolVersion, u.File.Metadata)).ToList();
        if (records.Count == 0)
        {
            return counts;
        }

        try
        {
            await summaries.WriteAsync(records, CancellationToken.None).ConfigureAwait(false);
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            Log.SummaryWriteFailed(logger, e);
            throw;
        }

        audit.Append(records);
        for (var i = 0; i < units.Count; i++)
        {
            var unit = units[i];
            if (unit.Evaluation.Ruling == Ruling.Rejected)
            {
                var problem = unit.Evaluation.Problem!;
                Log.UnitRejected(logger, unit.File.Name, problem.Code, problem.Location.ToString(), problem.Message);
                disposer.Reject(unit.InputPath, unit.File.Sha256, processedAt, problem);
            }
            else
            {
                if (logger.IsEnabled(LogLevel.Debug))
                {
                    var reasons = string.Join(',', records[i].ReasonCodes);
                    Log.UnitJudged(logger, records[i].Serial, unit.File.Name, records[i].Ruling, reasons);
                }

                disposer.Archive(unit.InputPath, unit.File.Sha256, processedAt);
            }

            counts.Add(unit.Evaluation.Ruling);
            OnPublished?.Invoke(records[i]);
        }

        Log.BatchPublished(logger, counts.Processed, counts.Passed, counts.Failed, counts.Retest, counts.Rejected);
        return counts;
    }
}
