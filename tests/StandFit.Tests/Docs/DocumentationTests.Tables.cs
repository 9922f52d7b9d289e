using StandFit.Edges.Outputs;
using StandFit.Tests.Support;

namespace StandFit.Tests.Docs;

/// <summary>The per-point and runs tables of docs/outputs.md against the code and against what DuckDB reads from the demo's output.</summary>
public sealed partial class DocumentationTests
{
    [Fact]
    public void Every_point_and_run_column_is_documented_in_schema_order()
    {
        var page = Page("outputs.md");

        Assert.Equal(JsonNames(typeof(PointRecord)).Append("date"), CodeRows(page, "### Per-point columns").Select(r => r.Code));
        Assert.Equal(JsonNames(typeof(RunRecord)), CodeRows(page, "### Runs columns").Select(r => r.Code));
    }

    [Fact]
    public void The_documented_point_and_run_column_types_are_the_ones_DuckDB_reports()
    {
        var tables = new[]
        {
            ("### Per-point columns", Path.Combine(demo.Output, "points", "**", "*.parquet"), true),
            ("### Runs columns", Path.Combine(demo.Output, "runs", "*.parquet"), false),
        };
        foreach (var (heading, glob, hive) in tables)
        {
            var reported = Duck.Query($"SELECT column_name, column_type FROM (DESCRIBE SELECT * FROM read_parquet({Duck.Literal(glob)}, hive_partitioning = {(hive ? "true" : "false")}))")
                .ToDictionary(r => (string)r["column_name"]!, r => (string)r["column_type"]!, StringComparer.Ordinal);
            var rows = CodeRows(Page("outputs.md"), heading);
            Assert.Equal(reported.Count, rows.Count);
            foreach (var row in rows)
            {
                Assert.True(reported.TryGetValue(row.Code, out var type), $"DuckDB reports no column `{row.Code}` ({heading}).");
                Assert.True(row.Cells[1] == type, $"`{row.Code}`: docs/outputs.md says {row.Cells[1]}, DuckDB reports {type}.");
            }
        }
    }
}
