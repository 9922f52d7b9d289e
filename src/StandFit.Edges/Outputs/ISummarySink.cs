namespace StandFit.Edges.Outputs;

/// <summary>
/// Where summary rows go. Failure policy: a write that fails throws; the caller keeps the batch's
/// inputs where they are and tries again later, so no unit is lost.
/// </summary>
public interface ISummarySink
{
    Task<PreparedSummaries> PrepareAsync(IReadOnlyList<SummaryRecord> records, CancellationToken cancellationToken);
}

/// <summary>
/// The pass/fail log: an audit sink. Failure policy: if a line cannot be written the caller holds
/// the batch's inputs (they are not moved on without their lines) and the lines are written again
/// from the journal; <c>run</c> stops with exit code 5.
/// </summary>
public interface IAuditSink
{
    /// <summary>Appends whole lines (each starting with its <c>YYYY-MM-DD</c> time) and flushes them to disk.</summary>
    void AppendLines(IReadOnlyList<string> lines);
}

/// <summary>The audit sink could not be written.</summary>
public sealed class AuditSinkException(string message, Exception inner) : Exception(message, inner);
