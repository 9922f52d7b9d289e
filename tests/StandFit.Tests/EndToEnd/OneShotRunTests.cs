using System.Collections;
using System.Security.Cryptography;
using StandFit.Tests.Support;

namespace StandFit.Tests.EndToEnd;

/// <summary>
/// The whole job as a line PC runs it: the demo units copied into an inbox, `standfit run` as a
/// separate process, the Parquet read back with DuckDB, every ruling and reason code checked
/// against the demo's documented expectations (sample-runs/expected.csv, computed independently
/// by the demo generator's own fit; see sample-runs/EXPECTED.md).
/// </summary>
public sealed class OneShotRunTests : IClassFixture<OneShotRunTests.DemoRun>
{
    private static readonly TimeSpan Timeout = TimeSpan.FromMinutes(3);
    private readonly DemoRun _run;

    public OneShotRunTests(DemoRun run) => _run = run;

    [Fact]
    public void The_run_exits_with_zero_and_prints_the_totals()
    {
        Assert.Equal(0, _run.Outcome.ExitCode);
        Assert.Contains("50 units: 34 pass, 7 fail, 1 retest, 8 rejected", _run.Outcome.Output, StringComparison.Ordinal);
    }

    [Fact]
    public void Every_unit_has_exactly_one_summary_row_with_its_documented_ruling_and_reasons()
    {
        var rows = Duck.Query($"SELECT source_file, ruling, reason_codes FROM read_parquet({Duck.Literal(_run.SummaryGlob)}, hive_partitioning = true) ORDER BY source_file");
        Assert.Equal(DemoSet.Expected.Count, rows.Count);
        foreach (var expected in DemoSet.Expected)
        {
            var row = Assert.Single(rows, r => (string)r["source_file"]! == expected.File);
            Assert.True(expected.Ruling == (string)row["ruling"]!, $"{expected.File}: ruling {row["ruling"]}, expected {expected.Ruling}");
            var codes = ((IEnumerable)row["reason_codes"]!).Cast<string>().ToList();
            foreach (var reason in expected.Reasons)
            {
                Assert.True(codes.Contains(reason), $"{expected.File}: reason {reason} missing from [{string.Join(", ", codes)}]");
            }

            if (expected.Ruling == "pass")
            {
                Assert.All(codes, c => Assert.True(c.EndsWith("within_limits", StringComparison.Ordinal) || (c.StartsWith("residuals.", StringComparison.Ordinal) && c.EndsWith("_ok", StringComparison.Ordinal)), $"{expected.File}: a pass carries {c}"));
            }
        }
    }

    [Fact]
    public void Every_input_ends_in_archive_or_rejected_exactly_once_and_unchanged()
    {
        Assert.Empty(Directory.EnumerateFiles(_run.Inbox));
        var archived = Directory.EnumerateFiles(_run.Archive, "*.csv", SearchOption.AllDirectories).ToList();
        var rejected = Directory.EnumerateFiles(_run.Rejected, "*.csv", SearchOption.AllDirectories).ToList();
        Assert.Equal(DemoSet.Expected.Count(e => e.Ruling != "rejected"), archived.Count);
        Assert.Equal(DemoSet.Expected.Count(e => e.Ruling == "rejected"), rejected.Count);
        foreach (var file in archived.Concat(rejected))
        {
            var original = Path.Combine(DemoSet.Folder, Path.GetFileName(file));
            Assert.Equal(SHA256.HashData(File.ReadAllBytes(original)), SHA256.HashData(File.ReadAllBytes(file)));
        }
    }

    [Fact]
    public void Each_rejected_file_has_a_sidecar_naming_its_reason()
    {
        foreach (var expected in DemoSet.Expected.Where(e => e.Ruling == "rejected"))
        {
            var sidecar = Assert.Single(Directory.EnumerateFiles(_run.Rejected, expected.File + ".rejected.txt", SearchOption.AllDirectories));
            Assert.Contains("code: " + expected.Reasons[0], File.ReadAllText(sidecar), StringComparison.Ordinal);
        }
    }

