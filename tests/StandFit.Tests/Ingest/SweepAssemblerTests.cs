using StandFit.Core.Ingest;
using StandFit.Core.Problems;

namespace StandFit.Tests.Ingest;

public sealed class SweepAssemblerTests
{
    private const string File = "SN-1001.csv";

    private static readonly ColumnMap Columns = new("pressure_kPa", "output_mV", "leg", "step");

    private static readonly ColumnMap PlainColumns = new("pressure_kPa", "output_mV");

    // Raw string literals end without a line end; a stand's file ends with one (the parser refuses a cut-off last row).
    private static SweepTable Table(string text, string file = File) => SweepTextParser.Parse(file, text.EndsWith('\n') ? text : text + "\n").Value;

    private static Problem SingleProblem<T>(Result<T> result)
    {
        Assert.False(result.IsSuccess);
        return Assert.Single(result.Problems);
    }

    [Fact]
    public void A_well_formed_sweep_is_assembled_with_numbers_legs_lines_and_identity()
    {
        var table = Table("""
            # serial: SN-77
            # part: KP-250
            # station: ST-3
            pressure_kPa,output_mV,leg,step
            0,0.01,up,1
            50,10.02,up,2
            100,20.00,down,3
            """);

        var sweep = SweepAssembler.Assemble(table, Columns).Value;

        Assert.Equal(3, sweep.Count);
        Assert.Equal<double>([0.0, 50.0, 100.0], sweep.Stimulus);
        Assert.Equal<double>([0.01, 10.02, 20.00], sweep.Output);
        Assert.Equal<Leg>([Leg.Up, Leg.Up, Leg.Down], sweep.Legs);
        Assert.Equal<int>([5, 6, 7], sweep.SourceLines);
        Assert.Equal(new UnitIdentity("SN-77", "KP-250", "ST-3", null), sweep.Identity);
        Assert.Equal(3, sweep.Metadata.Length);
    }

    [Theory]
    [InlineData("1.5e-3", 0.0015)]
    [InlineData("-2.5E+2", -250.0)]
    [InlineData("+7", 7.0)]
    [InlineData(".5", 0.5)]
    [InlineData("1e3", 1000.0)]
    public void Numbers_are_read_in_invariant_culture_with_decimal_point_and_exponent(string cell, double expected)
    {
        var table = Table($"pressure_kPa,output_mV\n1,{cell}\n2,0\n");

        var sweep = SweepAssembler.Assemble(table, PlainColumns).Value;

        Assert.Equal(expected, sweep.Output[0]);
    }

