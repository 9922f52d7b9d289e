using System.Diagnostics;
using System.Globalization;
using Serilog.Events;
using Serilog.Extensions.Logging;
using StandFit.Edges.Folders;
using StandFit.Edges.Logging;
using StandFit.Edges.Outputs;
using StandFit.Edges.Processing;

namespace StandFit.Cli.Commands;

/// <summary><c>standfit run</c>: process every ready file once, then exit.</summary>
internal static class RunCommand
{
    public static async Task<int> ExecuteAsync(string[] args, TextWriter output, TextWriter error)
    {
        var (parsed, problem) = Arguments.Parse(args, ["--config", "--from", "--shard"], ["--quiet", "--stats", "--help"]);
        if (parsed is null || parsed.Positional.Count > 0)
        {
            error.WriteLine("standfit run: " + (problem ?? "unexpected argument " + parsed!.Positional[0]));
            error.WriteLine(Help.Run);
            return ExitCodes.Usage;
        }

        if (parsed.Has("--help"))
        {
            output.WriteLine(Help.Run);
            return ExitCodes.Ok;
        }

        var from = parsed.Value("--from");
        if (from is not null && !Directory.Exists(from))
        {
            error.WriteLine($"standfit run: --from folder '{from}' does not exist.");
            return ExitCodes.Usage;
        }

        var shard = Shard.All;
        if (parsed.Value("--shard") is { } shardText && !Shard.TryParse(shardText, out shard))
        {
            error.WriteLine("standfit run: " + Core.Problems.Messages.BadShard(shardText, Shard.MaxCount));
            return ExitCodes.Usage;
        }

        // The runs table's row is written whatever happens: its Parquet code is compiled on another core meanwhile.
        var warmRuns = ParquetWarmup.Start(typeof(RunRecord));
        var options = Startup.LoadOptions(parsed.Value("--config"), error, needInbox: from is null);
        if (options is null)
        {
            return ExitCodes.Configuration;
        }

        // Each shard works as a worker of its own (claims, journal, Parquet file names, lock).
        options = options with { WorkerId = shard.WorkerIdOf(options.WorkerId) };

        var quiet = parsed.Has("--quiet");
        var times = parsed.Has("--stats") ? new StageTimes() : null;
        ProgressMeter? meter = null;
        using var log = OperationsLog.Create(options.Logs, LogEventLevel.Error);
        using var loggers = new SerilogLoggerFactory(log);
        var logger = loggers.CreateLogger("StandFit");
        var printer = new RulingPrinter(output, quiet);
        var mode = from is null ? DispositionMode.Move : DispositionMode.Copy;
        Pipeline pipeline;
        try
        {
            pipeline = Pipeline.Build(options, loggers, mode, TimeProvider.System, printer.Print, printer.PrintDuplicate, times: times, onUnitDone: () => meter?.Add());
        }
        catch (WorkerBusyException e)
        {
            error.WriteLine("standfit run: " + e.Message);
            return ExitCodes.Configuration;
        }

        using var owned = pipeline;
        if (!pipeline.Catalog.IsValid)
        {
            Startup.Print(error, "recipe folder", pipeline.Catalog.Problems);
            return ExitCodes.Configuration;
        }

        var folder = Path.GetFullPath(from ?? options.Inbox);
        var inputs = DropFolder.ListReady(folder).Where(shard.Owns).ToList();
        var modeName = from is null ? "inbox, inputs moved" : "read in place, inputs copied";
        Log.RunStarted(logger, inputs.Count, folder, modeName);
        meter = new ProgressMeter(inputs.Count, TimeProvider.System);
        var warmRows = inputs.Count > 0 ? ParquetWarmup.Start(typeof(SummaryRecord), typeof(PointRecord)) : Task.CompletedTask;
        var interactive = !Console.IsErrorRedirected && (quiet || Console.IsOutputRedirected);
        using var stop = new CancellationTokenSource();
        ConsoleCancelEventHandler onCancel = (_, e) =>
        {
            e.Cancel = true;
            stop.Cancel();
        };
        Console.CancelKeyPress += onCancel;
        var clock = Stopwatch.StartNew();
        using var runs = pipeline.NewRunRecorder("run");
        var state = RunStates.Failed;
        using var progressStop = new CancellationTokenSource();
        var progress = inputs.Count > 0 ? ProgressLoop.RunAsync(meter, logger, interactive ? error : null, progressStop.Token) : Task.CompletedTask;
        try
        {
            pipeline.Runner.Start();
            var counts = await pipeline.Runner.ProcessAsync(inputs, stop.Token).ConfigureAwait(false);
            await progressStop.CancelAsync().ConfigureAwait(false);
            await progress.ConfigureAwait(false);
            Log.RunFinished(logger, counts.Processed, clock.Elapsed.TotalSeconds);
            state = RunStates.Finished;
            printer.PrintTotals(counts, clock.Elapsed, options.Output);
            if (times is not null)
            {
                PrintStats(error, times, counts.Processed, clock.Elapsed);
            }

            return ExitCodes.Ok;
        }
        catch (AuditSinkException e)
        {
            Log.AuditSinkFailed(logger, e);
            error.WriteLine("standfit run: " + e.Message);
            return ExitCodes.Fatal;
        }
        catch (JournalCorruptException e)
        {
            Log.Fatal(logger, e);
            error.WriteLine("standfit run: " + e.Message);
            return ExitCodes.Fatal;
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            Log.SummaryWriteFailed(logger, e);
            error.WriteLine("standfit run: an output cannot be written (" + e.Message + "); unpublished inputs stay where they are.");
            return ExitCodes.OutputFault;
        }
        finally
        {
            await progressStop.CancelAsync().ConfigureAwait(false);
            await progress.ConfigureAwait(false);
            Console.CancelKeyPress -= onCancel;

            // The run's row in the runs table, whatever the outcome (a fault is recorded as failed).
            await runs.TryWriteAsync(pipeline.Runner.Published(), DateTime.UtcNow, state, logger).ConfigureAwait(false);
        }
    }

    /// <summary><c>--stats</c>: the time per stage, the rate, the garbage collector's work and the peak working set, on standard error.</summary>
    private static void PrintStats(TextWriter error, StageTimes times, int units, TimeSpan wall)
    {
        using var self = Process.GetCurrentProcess();
        error.Write(times.Format(units));
        var rate = wall > TimeSpan.Zero ? units / wall.TotalSeconds : 0;
        error.WriteLine(string.Create(
            CultureInfo.InvariantCulture,
            $"wall {wall.TotalSeconds:F3} s, {rate:F0} units/s, process CPU {self.TotalProcessorTime.TotalSeconds:F3} s ({(units > 0 ? self.TotalProcessorTime.TotalMicroseconds / units : 0):F0} us/unit), {Environment.ProcessorCount} threads, {(System.Runtime.GCSettings.IsServerGC ? "server" : "workstation")} GC, collections gen0 {GC.CollectionCount(0)} gen1 {GC.CollectionCount(1)} gen2 {GC.CollectionCount(2)}, allocated {GC.GetTotalAllocatedBytes() / 1048576.0:F0} MiB, GC pauses {GC.GetTotalPauseDuration().TotalSeconds:F3} s, peak working set {self.PeakWorkingSet64 / 1048576.0:F1} MiB"));
        error.WriteLine(string.Create(
            CultureInfo.InvariantCulture,
            $"JIT: {System.Runtime.JitInfo.GetCompiledMethodCount()} methods compiled, {System.Runtime.JitInfo.GetCompilationTime().TotalSeconds:F3} s compiling"));
    }
}
