using System.Text.Json.Serialization;
using Parquet.Serialization;
using Parquet.Serialization.Attributes;
using StandFit.Edges.Reporting;
using StandFit.Tests.Support;

namespace StandFit.Tests.Reporting;

/// <summary>The report reads the tables with Parquet.Net alone: files of another schema version, the date range, and files it cannot read.</summary>
public sealed class ReportReaderTests
{
    private static readonly DateTime At = new(2026, 12, 2, 6, 0, 0, DateTimeKind.Utc);

    [Fact]
    public async Task A_summary_file_of_an_older_schema_with_fewer_columns_reads_with_what_it_has()
    {
        using var root = new TempFolder();
        var folder = root.Sub("output", "summaries", "date=2026-12-01");
        await using (var stream = File.Create(Path.Combine(folder, "old-00001.parquet")))
        {
            await ParquetSerializer.SerializeAsync([new OldRow { UnitKey = "a:b", Serial = "S1", Ruling = "pass", SourceFile = "s1.csv", ProcessedAt = At }], stream);
        }

        var data = await ReportReader.ReadAsync(root.Sub("output"), null, null, At, "t");

        Assert.Empty(data.Unreadable);
        var unit = Assert.Single(data.Rows);
        Assert.Equal("S1", unit.Serial);
        Assert.Equal(Core.Judging.Ruling.Pass, unit.Ruling);
        Assert.Null(unit.Gain);
        Assert.Empty(unit.HistogramEdges);
    }

    [Fact]
    public async Task Only_the_partitions_in_the_date_range_are_read_and_hidden_temporary_files_never()
    {
        using var root = new TempFolder();
        var output = root.Sub("output");
        foreach (var day in new[] { "2026-11-30", "2026-12-01", "2026-12-02" })
        {
            var folder = root.Sub("output", "summaries", "date=" + day);
            await using var stream = File.Create(Path.Combine(folder, "f.parquet"));
            await ParquetSerializer.SerializeAsync([new OldRow { UnitKey = day, Serial = day, Ruling = "fail", SourceFile = day + ".csv", ProcessedAt = At }], stream);
        }

        File.WriteAllText(Path.Combine(output, "summaries", "date=2026-12-01", ".w~run-x-00002.parquet.tmp"), "half-written");

        var data = await ReportReader.ReadAsync(output, new DateOnly(2026, 12, 1), new DateOnly(2026, 12, 2), At, "t");

        Assert.Equal(["2026-12-01", "2026-12-02"], data.Rows.Select(r => r.UnitKey).Order(StringComparer.Ordinal));
        Assert.Empty(data.Unreadable);
    }

    [Fact]
    public async Task A_damaged_file_is_named_in_the_report_and_the_rest_is_read()
    {
        using var root = new TempFolder();
        var output = root.Sub("output");
        var folder = root.Sub("output", "summaries", "date=2026-12-01");
        await using (var stream = File.Create(Path.Combine(folder, "good.parquet")))
        {
            await ParquetSerializer.SerializeAsync([new OldRow { UnitKey = "a", Serial = "S1", Ruling = "pass", SourceFile = "s1.csv", ProcessedAt = At }], stream);
        }

        File.WriteAllBytes(Path.Combine(folder, "cut.parquet"), [0x50, 0x41, 0x52, 0x31, 1, 2, 3]);

        var data = await ReportReader.ReadAsync(output, null, null, At, "t");

        Assert.Single(data.Rows);
        var why = Assert.Single(data.Unreadable);
        Assert.StartsWith("summaries/date=2026-12-01/cut.parquet cannot be read", why, StringComparison.Ordinal);
        Assert.Contains("cut.parquet", Core.Reporting.MorningReport.Render(data), StringComparison.Ordinal);
    }

    [Fact]
    public async Task The_points_of_drawn_units_are_read_from_their_summary_files_twin_and_found_elsewhere_in_the_partition_when_it_was_renamed()
    {
        using var root = new TempFolder();
        var output = root.Sub("output");
        await SyntheticOutput.WriteAsync(output, 300, seed: 7, batchSize: 100);
        var first = await ReportReader.ReadAsync(output, null, null, At, "t");
        var drawn = Core.Reporting.MorningReport.Detailed(first.Rows).Where(u => u.ResidualSd is not null).Select(u => u.UnitKey).Order(StringComparer.Ordinal).ToList();
        Assert.NotEmpty(drawn);
        Assert.Equal(drawn, first.Points.Keys.Order(StringComparer.Ordinal));
        Assert.All(first.Points.Values, p => Assert.Equal(Enumerable.Range(1, 21), p.Select(x => x.Point)));

        var folder = Directory.EnumerateDirectories(Path.Combine(output, "points")).Single();
        foreach (var (file, i) in Directory.EnumerateFiles(folder).Order(StringComparer.Ordinal).Select((f, i) => (f, i)))
        {
            File.Move(file, Path.Combine(folder, "merged-" + i.ToString(System.Globalization.CultureInfo.InvariantCulture) + ".parquet"));
        }

        var second = await ReportReader.ReadAsync(output, null, null, At, "t");

        Assert.Equal(drawn, second.Points.Keys.Order(StringComparer.Ordinal));
        Assert.Empty(second.Unreadable);
    }

    /// <summary>A summary row as a tool of an early schema might have written it: a few columns only.</summary>
    private sealed class OldRow
    {
        [JsonPropertyName("unit_key")]
        [ParquetRequired]
        public string UnitKey { get; set; } = "";

        [JsonPropertyName("serial")]
        public string? Serial { get; set; }

        [JsonPropertyName("source_file")]
        [ParquetRequired]
        public string SourceFile { get; set; } = "";

        [JsonPropertyName("ruling")]
        [ParquetRequired]
        public string Ruling { get; set; } = "";

        [JsonPropertyName("processed_at")]
        [ParquetTimestamp(ParquetTimestampResolution.Milliseconds, useLogicalTimestamp: true, isAdjustedToUTC: true)]
        public DateTime ProcessedAt { get; set; }
    }
}
