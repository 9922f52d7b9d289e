using System.Collections.Immutable;
using System.Globalization;
using System.Text.Json.Serialization;
using Parquet.Serialization;
using Parquet.Serialization.Attributes;
using StandFit.Core.Judging;
using StandFit.Core.Problems;
using StandFit.Core.Reporting;
using StandFit.Edges.Outputs;

namespace StandFit.Edges.Reporting;

/// <summary>
/// Reads what the morning report needs from an output folder with Parquet.Net alone (no query
/// engine at run time): the summary rows of the partitions <c>date=YYYY-MM-DD</c> in the range,
/// the points of the units the report draws in detail, and the runs that started in the range.
/// Each table is read through a class that names only the columns the report uses, so files of
/// other schema versions (columns added since) read the same. Failure policy: a file that cannot be
/// read is named in the report (and left out of its figures); a missing table is an empty one.
/// </summary>
public static class ReportReader
{
    /// <summary>Reads the report's data; <paramref name="from"/> and <paramref name="to"/> are inclusive partition dates (null: open).</summary>
    public static async Task<ReportData> ReadAsync(string outputFolder, DateOnly? from, DateOnly? to, DateTime generatedAtUtc, string toolVersion, CancellationToken cancellationToken = default)
    {
        var unreadable = ImmutableArray.CreateBuilder<string>();
        var rows = new List<ReportedUnit>();
        var fileOf = new Dictionary<string, string>(StringComparer.Ordinal);
        var summaries = Path.Combine(outputFolder, "summaries");
        foreach (var partition in PartitionFolders(summaries, from, to))
        {
            foreach (var (file, read) in await ReadFolderAsync<SummaryRow>(partition, outputFolder, unreadable, cancellationToken).ConfigureAwait(false))
            {
                var relative = Path.GetRelativePath(summaries, file);
                foreach (var row in read)
                {
                    rows.Add(ToUnit(row));
                    fileOf[row.UnitKey] = relative;
                }
            }
        }

        // The points of the units the report draws. A batch's points file has its summary file's
        // name and partition, so only those files are read; a unit not found there (files merged or
        // renamed by hand) but fitted (it has a residual SD) is looked for in the other point files of
        // its partition.
        var detailed = MorningReport.Detailed(rows);
        var drawn = detailed.Select(u => u.UnitKey).ToHashSet(StringComparer.Ordinal);
        var points = new Dictionary<string, List<ReportedPoint>>(StringComparer.Ordinal);
        var pointsFolder = Path.Combine(outputFolder, "points");
        var seen = new HashSet<string>(StringComparer.Ordinal);
        foreach (var relative in drawn.Select(k => fileOf[k]).Distinct(StringComparer.Ordinal).Order(StringComparer.Ordinal))
        {
            var file = Path.Combine(pointsFolder, relative);
            if (File.Exists(file) && seen.Add(file))
            {
                try
                {
                    AddPoints(await TryReadAsync<PointRow>(file, outputFolder, unreadable, cancellationToken).ConfigureAwait(false), drawn, points);
                }
                catch (Exception e) when (e is FileNotFoundException or DirectoryNotFoundException)
                {
                    // Merged away by a compaction since the summaries were read: its units are looked for in their partition below.
                }
            }
        }

        var missing = detailed.Where(u => u.ResidualSd is not null && !points.ContainsKey(u.UnitKey)).Select(u => Path.GetDirectoryName(fileOf[u.UnitKey]) ?? "");
        foreach (var partition in missing.Distinct(StringComparer.Ordinal).Order(StringComparer.Ordinal))
        {
            var folder = Path.Combine(pointsFolder, partition);
            if (!Directory.Exists(folder))
            {
                continue;
            }

            foreach (var (file, read) in await ReadFolderAsync<PointRow>(folder, outputFolder, unreadable, cancellationToken).ConfigureAwait(false))
            {
                if (seen.Add(file))
                {
                    AddPoints(read, drawn, points);
                }
            }
        }

        var runs = new List<ReportedRun>();
        var runsFolder = Path.Combine(outputFolder, "runs");
        if (Directory.Exists(runsFolder))
        {
            foreach (var (_, read) in await ReadFolderAsync<RunRecord>(runsFolder, outputFolder, unreadable, cancellationToken).ConfigureAwait(false))
            {
                foreach (var r in read)
                {
                    var day = DateOnly.FromDateTime(r.StartedAt.ToUniversalTime());
                    if ((from is null || day >= from) && (to is null || day <= to))
                    {
                        runs.Add(new ReportedRun(r.RunId, r.Command, r.WorkerId, r.State, Utc(r.StartedAt), Utc(r.EndedAt), r.ToolVersion, r.ConfigHash, r.Processed, r.Pass, r.Fail, r.Retest, r.Rejected, r.Duplicate));
                    }
                }
            }
        }

        return new ReportData
        {
            From = from,
            To = to,
            GeneratedAt = generatedAtUtc,
            ToolVersion = toolVersion,
            Rows = [.. rows],
            Points = points.ToImmutableDictionary(p => p.Key, p => p.Value.OrderBy(x => x.Point).ToImmutableArray(), StringComparer.Ordinal),
            Runs = [.. runs],
            Unreadable = unreadable.ToImmutable(),
        };
    }

