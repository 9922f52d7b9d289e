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

    [LoggerMessage(EventId = 1005, Level = LogLevel.Warning, Message = "Unit from {SourceFile} is a duplicate of {UnitKey} (first published {FirstAt}, {FirstRuling}); not judged again, no new summary row")]
    public static partial void UnitDuplicate(ILogger logger, string sourceFile, string unitKey, string firstAt, string firstRuling);

    [LoggerMessage(EventId = 1006, Level = LogLevel.Warning, Message = "Unit from {SourceFile} names part {Part}, which no recipe in force lists; it is held in the claim folder, not judged and not rejected, until a recipe lists the part")]
    public static partial void UnitHeldNoRecipe(ILogger logger, string sourceFile, string part);

    [LoggerMessage(EventId = 1007, Level = LogLevel.Information, Message = "Unit from {SourceFile}, held for want of a recipe for part {Part}, is judged now that a recipe lists it")]
    public static partial void UnitHeldReleased(ILogger logger, string sourceFile, string part);

    [LoggerMessage(EventId = 2001, Level = LogLevel.Information, Message = "Batch of {Count} units published: {Passed} pass, {Failed} fail, {Retest} retest, {Rejected} rejected")]
    public static partial void BatchPublished(ILogger logger, int count, int passed, int failed, int retest, int rejected);

    [LoggerMessage(EventId = 2002, Level = LogLevel.Error, Message = "Summary output cannot be written; the batch's inputs stay where they are")]
    public static partial void SummaryWriteFailed(ILogger logger, Exception exception);

    [LoggerMessage(EventId = 2003, Level = LogLevel.Information, Message = "Run started: {Inputs} inputs in {Folder} ({Mode})")]
    public static partial void RunStarted(ILogger logger, int inputs, string folder, string mode);

    [LoggerMessage(EventId = 2004, Level = LogLevel.Information, Message = "Run finished: {Count} units in {Seconds:F2} s")]
    public static partial void RunFinished(ILogger logger, int count, double seconds);

    [LoggerMessage(EventId = 2005, Level = LogLevel.Information, Message = "Recovered committed work: {Batches} batches' pass/fail lines written again, {Inputs} published inputs moved on without a new row")]
    public static partial void Recovered(ILogger logger, int batches, int inputs);

    [LoggerMessage(EventId = 2006, Level = LogLevel.Information, Message = "Journal read: {Keys} unit keys published, {Pending} claimed inputs to finish, {Orphans} temporary files of an uncommitted batch removed")]
    public static partial void JournalOpened(ILogger logger, long keys, int pending, int orphans);

    [LoggerMessage(EventId = 2007, Level = LogLevel.Error, Message = "Summary file {File} of committed batch {Batch} is missing (neither its temporary nor its final name exists); its rows are lost. Restore the file from a backup")]
    public static partial void CommittedFileMissing(ILogger logger, string file, string batch);

    [LoggerMessage(EventId = 2008, Level = LogLevel.Information, Message = "Journal compacted: {Units} units folded into index generation {Generation} ({IndexFiles} index files, {IndexKeys} unit keys, {IndexBytes} bytes); the journal went from {BytesBefore} to {BytesAfter} bytes")]
    public static partial void JournalCompacted(ILogger logger, int units, int generation, int indexFiles, long indexKeys, long indexBytes, long bytesBefore, long bytesAfter);

    [LoggerMessage(EventId = 2009, Level = LogLevel.Warning, Message = "The runs table row {File} cannot be written: {Why}; summaries, points and the pass/fail log are not affected")]
    public static partial void RunRecordUnwritable(ILogger logger, string file, string why);

    [LoggerMessage(EventId = 2010, Level = LogLevel.Information, Message = "Run progress: {Done} of {Total} units ({Percent:F1} %), {Rate:F0} units/s, {SecondsLeft:F0} s left")]
    public static partial void RunProgress(ILogger logger, int done, int total, double percent, double rate, double secondsLeft);

    [LoggerMessage(EventId = 3001, Level = LogLevel.Information, Message = "Recipes loaded: {Count} in force from {Folder}")]
    public static partial void RecipesLoaded(ILogger logger, int count, string folder);

    [LoggerMessage(EventId = 3002, Level = LogLevel.Error, Message = "Recipe problem: {Problem}")]
    public static partial void RecipeProblem(ILogger logger, string problem);

    [LoggerMessage(EventId = 3003, Level = LogLevel.Information, Message = "Recipes reloaded: {Count} in force from {Folder}")]
    public static partial void RecipesReloaded(ILogger logger, int count, string folder);

    [LoggerMessage(EventId = 3004, Level = LogLevel.Warning, Message = "The recipe folder changed but cannot be taken into force ({Problems} problems); the last good recipes stay in force")]
    public static partial void RecipesKept(ILogger logger, int problems);

    [LoggerMessage(EventId = 4001, Level = LogLevel.Information, Message = "Worker watching {Inbox} (rescan every {PollSeconds} s)")]
    public static partial void WorkerStarted(ILogger logger, string inbox, double pollSeconds);

    [LoggerMessage(EventId = 4002, Level = LogLevel.Information, Message = "Worker stopping after the unit in hand")]
    public static partial void WorkerStopping(ILogger logger);

    [LoggerMessage(EventId = 4003, Level = LogLevel.Warning, Message = "Folder watcher failed; recreating it (rescans go on)")]
    public static partial void WatcherFailed(ILogger logger, Exception exception);

    [LoggerMessage(EventId = 4004, Level = LogLevel.Information, Message = "Worker {WorkerId} claims into {ClaimFolder}; inputs must be stable for {StableSeconds} s; status in {StatusFile}")]
    public static partial void WorkerIdentity(ILogger logger, string workerId, string claimFolder, double stableSeconds, string statusFile);

    [LoggerMessage(EventId = 4005, Level = LogLevel.Warning, Message = "The status file {StatusFile} cannot be written: {Why}")]
    public static partial void StatusUnwritable(ILogger logger, string statusFile, string why);

    [LoggerMessage(EventId = 9001, Level = LogLevel.Critical, Message = "The pass/fail log cannot be written; the worker stops")]
    public static partial void AuditSinkFailed(ILogger logger, Exception exception);

    [LoggerMessage(EventId = 9002, Level = LogLevel.Critical, Message = "Fatal error; the worker stops")]
    public static partial void Fatal(ILogger logger, Exception exception);

    [LoggerMessage(EventId = 9003, Level = LogLevel.Error, Message = "{Stage} cannot be used: {Why}. Inputs stay where they are (or claimed, not archived); retrying with backoff. Attempt {Attempts}; this is logged again in {IntervalSeconds} s if it goes on")]
    public static partial void Fault(ILogger logger, string stage, string why, int attempts, double intervalSeconds);

    [LoggerMessage(EventId = 9004, Level = LogLevel.Information, Message = "{Stage} works again after {Seconds:F0} s and {Attempts} attempts; held inputs resume")]
    public static partial void FaultCleared(ILogger logger, string stage, double seconds, int attempts);
}
