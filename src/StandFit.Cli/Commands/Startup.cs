using StandFit.Core.Problems;
using StandFit.Edges.Configuration;

namespace StandFit.Cli.Commands;

/// <summary>Loads and validates the configuration; every problem is printed together.</summary>
internal static class Startup
{
    public const string DefaultConfig = "config/standfit.yaml";

    public static StandFitOptions? LoadOptions(string? path, TextWriter error, bool needInbox, bool prepareFolders = true)
    {
        var loaded = ConfigLoader.Load(path ?? DefaultConfig);
        if (!loaded.IsSuccess)
        {
            Print(error, "configuration", loaded.Problems);
            return null;
        }

        if (prepareFolders)
        {
            var problems = ConfigLoader.PrepareFolders(loaded.Value, needInbox);
            if (!problems.IsEmpty)
            {
                Print(error, "configuration", problems);
                return null;
            }
        }

        return loaded.Value;
    }

    public static void Print(TextWriter error, string what, IEnumerable<Problem> problems)
    {
        error.WriteLine($"standfit: the {what} has problems; nothing was processed:");
        foreach (var p in problems)
        {
            error.WriteLine("  " + p);
        }
    }
}
