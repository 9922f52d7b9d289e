using System.Globalization;
using System.Security.Cryptography;
using System.Text.RegularExpressions;
using StandFit.Tests.Reporting;
using StandFit.Tests.Support;

namespace StandFit.Tests.EndToEnd;

/// <summary>
/// The tables plant reporting reads and the morning report, end to end: the demo judged by
/// `standfit run` as a separate process (read in place), its points, summary and runs tables read
/// back with DuckDB, then `standfit report` as a separate process, its page read as XML and, in
/// headless Chromium, as a browser renders it.
/// </summary>
public sealed partial class ReportingTests(ReportingTests.DemoReport demo) : IClassFixture<ReportingTests.DemoReport>
{
    private static readonly TimeSpan Timeout = TimeSpan.FromMinutes(3);

    private string Summaries => Duck.Literal(Path.Combine(demo.Output, "summaries", "**", "*.parquet"));

    private string Points => Duck.Literal(Path.Combine(demo.Output, "points", "**", "*.parquet"));

    private static long Long(object? value) => Convert.ToInt64(value, CultureInfo.InvariantCulture);

    [Fact]
    public void Every_fitted_unit_has_one_point_row_per_sweep_point_and_no_other_unit_has_any()
    {
        // Joined on unit_key: a unit has points exactly when it was fitted (df is set), as many as its n_points.
        var rows = Duck.Query($"""
            SELECT s.unit_key, s.ruling, s.df, s.n_points, count(p.point) AS points, count(DISTINCT p.point) AS distinct_points,
                   min(p.point) AS first, max(p.point) AS last
            FROM read_parquet({Summaries}) s
            LEFT JOIN read_parquet({Points}) p USING (unit_key)
            GROUP BY ALL
            """);
        Assert.Equal(DemoSet.Expected.Count, rows.Count);
        var fitted = rows.Where(r => r["df"] is not null).ToList();
        Assert.True(fitted.Count >= DemoSet.Expected.Count(e => e.Ruling is "pass" or "fail"), "fewer fitted units than passes and fails");
        Assert.All(fitted, r => Assert.Equal(Long(r["n_points"]), Long(r["points"])));
        Assert.All(fitted, r => Assert.Equal(Long(r["points"]), Long(r["distinct_points"])));
        Assert.All(fitted, r => Assert.Equal(1L, Long(r["first"])));
        Assert.All(fitted, r => Assert.Equal(Long(r["n_points"]), Long(r["last"])));
        Assert.All(rows.Where(r => r["df"] is null), r => Assert.Equal(0L, Long(r["points"])));

        // Nothing in the points table belongs to no summary row.
        var orphans = Duck.Query($"SELECT count(*) AS n FROM read_parquet({Points}) p ANTI JOIN read_parquet({Summaries}) s USING (unit_key)")[0]["n"];
        Assert.Equal(0L, Long(orphans));
    }

    [Fact]
    public void The_points_agree_with_their_summary_row_on_the_fit_the_residual_sd_and_the_outlier()
    {
        var rows = Duck.Query($"""
            SELECT s.unit_key, s.residual_sd, s.df, s.max_abs_rstudent, s.outlier_point, s.outlier_line,
                   sqrt(sum(p.residual * p.residual) / s.df) AS sd_from_points,
                   max(abs(p.response - p.fitted - p.residual)) AS worst_identity,
                   max(abs(p.studentized_residual)) AS max_rstudent,
                   arg_max(p.point, abs(p.studentized_residual)) AS at_point,
                   arg_max(p.source_line, abs(p.studentized_residual)) AS at_line,
                   bool_and(p.band_low <= p.fitted AND p.fitted <= p.band_high) AS band_holds_curve
            FROM read_parquet({Summaries}) s
            JOIN read_parquet({Points}) p USING (unit_key)
            WHERE NOT s.weighted
            GROUP BY s.unit_key, s.residual_sd, s.df, s.max_abs_rstudent, s.outlier_point, s.outlier_line
            """);
        Assert.NotEmpty(rows);
        foreach (var r in rows)
        {
            var key = (string)r["unit_key"]!;
            Assert.True(Math.Abs((double)r["sd_from_points"]! - (double)r["residual_sd"]!) <= 1e-9 * (double)r["residual_sd"]!, $"{key}: residual SD {r["residual_sd"]} from the summary, {r["sd_from_points"]} from the points");
            Assert.True((double)r["worst_identity"]! < 1e-9, $"{key}: response − fitted differs from the residual by {r["worst_identity"]}");
            Assert.True((bool)r["band_holds_curve"]!, $"{key}: a band does not hold its fitted value");
            Assert.Equal((double)r["max_abs_rstudent"]!, (double)r["max_rstudent"]!, 12);
            Assert.Equal(Long(r["outlier_point"]), Long(r["at_point"]));
            Assert.Equal(Long(r["outlier_line"]), Long(r["at_line"]));
        }
    }

