using Microsoft.Extensions.Logging;

namespace StandFit.Edges.Logging;

/// <summary>
/// Every operations-log event the tool writes, with a stable event id (documented in
/// docs/operations.md; plant monitors may alarm on them). 1xxx: units, 2xxx: batches and folders,
/// 3xxx: recipes, 4xxx: the worker, 9xxx: faults.
/// </summary>
public static partial class Log
{
    [LoggerMessage(EventId = 1001, Level = LogLevel.Debug, Message = "Unit {Serial} from {SourceFile}: {Ruling} ({Reasons})")]
    public static partial void UnitJudged(ILogger logger, string? serial, string sourceFile, string ruling, string reasons);

    [LoggerMessage(EventId = 1002, Level = LogLevel.Warning, Message = "Unit from {SourceFile} rejected: {Code} at {Location}: {Why}")]
    public static partial void UnitRejected(ILogger logger, string sourceFile, string code, string location, string why);

    [LoggerMessage(EventId = 1003, Level = LogLevel.Error, Message = "Internal error on {SourceFile}; the unit is rejected and the worker goes on")]
    public static partial void UnitInternalError(ILogger logger, Exception exception, string sourceFile);

    [LoggerMessage(EventId = 1004, Level = LogLevel.Warning, Message = "Input {SourceFile} vanished or cannot be read before processing: {Why}; skipped")]
    public static partial void InputUnreadable(ILogger logger, string sourceFile, string why);

    [LoggerMessage(EventId = 2001, Level = LogLevel.Information, Message = "Batch of {Count} units published: {Passed} pass, {Failed} fail, {Retest} retest, {Rejected} rejected")]
    public static partial void BatchPublished(ILogger logger, int count, int passed, int failed, int retest, int rejected);

    [LoggerMessage(EventId = 2002, Level = LogLevel.Error, Message = "Summary output cannot be written; the batch's inputs stay where they are")]
    public static partial void SummaryWriteFailed(ILogger logger, Exception exception);

    [LoggerMessage(EventId = 2003, Level = LogLevel.Information, Message = "Run started: {Inputs} inputs in {Folder} ({Mode})")]
    public static partial void RunStarted(ILogger logger, int inputs, string folder, string mode);

    [LoggerMessage(EventId = 2004, Level = LogLevel.Information, Message = "Run finished: {Count} units in {Seconds:F2} s")]
    public static partial void RunFinished(ILogger logger, int count, double seconds);

    [LoggerMessage(EventId = 3001, Level = LogLevel.Information, Message = "Recipes loaded: {Count} in force from {Folder}")]
    public static partial void RecipesLoaded(ILogger logger, int count, string folder);

    [LoggerMessage(EventId = 3002, Level = LogLevel.Error, Message = "Recipe problem: {Problem}")]
    public static partial void RecipeProblem(ILogger logger, string problem);

    [LoggerMessage(EventId = 4001, Level = LogLevel.Information, Message = "Worker watching {Inbox} (rescan every {PollSeconds} s)")]
    public static partial void WorkerStarted(ILogger logger, string inbox, double pollSeconds);

    [LoggerMessage(EventId = 4002, Level = LogLevel.Information, Message = "Worker stopping after the unit in hand")]
    public static partial void WorkerStopping(ILogger logger);

    [LoggerMessage(EventId = 4003, Level = LogLevel.Warning, Message = "Folder watcher failed; recreating it (rescans go on)")]
    public static partial void WatcherFailed(ILogger logger, Exception exception);

    [LoggerMessage(EventId = 9001, Level = LogLevel.Critical, Message = "The pass/fail log cannot be written; the worker stops")]
    public static partial void AuditSinkFailed(ILogger logger, Exception exception);

    [LoggerMessage(EventId = 9002, Level = LogLevel.Critical, Message = "Fatal error; the worker stops")]
    public static partial void Fatal(ILogger logger, Exception exception);
}
