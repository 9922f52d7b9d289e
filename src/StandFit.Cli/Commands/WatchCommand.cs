using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Logging;
using Serilog;
using Serilog.Events;
using StandFit.Edges.Folders;
using StandFit.Edges.Processing;
using StandFit.Edges.Worker;

namespace StandFit.Cli.Commands;

/// <summary><c>standfit watch</c>: the long-lived worker under Microsoft.Extensions.Hosting.</summary>
internal static class WatchCommand
{
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

        using var log = Edges.Logging.OperationsLog.Create(options.Logs, LogEventLevel.Information);
        var builder = Host.CreateApplicationBuilder(new HostApplicationBuilderSettings { Args = [], ContentRootPath = AppContext.BaseDirectory });
        builder.Logging.ClearProviders();
        builder.Services.AddSerilog(log, dispose: false);
        builder.Services.AddSystemd();
        builder.Services.AddWindowsService(o => o.ServiceName = "StandFit");
        builder.Services.Configure<HostOptions>(o => o.ShutdownTimeout = TimeSpan.FromSeconds(30));
        builder.Services.AddSingleton(TimeProvider.System);
        builder.Services.AddSingleton(sp =>
        {
            var loggers = sp.GetRequiredService<ILoggerFactory>();
            var pipeline = Pipeline.Build(options, loggers, DispositionMode.Move, TimeProvider.System);
            return new InboxLoop(options.Inbox, pipeline.Runner, TimeSpan.FromSeconds(options.PollSeconds), TimeProvider.System, loggers.CreateLogger("StandFit.Worker"));
        });
        builder.Services.AddHostedService<WatchService>();
        using var host = builder.Build();
        Environment.ExitCode = ExitCodes.Ok;
        await host.RunAsync().ConfigureAwait(false);
        return Environment.ExitCode;
    }
}
