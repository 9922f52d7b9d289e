namespace StandFit.Edges.Outputs;

/// <summary>
/// Where summary rows go. Failure policy: a write that fails throws; the caller keeps the batch's
/// inputs where they are and tries again later, so no unit is lost.
/// </summary>
public interface ISummarySink
{
    Task WriteAsync(IReadOnlyList<SummaryRecord> records, CancellationToken cancellationToken);
}

/// <summary>
/// The pass/fail log: an audit sink. Failure policy: if a line cannot be written the worker stops
/// (<see cref="AuditSinkException"/>); rulings are never made without their audit line.
/// </summary>
public interface IAuditSink
{
    void Append(IReadOnlyList<SummaryRecord> records);
}

/// <summary>The audit sink could not be written: fatal for the worker.</summary>
public sealed class AuditSinkException(string message, Exception inner) : Exception(message, inner);
