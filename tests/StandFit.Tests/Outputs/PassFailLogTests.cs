using System.Globalization;
using System.Text;
using StandFit.Edges.Outputs;

namespace StandFit.Tests.Outputs;

public sealed class PassFailLogTests
{
    private static SummaryRecord Record() => new()
    {
        ProcessedAt = new DateTime(2026, 11, 30, 22, 14, 5, 123, DateTimeKind.Utc),
        Ruling = "pass",
        Serial = "SN-1001",
        Part = "KP-250",
        Station = "ST-3",
        SourceFile = "SN-1001.csv",
        RecipeName = "KP-250 pressure transducer",
        RecipeVersion = "2026.11",
        ReasonCodes = ["gain.within_limits", "offset.within_limits", "residuals.runs_ok"],
        UnitKey = "3f2a9c",
    };

    [Fact]
    public void A_line_has_time_ruling_and_the_documented_fields_in_order()
    {
        var line = PassFailLog.FormatLine(Record());

        Assert.Equal(
            "2026-11-30T22:14:05.123Z PASS     serial=SN-1001 part=KP-250 station=ST-3 file=SN-1001.csv "
            + "recipe=\"KP-250 pressure transducer@2026.11\" reasons=gain.within_limits,offset.within_limits,residuals.runs_ok key=3f2a9c",
            line);
    }

    [Fact]
    public void The_ruling_is_upper_case_and_padded_so_the_fields_line_up()
    {
        var record = Record();
        record.Ruling = "rejected";
        var rejected = PassFailLog.FormatLine(record);
        record.Ruling = "fail";
        var fail = PassFailLog.FormatLine(record);

        Assert.StartsWith("2026-11-30T22:14:05.123Z REJECTED serial=", rejected, StringComparison.Ordinal);
        Assert.StartsWith("2026-11-30T22:14:05.123Z FAIL     serial=", fail, StringComparison.Ordinal);
        Assert.Equal(rejected.IndexOf("serial=", StringComparison.Ordinal), fail.IndexOf("serial=", StringComparison.Ordinal));
    }

    [Fact]
    public void Missing_identity_and_recipe_print_a_dash()
    {
        var record = new SummaryRecord
        {
            ProcessedAt = new DateTime(2026, 12, 1, 0, 0, 0, DateTimeKind.Utc),
            Ruling = "rejected",
            SourceFile = "junk.bin",
            ReasonCodes = ["input.binary"],
            UnitKey = "ab12",
        };

        var line = PassFailLog.FormatLine(record);

        Assert.Equal("2026-12-01T00:00:00.000Z REJECTED serial=- part=- station=- file=junk.bin recipe=- reasons=input.binary key=ab12", line);
    }

    [Theory]
    [InlineData("SN-1001")]
    [InlineData("KP-250")]
    [InlineData("gain.within_limits,offset.within_limits")]
    [InlineData("a_b:c@d/e+f")]
    public void A_plain_value_is_left_bare(string value)
    {
        Assert.Equal(value, PassFailLog.Escape(value));
    }

    [Fact]
    public void A_null_value_prints_a_dash()
    {
        Assert.Equal("-", PassFailLog.Escape(null));
    }

    [Fact]
    public void An_empty_value_is_quoted_so_it_is_not_mistaken_for_the_next_field()
    {
        Assert.Equal("\"\"", PassFailLog.Escape(""));
    }

    [Fact]
    public void A_value_with_spaces_is_quoted()
    {
        Assert.Equal("\"Stand 7 left\"", PassFailLog.Escape("Stand 7 left"));
    }

    [Fact]
    public void Quotes_and_backslashes_are_escaped_inside_the_quotes()
    {
        Assert.Equal("\"say \\\"hi\\\"\"", PassFailLog.Escape("say \"hi\""));
        Assert.Equal("\"C:\\\\stand\\\\7\"", PassFailLog.Escape("C:\\stand\\7"));
    }

    [Theory]
    [InlineData("ST\n3", "\"ST\\u000a3\"")]
    [InlineData("ST\r3", "\"ST\\u000d3\"")]
    [InlineData("ST\r\n3", "\"ST\\u000d\\u000a3\"")]
    [InlineData("ST\t3", "\"ST\\u00093\"")]
    [InlineData("ST\u20283", "\"ST\\u20283\"")]
    [InlineData("ST\u20293", "\"ST\\u20293\"")]
    [InlineData("ST\u00853", "\"ST\\u00853\"")]
    [InlineData("ST\u001b[2J", "\"ST\\u001b[2J\"")]
    public void Line_breaking_and_control_characters_become_unicode_escapes(string value, string expected)
    {
        var escaped = PassFailLog.Escape(value);

        Assert.Equal(expected, escaped);
        Assert.DoesNotContain('\n', escaped);
        Assert.DoesNotContain('\r', escaped);
    }

    [Fact]
    public void Non_ascii_text_is_quoted_but_kept_readable()
    {
        Assert.Equal("\"Prüfstand µ\"", PassFailLog.Escape("Prüfstand µ"));
    }

    [Fact]
    public void Each_half_of_a_surrogate_pair_becomes_a_lower_case_unicode_escape()
    {
        Assert.Equal("\"ST\\ud83d\\ude003\"", PassFailLog.Escape("ST\U0001F6003"));
    }

    [Fact]
    public void An_equals_sign_is_quoted_so_a_value_cannot_pose_as_another_field()
    {
        Assert.Equal("\"x key=forged\"", PassFailLog.Escape("x key=forged"));
    }

