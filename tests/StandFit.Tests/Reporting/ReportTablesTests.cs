using StandFit.Core.Judging;
using StandFit.Core.Reporting;

namespace StandFit.Tests.Reporting;

/// <summary>The yield tables, the choice of the row that counts for a serial, and the Pareto of reasons, on hand-made rows.</summary>
public sealed class ReportTablesTests
{
    private static readonly DateTime Night = new(2026, 11, 30, 22, 0, 0, DateTimeKind.Utc);

    internal static ReportedUnit Unit(string key, string? serial, string? part, Ruling ruling, DateTime? testStart = null, DateTime? processedAt = null, string? station = "EOL-3A", params string[] codes) => new()
    {
        UnitKey = key,
        Serial = serial,
        Part = part,
        Station = station,
        TestStart = testStart,
        ProcessedAt = processedAt ?? Night.AddHours(10),
        Ruling = ruling,
        ReasonCodes = [.. codes],
        Reasons = [.. codes.Select(c => "sentence of " + c)],
    };

    [Fact]
    public void A_retested_serial_counts_once_with_its_latest_row()
    {
        var first = Unit("a:1", "S1", "KP-250", Ruling.Retest, processedAt: Night.AddHours(1));
        var second = Unit("b:1", "S1", "KP-250", Ruling.Pass, processedAt: Night.AddHours(2));
        var other = Unit("c:1", "S2", "KP-250", Ruling.Fail, processedAt: Night.AddHours(1));

        var counted = UnitSelection.LatestPerSerial([first, second, other]);

        Assert.Equal(["b:1", "c:1"], counted.Select(u => u.UnitKey).Order(StringComparer.Ordinal));
    }

    [Fact]
    public void Rows_judged_in_the_same_batch_are_told_apart_by_the_smaller_unit_key()
    {
        var counted = UnitSelection.LatestPerSerial([Unit("b:1", "S1", "KP-250", Ruling.Pass), Unit("a:1", "S1", "KP-250", Ruling.Fail)]);

        Assert.Equal("a:1", Assert.Single(counted).UnitKey);
    }

    [Fact]
    public void Rows_without_a_serial_each_count_and_the_same_serial_of_two_parts_counts_twice()
    {
        var counted = UnitSelection.LatestPerSerial([
            Unit("x:none", null, null, Ruling.Rejected),
            Unit("y:none", null, null, Ruling.Rejected),
            Unit("a:1", "S1", "KP-250", Ruling.Pass),
            Unit("b:1", "S1", "LC-5K", Ruling.Pass),
        ]);

        Assert.Equal(4, counted.Length);
    }

    [Fact]
    public void Test_order_is_by_test_start_then_processing_time_when_there_is_none()
    {
        var late = Unit("a", "S3", "P", Ruling.Pass, testStart: Night.AddHours(3));
        var early = Unit("b", "S1", "P", Ruling.Pass, testStart: Night.AddHours(1));
        var unknown = Unit("c", "S2", "P", Ruling.Pass, testStart: null, processedAt: Night.AddHours(2));

        Assert.Equal(["b", "c", "a"], UnitSelection.InTestOrder([late, early, unknown]).Select(u => u.UnitKey));
    }

    [Fact]
    public void A_yield_table_counts_each_ruling_and_the_yield_is_pass_over_units()
    {
        var units = new[]
        {
            Unit("1", "1", "KP-250", Ruling.Pass), Unit("2", "2", "KP-250", Ruling.Pass), Unit("3", "3", "KP-250", Ruling.Fail),
            Unit("4", "4", "KP-250", Ruling.Rejected), Unit("5", "5", "LC-5K", Ruling.Retest), Unit("6", null, null, Ruling.Rejected),
        };

        var rows = YieldTable.By(units, u => u.Part);

        Assert.Equal(
            [
                new YieldRow("KP-250", 4, 2, 1, 0, 1),
                new YieldRow("LC-5K", 1, 0, 0, 1, 0),
                new YieldRow(null, 1, 0, 0, 0, 1),
            ],
            rows.ToArray());
        Assert.Equal(50.0, rows[0].YieldPercent);
        Assert.Equal(new YieldRow(null, 6, 2, 1, 1, 2), YieldTable.Total(units));
        Assert.Equal(100.0 * 2 / 6, YieldTable.Total(units).YieldPercent!.Value, 12);
        Assert.Null(YieldTable.Total([]).YieldPercent);
    }

    [Fact]
    public void The_hour_of_a_unit_is_the_UTC_hour_of_its_test_start_or_else_of_its_processing()
    {
        Assert.Equal("2026-11-30 23:00Z", YieldTable.HourOf(Unit("a", "S", "P", Ruling.Pass, testStart: Night.AddMinutes(61))));
        Assert.Equal("2026-12-01 08:00Z", YieldTable.HourOf(Unit("a", "S", "P", Ruling.Pass, testStart: null, processedAt: Night.AddHours(10).AddMinutes(59))));
    }

    [Fact]
    public void The_pareto_leaves_out_passes_and_pass_kind_codes_and_counts_a_code_once_per_unit()
    {
        var units = new[]
        {
            Unit("1", "1", "P", Ruling.Fail, codes: ["gain.above_limit", "offset.within_limits", "residuals.runs_ok"]),
            Unit("2", "2", "P", Ruling.Fail, codes: ["gain.above_limit", "gain.above_limit", "residuals.runs_structure"]),
            Unit("3", "3", "P", Ruling.Retest, codes: ["gain.straddles_limit", "residuals.durbin_watson_ok"]),
            Unit("4", "4", "P", Ruling.Rejected, codes: ["input.bad_number"]),
            Unit("5", "5", "P", Ruling.Pass, codes: ["gain.within_limits", "residuals.runs_ok"]),
            Unit("6", "6", "P", Ruling.Fail, codes: ["site.custom_code"]),
        };

        var bars = Pareto.Of(units);

        // 6 codes counted: gain.above_limit twice, the other four once each; ties by code.
        Assert.Equal(["gain.above_limit", "gain.straddles_limit", "input.bad_number", "residuals.runs_structure", "site.custom_code"], bars.Select(b => b.Code));
        Assert.Equal([2, 1, 1, 1, 1], bars.Select(b => b.Units));
        Assert.Equal(100.0 * 2 / 6, bars[0].Percent, 12);
        Assert.Equal(100.0 * 3 / 6, bars[1].CumulativePercent, 12);
        Assert.Equal(100.0, bars[^1].CumulativePercent, 12);
    }

    [Fact]
    public void No_unit_outside_pass_gives_an_empty_pareto()
    {
        Assert.Empty(Pareto.Of([Unit("1", "1", "P", Ruling.Pass, codes: ["gain.within_limits"])]));
    }
}