    /// <summary>The partition folders (<c>date=YYYY-MM-DD</c>) of a partitioned table within the range, in date order.</summary>
    public static IReadOnlyList<string> PartitionFolders(string tableFolder, DateOnly? from, DateOnly? to)
    {
        if (!Directory.Exists(tableFolder))
        {
            return [];
        }

        return Directory.EnumerateDirectories(tableFolder, "date=*")
            .Select(d => (Folder: d, Ok: DateOnly.TryParseExact(Path.GetFileName(d)["date=".Length..], "yyyy-MM-dd", CultureInfo.InvariantCulture, DateTimeStyles.None, out var day), Day: day))
            .Where(d => d.Ok && (from is null || d.Day >= from) && (to is null || d.Day <= to))
            .OrderBy(d => d.Day)
            .Select(d => d.Folder)
            .ToList();
    }

    /// <summary>
    /// Reads every published file of one folder as one listing: when a file of the listing is gone
    /// before it is opened (a compaction swapped the folder, or deleted the inputs of a merged file,
    /// in between), the rows read so far are dropped and the folder is listed and read again, so the
    /// rows always come from one state of the folder. Gives up after a few tries, naming the folder.
    /// </summary>
    private static async Task<List<(string File, IList<T> Rows)>> ReadFolderAsync<T>(string folder, string outputFolder, ImmutableArray<string>.Builder unreadable, CancellationToken cancellationToken)
        where T : class, new()
    {
        const int Tries = 5;
        for (var attempt = 1; ; attempt++)
        {
            var problems = ImmutableArray.CreateBuilder<string>();
            var read = new List<(string, IList<T>)>();
            try
            {
                foreach (var file in Published(folder))
                {
                    read.Add((file, await TryReadAsync<T>(file, outputFolder, problems, cancellationToken).ConfigureAwait(false)));
                }

                unreadable.AddRange(problems);
                return read;
            }
            catch (Exception e) when ((e is FileNotFoundException or DirectoryNotFoundException) && attempt < Tries)
            {
                // Listed, then gone: read the folder again from a new listing.
            }
            catch (Exception e) when (e is FileNotFoundException or DirectoryNotFoundException)
            {
                unreadable.Add(Messages.ReportFileUnreadable(Path.GetRelativePath(outputFolder, folder).Replace('\\', '/'), e.Message));
                return [];
            }
        }
    }

    /// <summary>
    /// The published Parquet files of one folder, in name order: never a hidden temporary file, and
    /// never a file a compaction has merged into a published file (the reader's rule of
    /// <see cref="CompactionManifest.Superseded"/>), so a compaction in progress shows no row twice.
    /// </summary>
    public static IEnumerable<string> Published(string folder)
    {
        // List first, then judge by the manifests: a merged file in the listing has its manifest on disk already.
        var listed = Directory.EnumerateFiles(folder, "*.parquet").Select(f => Path.GetFileName(f)).Where(n => !n.StartsWith('.')).ToHashSet(StringComparer.Ordinal);
        var superseded = CompactionManifest.Superseded(folder, listed);
        return listed.Where(n => !superseded.Contains(n)).Order(StringComparer.Ordinal).Select(n => Path.Combine(folder, n)).ToList();
    }

