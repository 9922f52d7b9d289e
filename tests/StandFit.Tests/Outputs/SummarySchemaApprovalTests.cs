using System.Text;
using StandFit.Edges.Outputs;
using StandFit.Tests.Support;

namespace StandFit.Tests.Outputs;

/// <summary>
/// The summary table's schema, as DuckDB reads it, is pinned by an approval file
/// (tests/StandFit.Tests/Approvals/summary-schema.approved.txt). A change to the schema fails
/// here until the approval file is updated on purpose (and SummaryRecord.CurrentSchemaVersion bumped).
/// </summary>
public sealed class SummarySchemaApprovalTests
{
    [Fact]
    public async Task The_summary_schema_matches_the_approved_file()
    {
        using var root = new TempFolder();
        var record = new SummaryRecord
        {
            UnitKey = "k",
            SourceFile = "f.csv",
            SourceSha256 = "s",
            Ruling = "pass",
            ProcessedAt = new DateTime(2026, 12, 1, 6, 0, 0, DateTimeKind.Utc),
            ToolVersion = "t",
        };
        await new ParquetSummaryWriter(root.Path, "approval").WriteAsync([record], CancellationToken.None);
        var file = Directory.EnumerateFiles(root.Path, "*.parquet", SearchOption.AllDirectories).Single();

        var received = new StringBuilder();
        received.Append("schema_version ").Append(SummaryRecord.CurrentSchemaVersion).Append('\n');
        foreach (var row in Duck.Query($"DESCRIBE SELECT * FROM read_parquet({Duck.Literal(file)})"))
        {
            received.Append(row["column_name"]).Append(' ').Append(row["column_type"]).Append(' ').Append(row["null"]).Append('\n');
        }

        var approvedPath = RepoPaths.InRepo("tests", "StandFit.Tests", "Approvals", "summary-schema.approved.txt");
        var approved = File.Exists(approvedPath) ? File.ReadAllText(approvedPath) : "";
        if (approved != received.ToString())
        {
            File.WriteAllText(Path.ChangeExtension(approvedPath, null).Replace(".approved", ".received", StringComparison.Ordinal) + ".txt", received.ToString());
        }

        Assert.Equal(approved, received.ToString());
    }
}
