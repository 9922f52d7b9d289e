using System.Text;
using StandFit.Edges.Outputs;
using StandFit.Edges.Processing;
using StandFit.Tests.Support;

namespace StandFit.Tests.Outputs;

/// <summary>
/// The per-point and runs tables' schemas, as DuckDB reads them, pinned by approval files beside
/// the summary table's (tests/StandFit.Tests/Approvals/points-schema.approved.txt and
/// runs-schema.approved.txt). A change fails here until the approval file is updated on purpose
/// and the table's CurrentSchemaVersion bumped.
/// </summary>
public sealed class TableSchemaApprovalTests
{
    private static readonly DateTime At = new(2026, 12, 1, 6, 0, 0, DateTimeKind.Utc);

    [Fact]
    public async Task The_points_schema_matches_the_approved_file()
    {
        using var root = new TempFolder();
        var record = new SummaryRecord { UnitKey = "k", SourceFile = "f.csv", SourceSha256 = "s", Ruling = "pass", ProcessedAt = At, ToolVersion = "t" };
        var point = new PointRecord { UnitKey = "k", Point = 1, SourceLine = 7, Leg = "up", Stimulus = 1, Output = 2, Response = 2, Fitted = 2, BandLow = 1.9, BandHigh = 2.1 };
        await new ParquetSummaryWriter(root.Path, "approval").WriteAsync([record], [point], CancellationToken.None);
        var file = Directory.EnumerateFiles(Path.Combine(root.Path, "points"), "*.parquet", SearchOption.AllDirectories).Single();

        Approve("points-schema", PointRecord.CurrentSchemaVersion, file);
    }

    [Fact]
    public async Task The_runs_schema_matches_the_approved_file()
    {
        using var root = new TempFolder();
        using var recorder = new RunRecorder(root.Path, "run-approval", "run", "w", At, "t", "h");
        await recorder.WriteAsync(new BatchCounts(), At.AddMinutes(1), RunStates.Finished);

        Approve("runs-schema", RunRecord.CurrentSchemaVersion, recorder.File);
    }

    private static void Approve(string name, int version, string file)
    {
        var received = new StringBuilder();
        received.Append("schema_version ").Append(version).Append('\n');
        foreach (var row in Duck.Query($"DESCRIBE SELECT * FROM read_parquet({Duck.Literal(file)})"))
        {
            received.Append(row["column_name"]).Append(' ').Append(row["column_type"]).Append(' ').Append(row["null"]).Append('\n');
        }

        var approvedPath = RepoPaths.InRepo("tests", "StandFit.Tests", "Approvals", name + ".approved.txt");
        var approved = File.Exists(approvedPath) ? File.ReadAllText(approvedPath) : "";
        if (approved != received.ToString())
        {
            File.WriteAllText(RepoPaths.InRepo("tests", "StandFit.Tests", "Approvals", name + ".received.txt"), received.ToString());
        }

        Assert.Equal(approved, received.ToString());
    }
}