    private static void AddPoints(IList<PointRow> read, HashSet<string> wanted, Dictionary<string, List<ReportedPoint>> points)
    {
        foreach (var p in read)
        {
            if (!wanted.Contains(p.UnitKey))
            {
                continue;
            }

            if (!points.TryGetValue(p.UnitKey, out var list))
            {
                points[p.UnitKey] = list = [];
            }

            list.Add(new ReportedPoint(p.Point, p.SourceLine, p.Leg, p.Stimulus, p.FurtherInputs.Count > 0, p.Response, p.Fitted, p.Residual, p.BandLow, p.BandHigh, p.StudentizedResidual));
        }
    }

    /// <summary>A file's rows; an unreadable file is named in <paramref name="unreadable"/> and gives none. A file that is gone throws (<see cref="FileNotFoundException"/>), for the caller to list again.</summary>
    private static async Task<IList<T>> TryReadAsync<T>(string file, string outputFolder, ImmutableArray<string>.Builder unreadable, CancellationToken cancellationToken)
        where T : class, new()
    {
        try
        {
            await using var stream = new FileStream(file, FileMode.Open, FileAccess.Read, FileShare.ReadWrite | FileShare.Delete, 64 * 1024, FileOptions.Asynchronous | FileOptions.SequentialScan);
            var result = await ParquetSerializer.DeserializeAsync<T>(stream, cancellationToken: cancellationToken).ConfigureAwait(false);
            return result.Data;
        }
        catch (Exception e) when (e is not (FileNotFoundException or DirectoryNotFoundException) && e is IOException or UnauthorizedAccessException or InvalidDataException or NotSupportedException or InvalidOperationException or ArgumentException or FormatException)
        {
            unreadable.Add(Messages.ReportFileUnreadable(Path.GetRelativePath(outputFolder, file).Replace('\\', '/'), e.Message));
            return [];
        }
    }

    private static ReportedUnit ToUnit(SummaryRow r)
    {
        var gain = r.Parameters.FirstOrDefault(p => p.Name == "gain");
        var offset = r.Parameters.FirstOrDefault(p => p.Name == "offset");
        return new ReportedUnit
        {
            UnitKey = r.UnitKey,
            RetestOf = r.RetestOf,
            Serial = r.Serial,
            Part = r.Part,
            Station = r.Station,
            TestStart = r.TestStart is { } t ? Utc(t) : null,
            ProcessedAt = Utc(r.ProcessedAt),
            SourceFile = r.SourceFile,
            RecipeName = r.RecipeName,
            RecipeVersion = r.RecipeVersion,
            Model = r.Model,
            Confidence = r.Confidence,
            Points = r.Points,
            Ruling = r.Ruling switch { "pass" => Ruling.Pass, "fail" => Ruling.Fail, "retest" => Ruling.Retest, _ => Ruling.Rejected },
            ReasonCodes = [.. r.ReasonCodes],
            Reasons = [.. r.Reasons],
            Limits = [.. r.LimitResults.Select(l => new ReportedLimit(l.Figure, l.Value, l.Low, l.High, l.Min, l.Max, l.Rule, l.Zone, l.Interval))],
            Gain = r.GainEstimate,
            GainCiLow = r.GainCiLow,
            GainCiHigh = r.GainCiHigh,
            GainUnit = gain?.Unit ?? "",
            Offset = r.OffsetEstimate,
            OffsetCiLow = r.OffsetCiLow,
            OffsetCiHigh = r.OffsetCiHigh,
            OffsetUnit = offset?.Unit ?? "",
            ResidualSd = r.ResidualSd,
            RSquared = r.RSquared,
            HistogramEdges = [.. r.HistogramEdges],
            HistogramCounts = [.. r.HistogramCounts],
        };
    }

    private static DateTime Utc(DateTime value) => value.Kind switch
    {
        DateTimeKind.Utc => value,
        DateTimeKind.Local => value.ToUniversalTime(),
        _ => DateTime.SpecifyKind(value, DateTimeKind.Utc),
    };