    [Fact]
    public void The_pass_fail_log_has_one_line_per_unit_with_its_ruling_and_key()
    {
        var lines = Directory.EnumerateFiles(Path.Combine(_run.Output, "passfail"), "*.log").SelectMany(File.ReadAllLines).ToList();
        Assert.Equal(DemoSet.Expected.Count, lines.Count);
        foreach (var expected in DemoSet.Expected)
        {
            var line = Assert.Single(lines, l => l.Contains(" file=" + expected.File + " ", StringComparison.Ordinal));
            Assert.Contains(" " + expected.Ruling.ToUpperInvariant() + " ", line, StringComparison.Ordinal);
            Assert.Matches(" key=[0-9a-f]{64}:([0-9a-f]{64}|none)$", line);
        }
    }

    [Fact]
    public void Every_row_and_pass_fail_line_judged_under_a_recipe_names_its_version_and_content_hash()
    {
        var catalog = StandFit.Edges.RecipeFiles.RecipeCatalog.Load(DemoSet.Recipes);
        var rows = Duck.Query($"SELECT source_file, part, ruling, recipe_name, recipe_version, recipe_hash, unit_key FROM read_parquet({Duck.Literal(_run.SummaryGlob)})");
        var lines = Directory.EnumerateFiles(Path.Combine(_run.Output, "passfail"), "*.log").SelectMany(File.ReadAllLines).ToList();
        var judged = 0;
        foreach (var row in rows)
        {
            var file = (string)row["source_file"]!;
            var line = Assert.Single(lines, l => l.Contains(" file=" + file + " ", StringComparison.Ordinal));
            if (row["recipe_hash"] is not null)
            {
                var recipe = catalog.ForPart((string)row["part"]!);
                Assert.NotNull(recipe);
                // A recipe that stands alone: its hash is the SHA-256 of its file's bytes.
                Assert.Equal(recipe.Version, row["recipe_version"]);
                Assert.Equal(recipe.ContentHash, row["recipe_hash"]);
                Assert.Equal(Convert.ToHexStringLower(SHA256.HashData(File.ReadAllBytes(Path.Combine(DemoSet.Recipes, recipe.SourceFile)))), row["recipe_hash"]);
                Assert.EndsWith(":" + recipe.ContentHash, (string)row["unit_key"]!, StringComparison.Ordinal);
                Assert.Contains("@" + recipe.Version, line, StringComparison.Ordinal);
                judged++;
            }
            else
            {
                // Rejected before a recipe was applied (unreadable, no part, no recipe for the part): none is claimed.
                Assert.Equal("rejected", row["ruling"]);
                Assert.Null(row["recipe_version"]);
                Assert.EndsWith(":none", (string)row["unit_key"]!, StringComparison.Ordinal);
            }
        }

        // Every pass, fail and retest row names its recipe.
        Assert.Equal(DemoSet.Expected.Count(e => e.Ruling != "rejected"), rows.Count(r => (string)r["ruling"]! != "rejected" && r["recipe_hash"] is not null));
        Assert.True(judged >= DemoSet.Expected.Count(e => e.Ruling != "rejected"));
    }

