using StandFit.Core.Ingest;
using StandFit.Core.Problems;

namespace StandFit.Tests.Ingest;

public sealed class SweepTextParserTests
{
    private const string File = "SN-1001.csv";

    private static Problem SingleProblem(Result<SweepTable> result)
    {
        Assert.False(result.IsSuccess);
        return Assert.Single(result.Problems);
    }

    [Fact]
    public void Metadata_header_and_rows_are_split_with_their_line_numbers()
    {
        var text = """
            # serial: SN-1001
            # part: KP-250
            pressure_kPa,output_mV
            0,0.01
            50,10.02
            """;

        var table = SweepTextParser.Parse(File, text + "\n").Value;

        Assert.Equal(File, table.SourceName);
        Assert.Equal(["serial", "part"], table.Metadata.Select(m => m.Key));
        Assert.Equal(["SN-1001", "KP-250"], table.Metadata.Select(m => m.Value));
        Assert.Equal([1, 2], table.Metadata.Select(m => m.Line));
        Assert.Equal<string>(["pressure_kPa", "output_mV"], table.Header);
        Assert.Equal(3, table.HeaderLine);
        Assert.Equal([4, 5], table.Rows.Select(r => r.Line));
        Assert.Equal<string>(["50", "10.02"], table.Rows[1].Cells);
    }

    [Theory]
    [InlineData("Test Start", "test_start")]
    [InlineData("  TEST-START ", "test_start")]
    [InlineData("test.start", "test_start")]
    [InlineData("Test   Start", "test_start")]
    [InlineData("Serial", "serial")]
    [InlineData("Station_ID", "station_id")]
    public void Metadata_keys_are_normalised_to_lower_case_with_single_underscores(string written, string normalised)
    {
        Assert.Equal(normalised, MetadataKeys.Normalise(written));
    }

    [Fact]
    public void A_metadata_key_written_with_spaces_and_capitals_is_found_under_its_normalised_name()
    {
        var text = "# Test Start: 2026-11-30T22:14:05Z\nx,y\n1,2\n";

        var table = SweepTextParser.Parse(File, text).Value;

        var entry = Assert.Single(table.Metadata);
        Assert.Equal("test_start", entry.Key);
        Assert.Equal("2026-11-30T22:14:05Z", entry.Value);
        Assert.Equal("2026-11-30T22:14:05Z", table.Meta(MetadataKeys.TestStart));
    }

    [Fact]
    public void A_hash_line_without_a_colon_is_a_comment_and_is_ignored()
    {
        var text = "# exported by stand 7\n# serial: SN-1\n#\nx,y\n1,2\n";

        var table = SweepTextParser.Parse(File, text).Value;

        var entry = Assert.Single(table.Metadata);
        Assert.Equal("serial", entry.Key);
        Assert.Equal(2, entry.Line);
        Assert.Equal(4, table.HeaderLine);
    }

    [Fact]
    public void Crlf_line_ends_are_accepted_and_leave_no_carriage_return_in_cells_or_values()
    {
        var text = "# serial: SN-1\r\nx,y\r\n1,2\r\n3,4\r\n";

        var table = SweepTextParser.Parse(File, text).Value;

        Assert.Equal("SN-1", table.Meta(MetadataKeys.Serial));
        Assert.Equal<string>(["x", "y"], table.Header);
        Assert.Equal<string>(["3", "4"], table.Rows[1].Cells);
        Assert.Equal([3, 4], table.Rows.Select(r => r.Line));
    }

    [Fact]
    public void Blank_lines_inside_and_after_the_data_are_skipped_but_still_counted()
    {
        var text = "x,y\n1,2\n\n   \n3,4\n\n\r\n\n";

        var table = SweepTextParser.Parse(File, text).Value;

        Assert.Equal([2, 5], table.Rows.Select(r => r.Line));
    }

    [Fact]
    public void Cells_are_trimmed_of_surrounding_spaces()
    {
        var table = SweepTextParser.Parse(File, " x , y \n 1 ,\t2 \n").Value;

        Assert.Equal<string>(["x", "y"], table.Header);
        Assert.Equal<string>(["1", "2"], table.Rows[0].Cells);
    }

    [Fact]
    public void Empty_text_is_rejected_as_input_empty()
    {
        var problem = SingleProblem(SweepTextParser.Parse(File, ""));

        Assert.Equal("input.empty", problem.Code);
        Assert.Equal(SourceLocation.WholeFile(File), problem.Location);
    }

    [Fact]
    public void Text_of_only_blank_lines_is_rejected_as_input_empty()
    {
        var problem = SingleProblem(SweepTextParser.Parse(File, "\n  \r\n\t\n"));

        Assert.Equal(ReasonCodes.InputEmpty.Code, problem.Code);
    }

    [Fact]
    public void Metadata_and_a_header_without_rows_is_rejected_as_input_no_rows_at_the_header_line()
    {
        var problem = SingleProblem(SweepTextParser.Parse(File, "# serial: SN-1\n# part: KP-250\nx,y\n\n"));

        Assert.Equal("input.no_rows", problem.Code);
        Assert.Equal(3, problem.Location.Line);
    }

