using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Logging;
using Serilog;
using Serilog.Events;
using Serilog.Extensions.Logging;
using StandFit.Edges.Folders;
using StandFit.Edges.Logging;
using StandFit.Edges.Processing;
using StandFit.Edges.Worker;

namespace StandFit.Cli.Commands;

/// <summary><c>standfit watch</c>: the long-lived worker under Microsoft.Extensions.Hosting.</summary>
internal static class WatchCommand
{
    /// <summary>How long the host waits for the batch in hand after Ctrl-C or SIGTERM.</summary>
    public static readonly TimeSpan ShutdownTimeout = TimeSpan.FromSeconds(30);

    public static async Task<int> ExecuteAsync(string[] args, TextWriter output, TextWriter error)
    {
        var (parsed, problem) = Arguments.Parse(args, ["--config"], ["--help"]);
        if (parsed is not null && parsed.Has("--help"))
        {
            output.WriteLine(Help.Watch);
            return ExitCodes.Ok;
        }

        if (parsed is null || parsed.Positional.Count > 0)
        {
            error.WriteLine("standfit watch: " + (problem ?? "unexpected argument " + parsed!.Positional[0]));
            error.WriteLine(Help.Watch);
            return ExitCodes.Usage;
        }

        var options = Startup.LoadOptions(parsed.Value("--config"), error, needInbox: true);
        if (options is null)
        {
            return ExitCodes.Configuration;
        }

        var recipes = Edges.RecipeFiles.RecipeCatalog.Load(options.Recipes);
        if (!recipes.IsValid)
        {
            // At start there is no earlier good version to keep in force: refuse, as run does.
            Startup.Print(error, "recipe folder", recipes.Problems);
            return ExitCodes.Configuration;
        }

        using var log = OperationsLog.Create(options.Logs, LogEventLevel.Information);
        using var loggers = new SerilogLoggerFactory(log);
        Pipeline pipeline;
        try
        {
            pipeline = Pipeline.Build(options, loggers, DispositionMode.Move, TimeProvider.System, holdUncoveredParts: true, flushAge: TimeSpan.FromSeconds(options.FlushSeconds));
        }
        catch (WorkerBusyException e)
        {
            error.WriteLine("standfit watch: " + e.Message);
            return ExitCodes.Configuration;
        }

        using var owned = pipeline;
        var workerLogger = loggers.CreateLogger("StandFit.Worker");
        var settings = new LoopSettings
        {
            Poll = TimeSpan.FromSeconds(options.PollSeconds),
            Stable = TimeSpan.FromSeconds(options.StableSeconds),
            StatusInterval = TimeSpan.FromSeconds(options.StatusSeconds),
            FaultLogInterval = TimeSpan.FromSeconds(options.FaultLogSeconds),
            StatusFile = options.StatusFile,
        };
        Edges.Logging.Log.WorkerIdentity(workerLogger, options.WorkerId, pipeline.Claims!.Folder, options.StableSeconds, options.StatusFile);
        using var runs = pipeline.NewRunRecorder("watch");
        var loop = new InboxLoop(options.Inbox, pipeline.Runner, pipeline.Recipes, settings, TimeProvider.System, workerLogger, runs);

        var builder = Host.CreateApplicationBuilder(new HostApplicationBuilderSettings { Args = [], ContentRootPath = AppContext.BaseDirectory });
        builder.Logging.ClearProviders();
        builder.Services.AddSerilog(log, dispose: false);
        builder.Services.AddSystemd();
        builder.Services.AddWindowsService(o => o.ServiceName = "StandFit");
        builder.Services.Configure<HostOptions>(o => o.ShutdownTimeout = ShutdownTimeout);
        builder.Services.AddSingleton(loop);
        builder.Services.AddHostedService<WatchService>();
        using var host = builder.Build();
        Environment.ExitCode = ExitCodes.Ok;
        await host.RunAsync().ConfigureAwait(false);
        return Environment.ExitCode;
    }
}