    /// <summary>The summary columns the report reads (names and types as <see cref="SummaryRecord"/> writes them).</summary>
    internal sealed class SummaryRow
    {
        [JsonPropertyName("unit_key")]
        [ParquetRequired]
        public string UnitKey { get; set; } = "";

        [JsonPropertyName("retest_of")]
        public string? RetestOf { get; set; }

        [JsonPropertyName("serial")]
        public string? Serial { get; set; }

        [JsonPropertyName("part")]
        public string? Part { get; set; }

        [JsonPropertyName("station")]
        public string? Station { get; set; }

        [JsonPropertyName("test_start")]
        [ParquetTimestamp(ParquetTimestampResolution.Milliseconds, useLogicalTimestamp: true, isAdjustedToUTC: true)]
        public DateTime? TestStart { get; set; }

        [JsonPropertyName("source_file")]
        [ParquetRequired]
        public string SourceFile { get; set; } = "";

        [JsonPropertyName("recipe_name")]
        public string? RecipeName { get; set; }

        [JsonPropertyName("recipe_version")]
        public string? RecipeVersion { get; set; }

        [JsonPropertyName("model")]
        public string? Model { get; set; }

        [JsonPropertyName("confidence")]
        public double? Confidence { get; set; }

        [JsonPropertyName("n_points")]
        public int? Points { get; set; }

        [JsonPropertyName("parameters")]
        public List<ParameterRecord> Parameters { get; set; } = [];

        [JsonPropertyName("offset_estimate")]
        public double? OffsetEstimate { get; set; }

        [JsonPropertyName("offset_ci_low")]
        public double? OffsetCiLow { get; set; }

        [JsonPropertyName("offset_ci_high")]
        public double? OffsetCiHigh { get; set; }

        [JsonPropertyName("gain_estimate")]
        public double? GainEstimate { get; set; }

        [JsonPropertyName("gain_ci_low")]
        public double? GainCiLow { get; set; }

        [JsonPropertyName("gain_ci_high")]
        public double? GainCiHigh { get; set; }

        [JsonPropertyName("residual_sd")]
        public double? ResidualSd { get; set; }

        [JsonPropertyName("r_squared")]
        public double? RSquared { get; set; }

        [JsonPropertyName("histogram_edges")]
        public List<double> HistogramEdges { get; set; } = [];

        [JsonPropertyName("histogram_counts")]
        public List<int> HistogramCounts { get; set; } = [];

        [JsonPropertyName("ruling")]
        [ParquetRequired]
        public string Ruling { get; set; } = "";

        [JsonPropertyName("reason_codes")]
        public List<string> ReasonCodes { get; set; } = [];

        [JsonPropertyName("reasons")]
        public List<string> Reasons { get; set; } = [];

        [JsonPropertyName("limit_results")]
        public List<LimitResultRecord> LimitResults { get; set; } = [];

        [JsonPropertyName("processed_at")]
        [ParquetTimestamp(ParquetTimestampResolution.Milliseconds, useLogicalTimestamp: true, isAdjustedToUTC: true)]
        public DateTime ProcessedAt { get; set; }
    }

    /// <summary>The point columns the report reads (names and types as <see cref="PointRecord"/> writes them).</summary>
    internal sealed class PointRow
    {
        [JsonPropertyName("unit_key")]
        [ParquetRequired]
        public string UnitKey { get; set; } = "";

        [JsonPropertyName("point")]
        public int Point { get; set; }

        [JsonPropertyName("source_line")]
        public int SourceLine { get; set; }

        [JsonPropertyName("leg")]
        public string? Leg { get; set; }

        [JsonPropertyName("stimulus")]
        public double Stimulus { get; set; }

        [JsonPropertyName("further_inputs")]
        public List<double> FurtherInputs { get; set; } = [];

        [JsonPropertyName("response")]
        public double Response { get; set; }

        [JsonPropertyName("fitted")]
        public double Fitted { get; set; }

        [JsonPropertyName("residual")]
        public double Residual { get; set; }

        [JsonPropertyName("band_low")]
        public double BandLow { get; set; }

        [JsonPropertyName("band_high")]
        public double BandHigh { get; set; }

        [JsonPropertyName("studentized_residual")]
        public double? StudentizedResidual { get; set; }
    }
}