    [Fact]
    public void A_literal_dash_is_written_bare_and_reads_like_no_value_as_documented()
    {
        Assert.Equal(PassFailLog.Escape(null), PassFailLog.Escape("-"));
    }

    [Fact]
    public void A_serial_or_station_with_a_newline_can_never_break_a_line()
    {
        var record = Record();
        record.Serial = "SN-1\nFAKE PASS serial=SN-2";
        record.Station = "ST-3\r\n";
        record.Part = "KP\u2028250";

        var line = PassFailLog.FormatLine(record);

        Assert.DoesNotContain('\n', line);
        Assert.DoesNotContain('\r', line);
        Assert.DoesNotContain('\u2028', line);
        Assert.Contains("serial=\"SN-1\\u000aFAKE PASS serial=SN-2\"", line, StringComparison.Ordinal);
        Assert.Contains("station=\"ST-3\\u000d\\u000a\"", line, StringComparison.Ordinal);
        Assert.Contains("part=\"KP\\u2028250\"", line, StringComparison.Ordinal);
    }

    [Fact]
    public void Append_writes_one_line_per_unit_into_the_file_of_its_processing_day()
    {
        var folder = Directory.CreateTempSubdirectory("standfit-passfail-").FullName;
        try
        {
            var first = Record();
            var second = Record();
            second.Serial = "SN-1002";
            second.ProcessedAt = second.ProcessedAt.AddMinutes(10);
            var nextDay = Record();
            nextDay.Serial = "SN-1003";
            nextDay.ProcessedAt = new DateTime(2026, 12, 1, 0, 0, 1, DateTimeKind.Utc);
            var log = new PassFailLog(folder);

            log.Append([first, second, nextDay]);
            log.Append([]);

            var day1 = File.ReadAllText(Path.Combine(folder, "passfail", "passfail-2026-11-30.log"), Encoding.UTF8);
            var day2 = File.ReadAllText(Path.Combine(folder, "passfail", "passfail-2026-12-01.log"), Encoding.UTF8);
            Assert.Equal(PassFailLog.FormatLine(first) + "\n" + PassFailLog.FormatLine(second) + "\n", day1);
            Assert.Equal(PassFailLog.FormatLine(nextDay) + "\n", day2);
        }
        finally
        {
            Directory.Delete(folder, recursive: true);
        }
    }

    [Fact]
    public void Append_adds_to_an_existing_day_file_rather_than_replacing_it()
    {
        var folder = Directory.CreateTempSubdirectory("standfit-passfail-").FullName;
        try
        {
            var log = new PassFailLog(folder);
            var second = Record();
            second.Serial = "SN-1002";

            log.Append([Record()]);
            log.Append([second]);

            var lines = File.ReadAllLines(Path.Combine(folder, "passfail", "passfail-2026-11-30.log"), Encoding.UTF8);
            Assert.Equal(2, lines.Length);
            Assert.Contains("serial=SN-1001 ", lines[0], StringComparison.Ordinal);
            Assert.Contains("serial=SN-1002 ", lines[1], StringComparison.Ordinal);
        }
        finally
        {
            Directory.Delete(folder, recursive: true);
        }
    }

    [Fact]
    public void Appends_from_several_workers_at_once_to_one_day_file_lose_no_line_and_break_none()
    {
        // Several workers share one output folder, each with its own PassFailLog. .NET's
        // FileMode.Append writes at the end the file had when the stream was opened, so without
        // the lock concurrent appends write over each other (whole batches were lost).
        const int Workers = 4, Batches = 50, PerBatch = 8;
        var folder = Directory.CreateTempSubdirectory("standfit-passfail-").FullName;
        try
        {
            var start = new Barrier(Workers);
            Parallel.For(0, Workers, new ParallelOptions { MaxDegreeOfParallelism = Workers }, w =>
            {
                var log = new PassFailLog(folder);
                start.SignalAndWait();
                for (var b = 0; b < Batches; b++)
                {
                    var batch = new List<SummaryRecord>(PerBatch);
                    for (var u = 0; u < PerBatch; u++)
                    {
                        var record = Record();
                        record.Serial = string.Create(CultureInfo.InvariantCulture, $"W{w}-B{b:D2}-U{u}");
                        batch.Add(record);
                    }

                    log.Append(batch);
                }
            });

            var lines = File.ReadAllLines(Path.Combine(folder, "passfail", "passfail-2026-11-30.log"), Encoding.UTF8);
            Assert.Equal(Workers * Batches * PerBatch, lines.Length);
            var expected = Enumerable.Range(0, Workers * Batches * PerBatch)
                .Select(i => string.Create(CultureInfo.InvariantCulture, $"W{i / (Batches * PerBatch)}-B{i / PerBatch % Batches:D2}-U{i % PerBatch}"));
            Assert.Equal(expected.Order(StringComparer.Ordinal), lines.Select(l => System.Text.RegularExpressions.Regex.Match(l, " serial=([^ ]+) ").Groups[1].Value).Order(StringComparer.Ordinal));
            Assert.All(lines, l => Assert.Matches("^2026-11-30T22:14:05.123Z PASS     serial=W[0-9]-B[0-9]{2}-U[0-9] part=KP-250 .* key=3f2a9c$", l));
        }
        finally
        {
            Directory.Delete(folder, recursive: true);
        }
    }
}
