using System.Globalization;
using StandFit.Core.Problems;
using StandFit.Core.Reporting;
using StandFit.Edges.Outputs;
using StandFit.Edges.Processing;
using StandFit.Edges.Reporting;

namespace StandFit.Cli.Commands;

/// <summary><c>standfit report</c>: the morning report, one self-contained HTML file, from the Parquet tables of an output folder.</summary>
internal static class ReportCommand
{
    public static async Task<int> ExecuteAsync(string[] args, TextWriter output, TextWriter error)
    {
        if (OutputOptions.Parse("report", Help.Report, args, ["--from", "--to", "--out"], [], output, error, out var exit) is not { } parsed)
        {
            return exit;
        }

        if (!OutputOptions.TryDates("report", parsed, error, out var from, out var to))
        {
            return ExitCodes.Usage;
        }

        if (OutputOptions.ExistingFolder("report", parsed, error) is not { } folder)
        {
            return ExitCodes.Invalid;
        }

        if (!Directory.Exists(Path.Combine(folder, "summaries")))
        {
            error.WriteLine("standfit report: " + Messages.ReportNoSummaries(folder));
            return ExitCodes.Invalid;
        }

        var target = Path.GetFullPath(parsed.Value("--out") ?? Path.Combine(folder, "reports", DefaultName(from, to)));
        var data = await ReportReader.ReadAsync(folder, from, to, DateTime.UtcNow, ToolInfo.Version).ConfigureAwait(false);
        foreach (var why in data.Unreadable)
        {
            error.WriteLine("standfit report: " + why);
        }

        var html = MorningReport.Render(data);
        try
        {
            Directory.CreateDirectory(Path.GetDirectoryName(target)!);
            AtomicFile.Replace(target, html);
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            error.WriteLine($"standfit report: the report cannot be written to {target} ({e.Message}).");
            return ExitCodes.OutputFault;
        }

        var counted = MorningReport.Counted(data.Rows);
        var bytes = new FileInfo(target).Length;
        output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"report: {target} ({counted.Length} units, {bytes / 1024.0:F0} KiB)"));
        return ExitCodes.Ok;
    }

    /// <summary><c>report-FROM-to-TO.html</c>, <c>report-DATE.html</c> for one day, <c>report.html</c> for every date.</summary>
    public static string DefaultName(DateOnly? from, DateOnly? to)
    {
        static string D(DateOnly d) => d.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture);
        return (from, to) switch
        {
            (null, null) => "report.html",
            ({ } f, { } t) when f == t => "report-" + D(f) + ".html",
            ({ } f, { } t) => "report-" + D(f) + "-to-" + D(t) + ".html",
            ({ } f, null) => "report-from-" + D(f) + ".html",
            (null, { } t) => "report-to-" + D(t) + ".html",
        };
    }
}