    [Fact]
    public void Point_files_have_the_names_and_partitions_of_their_batchs_summary_files()
    {
        var summaries = Relative("summaries");
        var points = Relative("points");

        Assert.NotEmpty(points);
        Assert.All(points, p => Assert.Contains(p, summaries));
        var partitions = Duck.Query($"""
            SELECT count(*) AS n FROM read_parquet({Points}, hive_partitioning = true) p
            JOIN (SELECT DISTINCT unit_key, date FROM read_parquet({Summaries}, hive_partitioning = true)) s USING (unit_key)
            WHERE p.date <> s.date
            """)[0]["n"];
        Assert.Equal(0L, Long(partitions));
    }

    [Fact]
    public void The_run_writes_one_runs_row_with_its_counts_version_and_configuration_hash()
    {
        var runs = Directory.EnumerateFiles(Path.Combine(demo.Output, "runs"), "*.parquet").ToList();
        var row = Assert.Single(Duck.Query($"SELECT * FROM read_parquet({Duck.Literal(Path.Combine(demo.Output, "runs", "*.parquet"))})"));

        Assert.Single(runs);
        Assert.Equal(Path.GetFileNameWithoutExtension(runs[0]), row["run_id"]);
        Assert.Equal("run", row["command"]);
        Assert.Equal("finished", row["state"]);
        Assert.Equal(50L, Long(row["processed"]));
        Assert.Equal(34L, Long(row["pass"]));
        Assert.Equal(7L, Long(row["fail"]));
        Assert.Equal(1L, Long(row["retest"]));
        Assert.Equal(8L, Long(row["rejected"]));
        Assert.Equal(0L, Long(row["duplicate"]));
        Assert.Equal(Convert.ToHexStringLower(SHA256.HashData(File.ReadAllBytes(demo.Config))), row["config_hash"]);
        Assert.True((DateTime)row["started_at"]! <= (DateTime)row["ended_at"]!);
        Assert.All(Relative("summaries"), f => Assert.StartsWith((string)row["run_id"]! + "-", Path.GetFileName(f), StringComparison.Ordinal));
        var version = (string)Assert.Single(Duck.Query($"SELECT DISTINCT tool_version FROM read_parquet({Summaries})"))["tool_version"]!;
        Assert.Equal(version, row["tool_version"]);
    }

