using System.Globalization;
using StandFit.Core.Problems;
using StandFit.Edges.Outputs;

namespace StandFit.Cli.Commands;

/// <summary><c>standfit compact</c>: merges each partition's small Parquet files into one (see <see cref="PartitionCompactor"/>).</summary>
internal static class CompactCommand
{
    public static async Task<int> ExecuteAsync(string[] args, TextWriter output, TextWriter error)
    {
        if (OutputOptions.Parse("compact", Help.Compact, args, ["--table", "--from", "--to", "--min-age"], ["--dry-run"], output, error, out var exit) is not { } parsed)
        {
            return exit;
        }

        CompactTable[] tables;
        switch (parsed.Value("--table") ?? "all")
        {
            case "all": tables = [CompactTable.Summaries, CompactTable.Points, CompactTable.Runs]; break;
            case "summaries": tables = [CompactTable.Summaries]; break;
            case "points": tables = [CompactTable.Points]; break;
            case "runs": tables = [CompactTable.Runs]; break;
            case var other:
                error.WriteLine("standfit compact: " + Messages.CompactBadTable(other));
                return ExitCodes.Usage;
        }

        if (!OutputOptions.TryDates("compact", parsed, error, out var from, out var to))
        {
            return ExitCodes.Usage;
        }

        var minAge = 10.0;
        if (parsed.Value("--min-age") is { } ageText
            && !(double.TryParse(ageText, NumberStyles.Float, CultureInfo.InvariantCulture, out minAge) && minAge is >= 0 and <= 10080))
        {
            error.WriteLine("standfit compact: " + Messages.CompactBadMinAge(ageText));
            return ExitCodes.Usage;
        }

        if (OutputOptions.ExistingFolder("compact", parsed, error) is not { } folder)
        {
            return ExitCodes.Invalid;
        }

        if (!tables.Any(table => Directory.Exists(Path.Combine(folder, PartitionCompactor.TableFolderName(table)))))
        {
            error.WriteLine("standfit compact: " + Messages.CompactNoTable(folder));
            return ExitCodes.Invalid;
        }

        var dryRun = parsed.Has("--dry-run");
        var compactor = new PartitionCompactor(folder, TimeProvider.System) { MinimumAge = TimeSpan.FromMinutes(minAge), DryRun = dryRun };
        var locks = new List<IDisposable>();
        try
        {
            foreach (var table in tables.Where(table => Directory.Exists(Path.Combine(folder, PartitionCompactor.TableFolderName(table)))))
            {
                locks.Add(compactor.Lock(table));
            }

            // The summaries and points of one date get one id, so that their merged files share a name as the batches' files do.
            var ids = new Dictionary<string, string>(StringComparer.Ordinal);
            var merged = 0;
            foreach (var table in tables)
            {
                foreach (var partition in compactor.Folders(table, from, to))
                {
                    var key = Path.GetFileName(partition);
                    if (!ids.TryGetValue(key, out var id))
                    {
                        ids[key] = id = compactor.NewId();
                    }

                    var result = await compactor.CompactAsync(table, partition, id).ConfigureAwait(false);
                    Print(output, folder, result, dryRun);
                    merged += result.Merged is null ? 0 : 1;
                }

                // Old folders of earlier swaps, past their grace (also of partitions outside --from/--to).
                compactor.SweepRetired(table);
            }

            output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"compact: {merged} folder(s) {(dryRun ? "would be merged (dry run, nothing changed)" : "merged")}"));
            return ExitCodes.Ok;
        }
        catch (CompactBusyException e)
        {
            error.WriteLine("standfit compact: " + e.Message);
            return ExitCodes.Configuration;
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException or InvalidDataException)
        {
            error.WriteLine($"standfit compact: stopped ({e.Message}); the folders are left in a state the next compact (and every reader) resolves.");
            return ExitCodes.OutputFault;
        }
        finally
        {
            foreach (var held in locks)
            {
                held.Dispose();
            }
        }
    }

    private static void Print(TextWriter output, string root, CompactionResult r, bool dryRun)
    {
        var where = Path.GetRelativePath(root, r.Folder).Replace('\\', '/');
        if (r.Merged is null)
        {
            output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{where}: nothing to merge{(r.Resolved > 0 ? $" ({r.Resolved} leftovers of a killed compaction resolved)" : "")}"));
        }
        else if (dryRun)
        {
            output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{where}: would merge {r.Inputs.Count} files ({r.BytesBefore / 1024.0:F0} KiB) into {r.Merged}"));
        }
        else
        {
            var how = r.Protocol == CompactProtocol.Swap
                ? "folder swapped in one step"
                : "renamed in, then the inputs deleted: readers must follow the reader rule" + (r.SwapRefused is { } why ? $"; no swap: {why}" : "");
            output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{where}: merged {r.Inputs.Count} files ({r.BytesBefore / 1024.0:F0} KiB) into {r.Merged} ({r.Rows} rows, {r.RowGroups} row group(s), {r.BytesAfter / 1024.0:F0} KiB; {how})"));
        }

        foreach (var skipped in r.Skipped)
        {
            output.WriteLine("  left as it is: " + skipped);
        }
    }
}
