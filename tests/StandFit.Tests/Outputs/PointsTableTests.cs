using System.Globalization;
using Microsoft.Extensions.Logging.Abstractions;
using StandFit.Core.Evaluation;
using StandFit.Edges.Configuration;
using StandFit.Edges.Folders;
using StandFit.Edges.Outputs;
using StandFit.Edges.Processing;
using StandFit.Edges.Readers;
using StandFit.Edges.RecipeFiles;
using StandFit.Tests.Support;

namespace StandFit.Tests.Outputs;

/// <summary>
/// The per-point table: what each row holds, and that it is published in the same two-phase step as
/// the batch's summary rows (same names, same partition, renamed together; recovered together after
/// a crash after the commit; removed together after a crash before it).
/// </summary>
public sealed class PointsTableTests
{
    private static readonly DateTime At = new(2026, 12, 2, 6, 0, 0, DateTimeKind.Utc);

    private static UnitEvaluation Evaluate(string file)
    {
        var catalog = RecipeCatalog.Load(DemoSet.Recipes);
        var processor = new UnitProcessor(new SweepFileReader(4 * 1024 * 1024), () => catalog, NullLogger.Instance);
        return processor.Process(Path.Combine(DemoSet.Folder, file)).Evaluation;
    }

    [Fact]
    public void Each_point_of_a_fitted_unit_holds_its_reading_fit_residual_band_and_studentized_residual()
    {
        // KP250-26110-0027 carries an injected outlier: the largest studentized residual points at it.
        var unit = Evaluate("KP250-26110-0027.csv");
        var fit = unit.Fit!;
        var rows = PointRecordFactory.Create(unit, "key");

        Assert.Equal(fit.Count, rows.Count);
        Assert.Equal(Enumerable.Range(1, fit.Count), rows.Select(r => r.Point));
        Assert.Equal(unit.Sweep!.SourceLines, rows.Select(r => r.SourceLine));
        Assert.All(rows, r => Assert.Equal("key", r.UnitKey));
        Assert.Equal(["up", "down"], rows.Select(r => r.Leg).Distinct());
        Assert.All(rows, r => Assert.Empty(r.FurtherInputs));
        Assert.All(rows, r => Assert.Null(r.Uncertainty));
        for (var i = 0; i < rows.Count; i++)
        {
            var r = rows[i];
            Assert.Equal(unit.Sweep.Stimulus[i], r.Stimulus);
            Assert.Equal(unit.Sweep.Output[i], r.Output);
            Assert.Equal(r.Output, r.Response); // a straight line fits the output itself
            Assert.Equal(r.Response - r.Fitted, r.Residual, 12);
            Assert.True(r.BandLow < r.Fitted && r.Fitted < r.BandHigh, $"point {r.Point}: the band [{r.BandLow}, {r.BandHigh}] does not hold the fitted value {r.Fitted}");
            Assert.Equal(unit.Diagnostics!.Points.Studentized[i], r.StudentizedResidual);
            Assert.Equal(fit.Leverage[i], r.Leverage);
        }

        var outlier = unit.Diagnostics!.Outliers;
        var largest = rows.MaxBy(r => Math.Abs(r.StudentizedResidual!.Value))!;
        Assert.Equal(outlier.Index + 1, largest.Point);
        Assert.Equal(outlier.MaxAbsStudentized, Math.Abs(largest.StudentizedResidual!.Value), 12);
    }

    [Theory]
    [InlineData("KP250-26110-0903.csv")] // rejected: a bad number
    [InlineData("KP250-26110-0901.csv")] // rejected: empty
    public void A_unit_that_was_not_fitted_has_no_point_rows(string file)
    {
        Assert.Empty(PointRecordFactory.Create(Evaluate(file), "key"));
    }