    [Fact]
    public void The_report_is_one_file_whose_yield_and_units_are_the_demos()
    {
        Assert.Equal(0, demo.Report.ExitCode);
        Assert.Contains("report: " + demo.ReportFile, demo.Report.Output, StringComparison.Ordinal);
        var html = File.ReadAllText(demo.ReportFile);
        var page = MorningReportTests.Parse(html);

        var headline = page.Descendants().Single(e => (string?)e.Attribute("id") == "yield-total");
        Assert.Equal("50", Count(headline, "units"));
        Assert.Equal("34", Count(headline, "pass"));
        Assert.Equal("7", Count(headline, "fail"));
        Assert.Equal("1", Count(headline, "retest"));
        Assert.Equal("8", Count(headline, "rejected"));
        Assert.Equal("68.0 %", Count(headline, "yield"));

        var failing = DemoSet.Expected.Where(e => e.Ruling is "fail" or "retest").ToList();
        var details = page.Descendants().Where(e => e.Name.LocalName == "details" && (string?)e.Attribute("class") == "unit").ToList();
        Assert.Equal(failing.Count, details.Count);
        foreach (var expected in failing)
        {
            var detail = Assert.Single(details, d => d.Value.Contains(expected.File, StringComparison.Ordinal));
            Assert.Equal(expected.Ruling, (string?)detail.Attribute("data-ruling"));
            var codes = detail.Descendants().Select(e => (string?)e.Attribute("data-code")).OfType<string>().ToList();
            Assert.All(expected.Reasons, r => Assert.Contains(r, codes));
        }

        // Every fitted failing unit is drawn (four charts); the data-quality retests have no curve.
        var drawn = details.Count(d => d.Descendants().Count(e => e.Name.LocalName == "svg") == 4);
        var fittedFailing = Long(Duck.Query($"SELECT count(*) AS n FROM read_parquet({Summaries}) WHERE ruling IN ('fail', 'retest') AND df IS NOT NULL")[0]["n"]);
        Assert.Equal(fittedFailing, drawn);

        // One Pareto row per code of the non-pass units, as the reason table has them.
        var paretoCodes = page.Descendants().Single(e => (string?)e.Attribute("id") == "pareto-table").Descendants().Select(e => (string?)e.Attribute("data-code")).OfType<string>().ToList();
        Assert.Contains("gain.above_limit", paretoCodes);
        Assert.Contains("input.bad_number", paretoCodes);
        Assert.DoesNotContain("gain.within_limits", paretoCodes);
    }

    [Fact]
    public async Task A_report_of_one_date_counts_only_the_units_tested_that_day()
    {
        using var folder = new TempFolder();
        var file = Path.Combine(folder.Path, "one-day.html");
        var outcome = await StandFitProcess.RunAsync(demo.Root, Timeout, "report", "--output", demo.Output, "--from", "2026-12-01", "--to", "2026-12-01", "--out", file);

        Assert.Equal(0, outcome.ExitCode);
        var expected = Duck.Query($"SELECT count(*) AS units, count(*) FILTER (WHERE ruling = 'pass') AS pass FROM read_parquet({Summaries}, hive_partitioning = true) WHERE date = DATE '2026-12-01'")[0];
        var headline = MorningReportTests.Parse(File.ReadAllText(file)).Descendants().Single(e => (string?)e.Attribute("id") == "yield-total");
        Assert.Equal(Long(expected["units"]).ToString(CultureInfo.InvariantCulture), Count(headline, "units"));
        Assert.Equal(Long(expected["pass"]).ToString(CultureInfo.InvariantCulture), Count(headline, "pass"));
        Assert.True(Long(expected["units"]) is > 0 and < 50);
    }

    [Theory]
    [InlineData(2, "--from", "01/12/2026")]
    [InlineData(2, "--from", "2026-12-02", "--to", "2026-12-01")]
    [InlineData(2)]
    [InlineData(1, "--output-missing")]
    public async Task A_wrong_report_command_line_says_what_is_wrong(int exitCode, params string[] extra)
    {
        string[] args = extra is ["--output-missing"]
            ? ["report", "--output", Path.Combine(demo.Root, "no-such-folder")]
            : extra.Length == 0 ? ["report"] : ["report", "--output", demo.Output, .. extra];

        var outcome = await StandFitProcess.RunAsync(demo.Root, Timeout, args);

        Assert.Equal(exitCode, outcome.ExitCode);
        Assert.StartsWith("standfit report: ", outcome.Error, StringComparison.Ordinal);
    }

