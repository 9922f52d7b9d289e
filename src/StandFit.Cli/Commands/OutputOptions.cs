using System.Globalization;
using StandFit.Core.Problems;

namespace StandFit.Cli.Commands;

/// <summary>
/// The command-line reading shared by the commands that work on an output folder (<c>report</c>,
/// <c>compact</c>): <c>--help</c>, <c>--output FOLDER</c> (required), no positional argument, the
/// partition dates <c>--from</c>/<c>--to</c>, and the output folder's existence. Each step writes
/// its own message, prefixed with the command, and says the exit code.
/// </summary>
internal static class OutputOptions
{
    /// <summary>Parses the arguments; null with <paramref name="exit"/> set when the command is done (help printed, or a usage error).</summary>
    public static Arguments? Parse(string command, string usage, string[] args, IReadOnlyCollection<string> valued, IReadOnlyCollection<string> flags, TextWriter output, TextWriter error, out int exit)
    {
        exit = ExitCodes.Ok;
        var (parsed, problem) = Arguments.Parse(args, ["--output", .. valued], ["--help", .. flags]);
        if (parsed is not null && parsed.Has("--help"))
        {
            output.WriteLine(usage);
            return null;
        }

        if (parsed is null || parsed.Positional.Count > 0 || parsed.Value("--output") is null)
        {
            error.WriteLine($"standfit {command}: " + (problem ?? (parsed!.Positional.Count > 0 ? "unexpected argument " + parsed.Positional[0] : "--output OUTPUT_FOLDER is required")));
            error.WriteLine(usage);
            exit = ExitCodes.Usage;
            return null;
        }

        return parsed;
    }

    /// <summary>Reads <c>--from</c> and <c>--to</c> (UTC dates, YYYY-MM-DD, inclusive; absent is open); false, the problem written, on a bad or reversed date.</summary>
    public static bool TryDates(string command, Arguments parsed, TextWriter error, out DateOnly? from, out DateOnly? to)
    {
        from = null;
        to = null;
        foreach (var option in new[] { "--from", "--to" })
        {
            if (parsed.Value(option) is not { } text)
            {
                continue;
            }

            if (!DateOnly.TryParseExact(text, "yyyy-MM-dd", CultureInfo.InvariantCulture, DateTimeStyles.None, out var day))
            {
                error.WriteLine($"standfit {command}: " + Messages.ReportBadDate(option, text));
                return false;
            }

            if (option == "--from")
            {
                from = day;
            }
            else
            {
                to = day;
            }
        }

        if (from is { } f && to is { } t && f > t)
        {
            error.WriteLine($"standfit {command}: " + Messages.ReportDatesReversed(parsed.Value("--from")!, parsed.Value("--to")!));
            return false;
        }

        return true;
    }

    /// <summary>The full path of <c>--output</c> when the folder exists; null, the problem written, when it does not (exit <see cref="ExitCodes.Invalid"/>).</summary>
    public static string? ExistingFolder(string command, Arguments parsed, TextWriter error)
    {
        var folder = Path.GetFullPath(parsed.Value("--output")!);
        if (Directory.Exists(folder))
        {
            return folder;
        }

        error.WriteLine($"standfit {command}: " + Messages.ReportNoOutputFolder(folder));
        return null;
    }
}