    [Fact]
    public async Task Points_are_published_beside_their_summary_rows_under_the_same_names_and_partitions()
    {
        using var root = new TempFolder();
        var writer = new ParquetSummaryWriter(root.Path, "run-x", "w");
        var (records, points) = Batch("KP250-26110-0004.csv", "KP250-26110-0022.csv", "KP250-26110-0903.csv");

        var prepared = await writer.PrepareAsync(records, points, CancellationToken.None);

        // Nothing visible before the rename.
        Assert.Empty(Directory.EnumerateFiles(root.Path, "*.parquet", SearchOption.AllDirectories));
        var finals = prepared.RelativeFinals;
        var summaryFiles = finals.Where(f => f.StartsWith("summaries/", StringComparison.Ordinal)).ToList();
        var pointFiles = finals.Where(f => f.StartsWith("points/", StringComparison.Ordinal)).ToList();
        Assert.NotEmpty(pointFiles);
        Assert.All(pointFiles, p => Assert.Contains("summaries/" + p["points/".Length..], summaryFiles));

        prepared.Complete();
        var glob = Duck.Literal(Path.Combine(root.Path, "points", "**", "*.parquet"));
        var joined = Duck.Query($"""
            SELECT s.unit_key, s.n_points, count(p.point) AS points, s.date = p.date AS same_partition
            FROM read_parquet({Duck.Literal(Path.Combine(root.Path, "summaries", "**", "*.parquet"))}, hive_partitioning = true) s
            JOIN read_parquet({glob}, hive_partitioning = true) p USING (unit_key)
            GROUP BY ALL
            """);
        Assert.Equal(2, joined.Count); // the rejected unit has a summary row and no points
        Assert.All(joined, r => Assert.Equal(Convert.ToInt64(r["n_points"], CultureInfo.InvariantCulture), Convert.ToInt64(r["points"], CultureInfo.InvariantCulture)));
        Assert.All(joined, r => Assert.True((bool)r["same_partition"]!));
    }

    [Fact]
    public async Task Point_rows_without_their_units_summary_row_are_refused_and_nothing_is_left_behind()
    {
        using var root = new TempFolder();
        var writer = new ParquetSummaryWriter(root.Path, "run-x", "w");
        var (records, points) = Batch("KP250-26110-0004.csv");

        await Assert.ThrowsAsync<ArgumentException>(() => writer.PrepareAsync([], points, CancellationToken.None));
        await Assert.ThrowsAsync<ArgumentException>(() => writer.PrepareAsync(records, [.. points, new PointRecord { UnitKey = "other" }], CancellationToken.None));
        Assert.Empty(Directory.EnumerateFiles(root.Path, "*", SearchOption.AllDirectories));
    }

    [Fact]
    public async Task A_batch_committed_before_a_crash_gets_its_points_renamed_with_its_summaries_at_the_next_start()
    {
        using var root = new TempFolder();
        var options = Options(root);
        var writer = new ParquetSummaryWriter(options.Output, "run-crashed", options.WorkerId);
        var (records, points) = Batch("KP250-26110-0004.csv", "LC5K-26110-0004.csv");
        var prepared = await writer.PrepareAsync(records, points, CancellationToken.None);
        var journal = PublishJournal.Open(options.Output, options.WorkerId, new HashSet<string>(StringComparer.Ordinal));
        journal.Commit(new JournalBatch { Id = "run-crashed-b000001", At = At, Files = [.. prepared.RelativeFinals], Units = [] });

        // The crash: committed, not renamed. The next process finishes the batch from the journal alone.
        Assert.Empty(Directory.EnumerateFiles(options.Output, "*.parquet", SearchOption.AllDirectories));
        using (var pipeline = Pipeline.Build(options, NullLoggerFactory.Instance, DispositionMode.Move, TimeProvider.System))
        {
            await pipeline.Runner.ProcessAsync([], CancellationToken.None);
        }

        foreach (var file in prepared.RelativeFinals)
        {
            Assert.True(File.Exists(Path.Combine(options.Output, file)), file + " was not renamed");
        }

        Assert.Empty(Directory.EnumerateFiles(options.Output, "*.tmp", SearchOption.AllDirectories));
        var count = Duck.Query($"SELECT count(*) AS n FROM read_parquet({Duck.Literal(Path.Combine(options.Output, "points", "**", "*.parquet"))})")[0]["n"];
        Assert.Equal((long)points.Count, Convert.ToInt64(count, CultureInfo.InvariantCulture));
    }

    [Fact]
    public async Task A_batch_prepared_but_not_committed_leaves_no_summary_or_point_file_after_the_next_start()
    {
        using var root = new TempFolder();
        var options = Options(root);
        var writer = new ParquetSummaryWriter(options.Output, "run-crashed", options.WorkerId);
        var (records, points) = Batch("KP250-26110-0004.csv");
        await writer.PrepareAsync(records, points, CancellationToken.None);
        Assert.Equal(2, Directory.EnumerateFiles(options.Output, "*.tmp", SearchOption.AllDirectories).Count());

        using (var pipeline = Pipeline.Build(options, NullLoggerFactory.Instance, DispositionMode.Move, TimeProvider.System))
        {
            await pipeline.Runner.ProcessAsync([], CancellationToken.None);
        }

        Assert.Empty(Directory.EnumerateFiles(options.Output, "*.tmp", SearchOption.AllDirectories));
        Assert.Empty(Directory.EnumerateFiles(options.Output, "*.parquet", SearchOption.AllDirectories));
    }