    [ChromiumFact]
    public async Task In_headless_Chromium_the_report_shows_the_demos_counts_and_draws_its_charts()
    {
        var url = new Uri(demo.ReportFile).AbsoluteUri;
        var dom = await Chromium.RunAsync(Timeout, "--dump-dom", url);
        Assert.True(dom.ExitCode == 0, "chromium --dump-dom failed: " + dom.Error);

        // The DOM as the browser built it from the file: the headline counts are expected.csv's.
        var headline = Headline().Match(dom.Output);
        Assert.True(headline.Success, "no yield headline in the DOM");
        var counts = DataCount().Matches(headline.Value).ToDictionary(m => m.Groups["what"].Value, m => m.Groups["value"].Value, StringComparer.Ordinal);
        Assert.Equal("50", counts["units"]);
        Assert.Equal(DemoSet.Expected.Count(e => e.Ruling == "pass").ToString(CultureInfo.InvariantCulture), counts["pass"]);
        Assert.Equal(DemoSet.Expected.Count(e => e.Ruling == "fail").ToString(CultureInfo.InvariantCulture), counts["fail"]);
        Assert.Equal(DemoSet.Expected.Count(e => e.Ruling == "retest").ToString(CultureInfo.InvariantCulture), counts["retest"]);
        Assert.Equal(DemoSet.Expected.Count(e => e.Ruling == "rejected").ToString(CultureInfo.InvariantCulture), counts["rejected"]);

        // Every figure of the file is in the DOM as an SVG element, and no script was needed (there is none).
        var source = File.ReadAllText(demo.ReportFile);
        Assert.Equal(Regex.Count(source, "<svg "), Regex.Count(dom.Output, "<svg "));
        Assert.True(Regex.Count(dom.Output, "<svg ") >= 10);
        Assert.Equal(DemoSet.Expected.Count(e => e.Ruling is "fail" or "retest"), Regex.Count(dom.Output, "<details class=\"unit\""));
        Assert.DoesNotContain("<script", dom.Output, StringComparison.OrdinalIgnoreCase);

        // A screenshot of the top of the page is a picture, not a blank: many colours, much ink.
        using var shots = new TempFolder();
        var png = Path.Combine(shots.Path, "report.png");
        var shot = await Chromium.RunAsync(Timeout, "--window-size=1280,1600", "--screenshot=" + png, url);
        Assert.True(File.Exists(png), "chromium wrote no screenshot: " + shot.Error);
        var image = Png.Decode(File.ReadAllBytes(png));
        Assert.Equal(1280, image.Width);
        Assert.Equal(1600, image.Height);
        var colours = image.Pixels.Distinct().Count();
        var background = image.Pixels.GroupBy(p => p).MaxBy(g => g.Count())!.Count();
        Assert.True(colours >= 100, $"the screenshot has only {colours} distinct colours");
        Assert.True(background < image.Pixels.Length * 0.9, $"{100.0 * background / image.Pixels.Length:F1} % of the screenshot is one colour");
    }

    private static string Count(System.Xml.Linq.XElement scope, string what) =>
        scope.Descendants().First(e => (string?)e.Attribute("data-count") == what).Value;

    private List<string> Relative(string table) =>
        [.. Directory.EnumerateFiles(Path.Combine(demo.Output, table), "*.parquet", SearchOption.AllDirectories)
            .Select(f => Path.GetRelativePath(Path.Combine(demo.Output, table), f).Replace('\\', '/'))];

    [GeneratedRegex("<p class=\"headline\" id=\"yield-total\">.*?</p>", RegexOptions.Singleline | RegexOptions.CultureInvariant)]
    private static partial Regex Headline();

    [GeneratedRegex("data-count=\"(?<what>[a-z]+)\">(?<value>[^<]*)<", RegexOptions.CultureInvariant)]
    private static partial Regex DataCount();

    /// <summary>One in-place run of the demo and its report, shared by the facts above.</summary>
    public sealed class DemoReport : IAsyncLifetime, IDisposable
    {
        private readonly TempFolder _root = new();

        public string Root => _root.Path;

        public string Config { get; private set; } = "";

        public string Output => Path.Combine(_root.Path, "output");

        public string ReportFile => Path.Combine(Output, "reports", "report.html");

        public StandFitProcess.Outcome Report { get; private set; } = new(-1, "", "");

        public async Task InitializeAsync()
        {
            Config = DemoSet.WriteConfig(_root);
            var run = await StandFitProcess.RunAsync(_root.Path, Timeout, "run", "--config", Config, "--from", DemoSet.Folder, "--quiet");
            Assert.True(run.ExitCode == 0, "the demo run failed: " + run.Error);
            Report = await StandFitProcess.RunAsync(_root.Path, Timeout, "report", "--output", Output);
        }

        public Task DisposeAsync() => Task.CompletedTask;

        public void Dispose() => _root.Dispose();
    }
}