    [Theory]
    [InlineData("1 000")]
    [InlineData("abc")]
    [InlineData("")]
    [InlineData("0x10")]
    [InlineData("1.2.3")]
    public void A_cell_that_is_not_a_number_is_rejected_as_input_bad_number_with_line_and_column(string cell)
    {
        var table = Table($"# serial: SN-1\npressure_kPa,output_mV\n0,0\n10,{cell}\n");

        var problem = SingleProblem(SweepAssembler.Assemble(table, PlainColumns));

        Assert.Equal("input.bad_number", problem.Code);
        Assert.Equal(SourceLocation.At(File, 4, 2), problem.Location);
        Assert.Contains("'output_mV'", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_bad_number_in_the_order_column_is_reported_at_that_column()
    {
        var table = Table("pressure_kPa,output_mV,leg,step\n0,0,up,one\n");

        var problem = SingleProblem(SweepAssembler.Assemble(table, Columns));

        Assert.Equal(ReasonCodes.InputBadNumber.Code, problem.Code);
        Assert.Equal(SourceLocation.At(File, 2, 4), problem.Location);
    }

    [Theory]
    [InlineData("NaN")]
    [InlineData("Infinity")]
    [InlineData("-Infinity")]
    [InlineData("1e999")]
    public void A_non_finite_cell_is_rejected_as_input_non_finite_with_line_and_column(string cell)
    {
        var table = Table($"pressure_kPa,output_mV\n0,0\n{cell},1\n");

        var problem = SingleProblem(SweepAssembler.Assemble(table, PlainColumns));

        Assert.Equal("input.non_finite", problem.Code);
        Assert.Equal(SourceLocation.At(File, 3, 1), problem.Location);
    }

    [Fact]
    public void Legs_up_and_down_are_read_in_any_case()
    {
        var table = Table("pressure_kPa,output_mV,leg,step\n0,0,UP,1\n1,1,Up,2\n2,2,DOWN,3\n3,3,down,4\n");

        var sweep = SweepAssembler.Assemble(table, Columns).Value;

        Assert.Equal<Leg>([Leg.Up, Leg.Up, Leg.Down, Leg.Down], sweep.Legs);
    }

    [Fact]
    public void Without_a_leg_column_every_point_has_an_unknown_leg()
    {
        var sweep = SweepAssembler.Assemble(Table("pressure_kPa,output_mV\n0,0\n1,1\n"), PlainColumns).Value;

        Assert.All(sweep.Legs, leg => Assert.Equal(Leg.Unknown, leg));
    }

    [Theory]
    [InlineData("sideways")]
    [InlineData("u")]
    [InlineData("upward")]
    [InlineData("")]
    public void Any_other_leg_text_is_rejected_as_input_bad_leg_at_its_cell(string leg)
    {
        var table = Table($"pressure_kPa,output_mV,leg,step\n0,0,up,1\n1,1,{leg},2\n");

        var problem = SingleProblem(SweepAssembler.Assemble(table, Columns));

        Assert.Equal("input.bad_leg", problem.Code);
        Assert.Equal(SourceLocation.At(File, 3, 3), problem.Location);
    }

    [Fact]
    public void A_missing_stimulus_column_is_rejected_naming_the_column_at_the_header_line()
    {
        var table = Table("# serial: SN-1\npressure,output_mV\n0,0\n");

        var problem = SingleProblem(SweepAssembler.Assemble(table, PlainColumns));

        Assert.Equal("input.missing_column", problem.Code);
        Assert.Equal(2, problem.Location.Line);
        Assert.Contains("stimulus column 'pressure_kPa'", problem.Message, StringComparison.Ordinal);
        Assert.Contains("(pressure, output_mV)", problem.Message, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("pressure_kPa,mV,leg,step", "output column 'output_mV'")]
    [InlineData("pressure_kPa,output_mV,direction,step", "leg column 'leg'")]
    [InlineData("pressure_kPa,output_mV,leg,index", "order column 'step'")]
    public void Each_missing_column_the_recipe_names_is_rejected_naming_it(string header, string named)
    {
        var table = Table(header + "\n0,0,up,1\n");

        var problem = SingleProblem(SweepAssembler.Assemble(table, Columns));

        Assert.Equal(ReasonCodes.InputMissingColumn.Code, problem.Code);
        Assert.Contains(named, problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Column_names_are_matched_without_regard_to_case()
    {
        var sweep = SweepAssembler.Assemble(Table("PRESSURE_KPA,Output_mV\n0,1\n"), PlainColumns);

        Assert.True(sweep.IsSuccess);
    }

    [Fact]
    public void The_order_column_puts_points_in_acquisition_order_keeping_file_order_for_ties()
    {
        var table = Table("""
            pressure_kPa,output_mV,leg,step
            30,3,up,3
            10,1,up,1
            20,2,up,2
            11,1.1,down,1
            40,4,down,4
            """);

        var sweep = SweepAssembler.Assemble(table, Columns).Value;

        Assert.Equal<double>([10.0, 11.0, 20.0, 30.0, 40.0], sweep.Stimulus);
        Assert.Equal<double>([1.0, 1.1, 2.0, 3.0, 4.0], sweep.Output);
        Assert.Equal<Leg>([Leg.Up, Leg.Down, Leg.Up, Leg.Up, Leg.Down], sweep.Legs);
        Assert.Equal<int>([3, 5, 4, 2, 6], sweep.SourceLines);
    }

    [Fact]
    public void Without_an_order_column_points_stay_in_file_order()
    {
        var sweep = SweepAssembler.Assemble(Table("pressure_kPa,output_mV\n30,3\n10,1\n20,2\n"), PlainColumns).Value;

        Assert.Equal<double>([30.0, 10.0, 20.0], sweep.Stimulus);
        Assert.Equal<int>([2, 3, 4], sweep.SourceLines);
    }

    [Fact]
    public void The_serial_comes_from_metadata_when_given()
    {
        var identity = SweepAssembler.ReadIdentity(Table("# serial: SN-META\nx,y\n1,2\n", "SN-FILE.csv")).Value;

        Assert.Equal("SN-META", identity.Serial);
    }

    [Fact]
    public void Without_serial_metadata_the_serial_is_the_file_name_without_extension()
    {
        var identity = SweepAssembler.ReadIdentity(Table("# part: KP-250\nx,y\n1,2\n", "SN-42.csv")).Value;

        Assert.Equal("SN-42", identity.Serial);
        Assert.Equal("KP-250", identity.Part);
        Assert.Null(identity.Station);
        Assert.Null(identity.TestStartUtc);
    }

    [Theory]
    [InlineData("A/B")]
    [InlineData("A\\B")]
    [InlineData("A\tB")]
    [InlineData("A\u0007B")]
    [InlineData("A:B")]
    [InlineData("..")]
    public void A_serial_with_a_separator_or_control_character_is_rejected_as_input_bad_serial_at_its_line(string serial)
    {
        var table = Table($"# part: KP-250\n# serial: {serial}\nx,y\n1,2\n");

        var problem = SingleProblem(SweepAssembler.ReadIdentity(table));

        Assert.Equal("input.bad_serial", problem.Code);
        Assert.Equal(2, problem.Location.Line);
        Assert.DoesNotContain('\t', problem.Message);
        Assert.DoesNotContain('\u0007', problem.Message);
    }

    [Fact]
    public void A_serial_over_64_characters_is_rejected_and_one_of_exactly_64_is_accepted()
    {
        var tooLong = SweepAssembler.ReadIdentity(Table($"# serial: {new string('S', 65)}\nx,y\n1,2\n"));
        var longest = SweepAssembler.ReadIdentity(Table($"# serial: {new string('S', 64)}\nx,y\n1,2\n"));

        Assert.Equal("input.bad_serial", SingleProblem(tooLong).Code);
        Assert.Equal(64, longest.Value.Serial.Length);
    }

    [Fact]
    public void An_empty_serial_line_is_rejected_as_input_bad_serial()
    {
        var problem = SingleProblem(SweepAssembler.ReadIdentity(Table("# serial:\nx,y\n1,2\n", "SN-9.csv")));

        Assert.Equal(ReasonCodes.InputBadSerial.Code, problem.Code);
        Assert.Equal(1, problem.Location.Line);
    }

    [Fact]
    public void A_bad_serial_also_stops_assembly()
    {
        var problem = SingleProblem(SweepAssembler.Assemble(Table("# serial: a/b\npressure_kPa,output_mV\n0,0\n"), PlainColumns));

        Assert.Equal(ReasonCodes.InputBadSerial.Code, problem.Code);
    }

    [Theory]
    [InlineData("yesterday")]
    [InlineData("2026-13-40T25:00:00Z")]
    [InlineData("2026-11-30T22:14:05+25:00")]
    public void A_test_start_that_is_not_a_time_is_rejected_as_input_bad_metadata_at_its_line(string value)
    {
        var table = Table($"# serial: SN-1\n# Test Start: {value}\nx,y\n1,2\n");

        var problem = SingleProblem(SweepAssembler.ReadIdentity(table));

        Assert.Equal("input.bad_metadata", problem.Code);
        Assert.Equal(2, problem.Location.Line);
    }

    [Fact]
    public void An_iso_test_start_with_an_offset_is_converted_to_utc()
    {
        var identity = SweepAssembler.ReadIdentity(Table("# serial: SN-1\n# Test Start: 2026-11-30T23:14:05+01:00\nx,y\n1,2\n")).Value;

        Assert.Equal(new DateTime(2026, 11, 30, 22, 14, 5, DateTimeKind.Utc), identity.TestStartUtc);
        Assert.Equal(DateTimeKind.Utc, identity.TestStartUtc!.Value.Kind);
    }

    [Fact]
    public void An_iso_test_start_with_a_negative_offset_crossing_midnight_is_converted_to_utc()
    {
        var identity = SweepAssembler.ReadIdentity(Table("# serial: SN-1\n# test_start: 2026-11-30T20:00:00-05:00\nx,y\n1,2\n")).Value;

        Assert.Equal(new DateTime(2026, 12, 1, 1, 0, 0, DateTimeKind.Utc), identity.TestStartUtc);
    }

    [Fact]
    public void An_iso_test_start_in_utc_is_kept_as_is()
    {
        var identity = SweepAssembler.ReadIdentity(Table("# serial: SN-1\n# test start: 2026-11-30T22:14:05Z\nx,y\n1,2\n")).Value;

        Assert.Equal(new DateTime(2026, 11, 30, 22, 14, 5, DateTimeKind.Utc), identity.TestStartUtc);
    }

    [Fact]
    public void An_iso_test_start_without_a_zone_is_rejected_rather_than_guessed()
    {
        var identity = SweepAssembler.ReadIdentity(Table("# serial: SN-1\n# test start: 2026-11-30T22:14:05\nx,y\n1,2\n"));

        Assert.False(identity.IsSuccess);
        Assert.Equal("input.bad_metadata", identity.Problems[0].Code);
        Assert.Equal(2, identity.Problems[0].Location.Line);
    }

    [Theory]
    [InlineData("01/12/2026 08:00")]
    [InlineData("22:14")]
    [InlineData("Nov 30 2026")]
    public void A_test_start_that_is_not_iso_8601_is_rejected_as_input_bad_metadata(string value)
    {
        var table = Table($"# serial: SN-1\n# test start: {value}\nx,y\n1,2\n");

        var problem = SingleProblem(SweepAssembler.ReadIdentity(table));

        Assert.Equal("input.bad_metadata", problem.Code);
        Assert.Equal(2, problem.Location.Line);
    }

    [Fact]
    public void Shown_makes_control_characters_visible_and_cuts_long_text()
    {
        Assert.Equal("a\\u000ab", SweepAssembler.Shown("a\nb"));
        Assert.Equal(new string('x', 40) + "...", SweepAssembler.Shown(new string('x', 100)));
    }

    [Fact]
    public void A_decimal_comma_is_read_where_the_format_declares_it_and_a_decimal_point_is_then_refused()
    {
        var good = SweepAssembler.Assemble(SweepTextParser.Parse(File, "pressure_kPa;output_mV\n0,5;1,25\n2;3,5\n", SweepFormat.DecimalComma).Value, PlainColumns, SweepFormat.DecimalComma);
        Assert.Equal([0.5, 2.0], good.Value.Stimulus.ToArray());
        Assert.Equal([1.25, 3.5], good.Value.Output.ToArray());

        var point = SingleProblem(SweepAssembler.Assemble(SweepTextParser.Parse(File, "pressure_kPa;output_mV\n0.5;1,25\n", SweepFormat.DecimalComma).Value, PlainColumns, SweepFormat.DecimalComma));
        Assert.Equal("input.bad_number", point.Code);
        Assert.Contains("decimal comma", point.Message, StringComparison.Ordinal);

        var thousands = SingleProblem(SweepAssembler.Assemble(SweepTextParser.Parse(File, "pressure_kPa;output_mV\n1.000,5;1,25\n", SweepFormat.DecimalComma).Value, PlainColumns, SweepFormat.DecimalComma));
        Assert.Equal("input.bad_number", thousands.Code);
    }
}