    private static StandFitOptions Options(TempFolder root)
    {
        var options = ConfigLoader.Load(WorkerConfig.Write(root)).Value;
        Assert.Empty(ConfigLoader.PrepareFolders(options, needInbox: true));
        return options;
    }

    private static (List<SummaryRecord> Records, List<PointRecord> Points) Batch(params string[] files)
    {
        var records = new List<SummaryRecord>();
        var points = new List<PointRecord>();
        foreach (var file in files)
        {
            var unit = Evaluate(file);
            var record = SummaryRecordFactory.Create(unit, Hashing.Sha256Hex(File.ReadAllBytes(Path.Combine(DemoSet.Folder, file))), At, "test");
            records.Add(record);
            points.AddRange(PointRecordFactory.Create(unit, record.UnitKey));
        }

        return (records, points);
    }
}

/// <summary>The recipe's <c>output.points</c> end to end: the demo judged with every recipe set to flagged.</summary>
public sealed class PointsOutputRunTests
{
    [Fact]
    public async Task With_points_flagged_only_fail_and_retest_units_have_rows_in_the_per_point_table()
    {
        using var root = new TempFolder();
        var recipes = Directory.CreateDirectory(Path.Combine(root.Path, "recipes")).FullName;
        foreach (var file in Directory.EnumerateFiles(DemoSet.Recipes, "*.yaml"))
        {
            File.WriteAllText(Path.Combine(recipes, Path.GetFileName(file)), File.ReadAllText(file).TrimEnd() + "\noutput:\n  points: flagged\n");
        }

        var options = ConfigLoader.Load(WorkerConfig.Write(root, flushUnits: 100, recipes: recipes)).Value;
        Assert.Empty(ConfigLoader.PrepareFolders(options, needInbox: false));
        using (var pipeline = Pipeline.Build(options, NullLoggerFactory.Instance, DispositionMode.Copy, TimeProvider.System))
        {
            var counts = await pipeline.Runner.ProcessAsync(DropFolder.ListReady(DemoSet.Folder), CancellationToken.None);
            Assert.Equal(DemoSet.Expected.Count, counts.Processed);
        }

        var summaries = Duck.Literal(Path.Combine(options.Output, "summaries", "**", "*.parquet"));
        var points = Duck.Literal(Path.Combine(options.Output, "points", "**", "*.parquet"));
        var withPoints = Duck.Query($"SELECT s.source_file, s.ruling, count(*) AS n, max(s.n_points) AS expected FROM read_parquet({summaries}) s JOIN read_parquet({points}) p USING (unit_key) GROUP BY ALL ORDER BY s.source_file");

        // Every unit with points was ruled fail or retest, and has all of its points.
        Assert.NotEmpty(withPoints);
        Assert.All(withPoints, r => Assert.Contains((string)r["ruling"]!, new[] { "fail", "retest" }));
        Assert.All(withPoints, r => Assert.Equal(Convert.ToInt64(r["expected"], CultureInfo.InvariantCulture), (long)r["n"]!));

        // And every fitted fail or retest unit has them (sample-runs/expected.csv names the demo's rulings).
        var flagged = Duck.Query($"SELECT source_file FROM read_parquet({summaries}) WHERE ruling IN ('fail', 'retest') AND residual_sd IS NOT NULL ORDER BY source_file").Select(r => (string)r["source_file"]!).ToList();
        Assert.Equal(flagged, withPoints.Select(r => (string)r["source_file"]!).ToList());
        var expectedFlagged = DemoSet.Expected.Count(e => e.Ruling is "fail" or "retest");
        Assert.True(flagged.Count > 0 && flagged.Count <= expectedFlagged);
        var passing = (long)Duck.Query($"SELECT count(*) AS n FROM read_parquet({summaries}) WHERE ruling = 'pass'")[0]["n"]!;
        Assert.Equal(DemoSet.Expected.Count(e => e.Ruling == "pass"), passing);
    }
}