    [Fact]
    public void Metadata_without_a_header_is_rejected_as_input_no_header()
    {
        var problem = SingleProblem(SweepTextParser.Parse(File, "# serial: SN-1\n# part: KP-250\n"));

        Assert.Equal("input.no_header", problem.Code);
    }

    [Fact]
    public void A_row_with_too_few_cells_is_rejected_as_input_wrong_column_count_at_its_line()
    {
        var problem = SingleProblem(SweepTextParser.Parse(File, "# serial: SN-1\nx,y,leg\n1,2,up\n3,4\n5,6,down\n"));

        Assert.Equal("input.wrong_column_count", problem.Code);
        Assert.Equal(4, problem.Location.Line);
        Assert.Contains("2 cells", problem.Message, StringComparison.Ordinal);
        Assert.Contains("3 columns", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_row_with_too_many_cells_is_rejected_as_input_wrong_column_count_at_its_line()
    {
        var problem = SingleProblem(SweepTextParser.Parse(File, "x,y\r\n1,2\r\n3,4,5\r\n"));

        Assert.Equal(ReasonCodes.InputWrongColumnCount.Code, problem.Code);
        Assert.Equal(3, problem.Location.Line);
    }

    [Fact]
    public void A_column_name_given_twice_in_any_case_is_rejected_with_the_line_and_column_of_the_repeat()
    {
        var problem = SingleProblem(SweepTextParser.Parse(File, "# serial: SN-1\npressure,output,Pressure\n1,2,3\n"));

        Assert.Equal("input.duplicate_column", problem.Code);
        Assert.Equal(SourceLocation.At(File, 2, 3), problem.Location);
        Assert.Contains("first as column 1", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void An_empty_column_name_is_rejected_with_its_column()
    {
        var problem = SingleProblem(SweepTextParser.Parse(File, "x,,y\n1,2,3\n"));

        Assert.Equal(ReasonCodes.InputNoHeader.Code, problem.Code);
        Assert.Equal(SourceLocation.At(File, 1, 2), problem.Location);
    }

    [Fact]
    public void A_metadata_key_repeated_with_a_different_value_is_rejected_at_the_repeat()
    {
        var problem = SingleProblem(SweepTextParser.Parse(File, "# serial: SN-1\n# part: KP-250\n# Serial: SN-2\nx,y\n1,2\n"));

        Assert.Equal("input.duplicate_metadata", problem.Code);
        Assert.Equal(SourceLocation.At(File, 3, 1), problem.Location);
        Assert.Contains("first on line 1", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_metadata_key_repeated_with_the_same_value_is_accepted_once()
    {
        var table = SweepTextParser.Parse(File, "# serial: SN-1\n# SERIAL:   SN-1  \nx,y\n1,2\n").Value;

        var entry = Assert.Single(table.Metadata);
        Assert.Equal("SN-1", entry.Value);
        Assert.Equal(1, entry.Line);
    }

    [Fact]
    public void A_metadata_line_with_an_empty_key_is_rejected_as_input_bad_metadata()
    {
        var problem = SingleProblem(SweepTextParser.Parse(File, "# : value\nx,y\n1,2\n"));

        Assert.Equal("input.bad_metadata", problem.Code);
        Assert.Equal(SourceLocation.At(File, 1, 1), problem.Location);
    }

    [Fact]
    public void A_line_over_the_limit_is_rejected_as_input_line_too_long_at_its_line()
    {
        var longRow = new string('1', SweepTextParser.MaxLineLength + 1);
        var problem = SingleProblem(SweepTextParser.Parse(File, "x\n1\n" + longRow + "\n"));

        Assert.Equal("input.line_too_long", problem.Code);
        Assert.Equal(3, problem.Location.Line);
    }

    [Fact]
    public void A_line_exactly_at_the_limit_is_accepted_and_its_carriage_return_does_not_count()
    {
        var longCell = new string('1', SweepTextParser.MaxLineLength);

        var table = SweepTextParser.Parse(File, "x\r\n" + longCell + "\r\n").Value;

        Assert.Equal(SweepTextParser.MaxLineLength, Assert.Single(table.Rows).Cells[0].Length);
    }

    [Fact]
    public void A_last_row_without_its_line_end_is_refused_as_truncated()
    {
        // Cut in the middle of the last number: "10.0" would otherwise read as a valid reading.
        var problem = SingleProblem(SweepTextParser.Parse(File, "x,y\n0,0.01\n50,10.0"));

        Assert.Equal("input.truncated", problem.Code);
        Assert.Equal(3, problem.Location.Line);
    }

    [Fact]
    public void A_semicolon_export_read_with_the_standard_format_is_refused_as_the_wrong_separator()
    {
        var problem = SingleProblem(SweepTextParser.Parse(File, "step;pressure_kPa;output_mV\n1;0,0;0,01\n"));

        Assert.Equal("input.wrong_separator", problem.Code);
    }

    [Fact]
    public void A_decimal_comma_format_splits_cells_on_semicolons()
    {
        var table = SweepTextParser.Parse(File, "x;y\n0,5;1,25\n", SweepFormat.DecimalComma).Value;

        Assert.Equal(["0,5", "1,25"], table.Rows[0].Cells.ToArray());
    }
}