    [Fact]
    public void A_retest_row_records_the_straddled_limit_with_its_conditional_state_and_no_other_limit_has_one()
    {
        var limits = Duck.Query(
            "SELECT source_file, ruling, l.figure AS figure, l.\"rule\" AS rule_name, l.zone AS zone, l.conditional AS conditional, l.\"value\" AS v, l.\"min\" AS lo, l.\"max\" AS hi, l.expanded_uncertainty AS u "
            + $"FROM (SELECT source_file, ruling, unnest(limit_results) AS l FROM read_parquet({Duck.Literal(_run.SummaryGlob)}))");
        foreach (var expected in DemoSet.Expected.Where(e => e.Ruling == "retest"))
        {
            var straddled = Assert.Single(limits, l => (string)l["source_file"]! == expected.File && (string)l["zone"]! == "straddles");
            Assert.Equal(expected.Reasons.Single(), (string)straddled["figure"]! + ".straddles_limit");
            Assert.Equal("guarded", straddled["rule_name"]);
            Assert.True((double)straddled["u"]! > 0);
            var value = (double)straddled["v"]!;
            var inside = (straddled["lo"] is not double lo || value >= lo) && (straddled["hi"] is not double hi || value <= hi);
            Assert.Equal(inside ? "pass" : "fail", straddled["conditional"]);
        }

        // A unit may also straddle one limit and fail another (a fail outranks a retest): its straddle has its conditional state too.
        Assert.All(limits.Where(l => (string)l["zone"]! != "straddles"), l => Assert.Null(l["conditional"]));
        Assert.All(limits.Where(l => (string)l["zone"]! == "straddles"), l => Assert.Contains((string)l["conditional"]!, new[] { "pass", "fail" }));
        Assert.Equal(DemoSet.Expected.Count(e => e.Ruling == "retest"), limits.Count(l => (string)l["zone"]! == "straddles" && (string)l["ruling"]! == "retest"));
    }

    [Fact]
    public void Timestamps_are_utc_millisecond_columns_that_filter_by_date()
    {
        // Test starts of the demo run from 2026-11-30T22:00Z to 2026-12-01T06:00Z (sample-runs/EXPECTED.md).
        var types = Duck.Query($"SELECT column_name, column_type FROM (DESCRIBE SELECT test_start, processed_at FROM read_parquet({Duck.Literal(_run.SummaryGlob)}))");
        Assert.All(types, t => Assert.Equal("TIMESTAMP WITH TIME ZONE", (string)t["column_type"]!));
        var all = Duck.Query($"SELECT count(*) AS n FROM read_parquet({Duck.Literal(_run.SummaryGlob)}) WHERE test_start IS NOT NULL")[0]["n"];
        var afterMidnight = Duck.Query($"SELECT count(*) AS n FROM read_parquet({Duck.Literal(_run.SummaryGlob)}, hive_partitioning = true) WHERE test_start >= TIMESTAMPTZ '2026-12-01 00:00:00+00'")[0]["n"];
        var partition = Duck.Query($"SELECT count(*) AS n FROM read_parquet({Duck.Literal(_run.SummaryGlob)}, hive_partitioning = true) WHERE date = '2026-12-01' AND test_start IS NOT NULL")[0]["n"];
        Assert.True(Convert.ToInt64(all, System.Globalization.CultureInfo.InvariantCulture) > Convert.ToInt64(afterMidnight, System.Globalization.CultureInfo.InvariantCulture));
        Assert.Equal(afterMidnight, partition);
    }

    /// <summary>One run of the demo, shared by the facts above.</summary>
    public sealed class DemoRun : IAsyncLifetime, IDisposable
    {
        private readonly TempFolder _root = new();

        public StandFitProcess.Outcome Outcome { get; private set; } = new(-1, "", "");

        public string Inbox => Path.Combine(_root.Path, "inbox");

        public string Archive => Path.Combine(_root.Path, "archive");

        public string Rejected => Path.Combine(_root.Path, "rejected");

        public string Output => Path.Combine(_root.Path, "output");

        public string SummaryGlob => Path.Combine(Output, "summaries", "**", "*.parquet");

        public async Task InitializeAsync()
        {
            var config = DemoSet.WriteConfig(_root);
            DemoSet.CopyInto(Inbox);
            Outcome = await StandFitProcess.RunAsync(_root.Path, Timeout, "run", "--config", config);
        }

        public Task DisposeAsync() => Task.CompletedTask;

        public void Dispose() => _root.Dispose();
    }
}
