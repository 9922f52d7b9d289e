using StandFit.Cli;
using StandFit.Cli.Commands;
using StandFit.Edges.Processing;

// standfit: one executable, one command per job. Every command writes results to stdout and
// problems to stderr, and returns an exit code from ExitCodes.
var output = Console.Out;
var error = Console.Error;
if (args.Length == 0 || args[0] is "--help" or "-h" or "help")
{
    output.WriteLine(Help.Main);
    return args.Length == 0 ? ExitCodes.Usage : ExitCodes.Ok;
}

var rest = args[1..];
return args[0] switch
{
    "--version" => PrintVersion(),
    "run" => await RunCommand.ExecuteAsync(rest, output, error),
    "watch" => await WatchCommand.ExecuteAsync(rest, output, error),
    "inspect" => InspectCommand.Execute(rest, output, error),
    "report" => await ReportCommand.ExecuteAsync(rest, output, error),
    "compact" => await CompactCommand.ExecuteAsync(rest, output, error),
    "recipes" when rest.Length > 0 && rest[0] == "check" => RecipesCheckCommand.Execute(rest[1..], output, error),
    "recipes" when rest.Length > 0 && rest[0] == "explain" => RecipesCommand.Explain(rest[1..], output, error),
    "recipes" when rest.Length > 0 && rest[0] == "schema" => RecipesCommand.Schema(rest[1..], output, error),
    "recipes" => Usage("standfit recipes: the subcommands are check, explain and schema", Help.RecipesCheck),
    _ => Usage($"standfit: unknown command '{args[0]}'", Help.Main),
};

int PrintVersion()
{
    output.WriteLine("standfit " + ToolInfo.Version);
    return ExitCodes.Ok;
}

int Usage(string message, string help)
{
    error.WriteLine(message);
    error.WriteLine(help);
    return ExitCodes.Usage;
}
