using StandFit.Core.Reporting;
using StandFit.Edges.Reporting;
using StandFit.Tests.Support;

namespace StandFit.Tests.Reporting;

/// <summary>
/// The report of a big day stays small enough to mail and open: 10,000 generated units (about 1,000
/// failed or retest) give a page of at most 5 MB. bench/report.sh keeps this page (through
/// STANDFIT_REPORT_BENCH_FILE) and times it in headless Chromium; no time is asserted here.
/// </summary>
public sealed class LargeReportTests
{
    private const int Units = 10_000;
    private const long MaxBytes = 5L * 1024 * 1024;

    [Fact]
    public async Task The_report_of_ten_thousand_units_is_at_most_five_megabytes()
    {
        using var root = new TempFolder();
        var output = root.Sub("output");
        await SyntheticOutput.WriteAsync(output, Units, seed: 20261201);

        var data = await ReportReader.ReadAsync(output, null, null, new DateTime(2026, 12, 2, 6, 30, 0, DateTimeKind.Utc), "0.1.0-test");
        var html = MorningReport.Render(data);
        var bytes = System.Text.Encoding.UTF8.GetByteCount(html);

        Assert.Empty(data.Unreadable);
        Assert.Equal(Units, data.Rows.Length);
        var failing = MorningReport.FailedOrRetest(MorningReport.Counted(data.Rows)).Length;
        Assert.True(failing > MorningReport.MaxDetailedUnits, $"only {failing} failed or retest units: the detail limit is not exercised");
        Assert.Equal(MorningReport.MaxDetailedUnits, data.Points.Count);
        Assert.True(bytes <= MaxBytes, $"the report of {Units} units has {bytes} bytes, over {MaxBytes}");

        if (Environment.GetEnvironmentVariable("STANDFIT_REPORT_BENCH_FILE") is { Length: > 0 } keep)
        {
            await File.WriteAllTextAsync(keep, html);
        }
    }
}
