using System.Globalization;
using StandFit.Core.Problems;
using StandFit.Edges.Outputs;
using StandFit.Edges.Processing;

namespace StandFit.Cli.Commands;

/// <summary>Prints one line per published unit, and the totals, for a person watching a run.</summary>
internal sealed class RulingPrinter(TextWriter output, bool quiet)
{
    public void Print(SummaryRecord r)
    {
        if (quiet)
        {
            return;
        }

        var line = string.Create(CultureInfo.InvariantCulture, $"{r.Ruling.ToUpperInvariant(),-8} {PassFailLog.Escape(r.Serial),-20} {PassFailLog.Escape(r.Part),-8} {PassFailLog.Escape(r.SourceFile)}");
        output.WriteLine(line);
        if (r.Ruling != "pass")
        {
            // The reasons that made the ruling (not the checks that passed).
            var shown = 0;
            for (var i = 0; i < r.ReasonCodes.Count && shown < 3; i++)
            {
                if (ReasonCodes.Find(r.ReasonCodes[i])?.Kind == ReasonKind.Pass)
                {
                    continue;
                }

                output.WriteLine($"         {r.ReasonCodes[i]}: {Printable(r.Reasons[i])}");
                shown++;
            }
        }
    }

    /// <summary>A duplicate input: one line, no reasons (it was not judged again).</summary>
    public void PrintDuplicate(SummaryRecord r)
    {
        if (!quiet)
        {
            output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{"DUPLICATE",-8} {PassFailLog.Escape(r.Serial),-20} {PassFailLog.Escape(r.Part),-8} {PassFailLog.Escape(r.SourceFile)} (already judged: {r.UnitKey[..16]}...)"));
        }
    }

    public void PrintTotals(BatchCounts counts, TimeSpan elapsed, string outputFolder)
    {
        var rate = elapsed.TotalSeconds > 0 ? counts.Processed / elapsed.TotalSeconds : 0;
        output.WriteLine(string.Create(
            CultureInfo.InvariantCulture,
            $"{counts.Processed} units: {counts.Passed} pass, {counts.Failed} fail, {counts.Retest} retest, {counts.Rejected} rejected ({elapsed.TotalSeconds:F2} s, {rate:F0} units/s)"));
        if (counts.Duplicates > 0)
        {
            output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{counts.Duplicates} inputs were duplicates of units already judged: not judged again, no new row (see rejected/)."));
        }

        if (counts.Skipped > 0)
        {
            output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{counts.Skipped} inputs could not be read and were left for a later run."));
        }

        output.WriteLine("Outputs in " + outputFolder);
    }

    private static string Printable(string text) => new([.. text.Select(c => char.IsControl(c) ? '?' : c)]);
}
