using StandFit.Core.Ingest;
using StandFit.Core.Problems;

namespace StandFit.Tests.Ingest;

/// <summary>Several stimulus columns and the uncertainty column, as docs/recipes.md ("Recipe keys") describes them.</summary>
public sealed class SweepAssemblerInputsTests
{
    private const string Text = """
        # serial: PS-9
        step,pressure_kPa,temp_C,output_mV,u_mV
        2,100,25,2.01,0.002
        1,0,25,0.01,0.001
        3,200,-10,3.98,0.003
        """;

    private static SweepTable Table(string text = Text) => SweepTextParser.Parse("PS-9.csv", text.EndsWith('\n') ? text : text + "\n").Value;

    [Fact]
    public void Every_stimulus_column_and_the_uncertainty_column_are_read_and_ordered_together()
    {
        var columns = new ColumnMap(["pressure_kPa", "TEMP_C"], "output_mV", order: "step", uncertainty: "u_mV");

        var sweep = SweepAssembler.Assemble(Table(), columns).Value;

        Assert.Equal(2, sweep.Inputs.Length);
        Assert.Equal<double>([0, 100, 200], sweep.Inputs[0]);
        Assert.Equal<double>([25, 25, -10], sweep.Inputs[1]);
        Assert.Equal<double>([0.001, 0.002, 0.003], sweep.Uncertainties);
        Assert.Equal<int>([4, 3, 5], sweep.SourceLines);
        Assert.Equal<double>(sweep.Inputs[0], sweep.Stimulus);
    }

    [Fact]
    public void A_missing_second_stimulus_column_is_reported_as_a_missing_stimulus_column()
    {
        var result = SweepAssembler.Assemble(Table(), new ColumnMap(["pressure_kPa", "temp_K"], "output_mV"));

        var problem = Assert.Single(result.Problems);
        Assert.Equal(ReasonCodes.InputMissingColumn.Code, problem.Code);
        Assert.Contains("stimulus column 'temp_K'", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_missing_uncertainty_column_is_reported_by_its_role()
    {
        var result = SweepAssembler.Assemble(Table(), new ColumnMap("pressure_kPa", "output_mV", uncertainty: "u_V"));

        var problem = Assert.Single(result.Problems);
        Assert.Equal(ReasonCodes.InputMissingColumn.Code, problem.Code);
        Assert.Contains("uncertainty column 'u_V'", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_negative_uncertainty_is_rejected_at_its_cell()
    {
        var text = Text.Replace("0.003", "-0.003", StringComparison.Ordinal);

        var result = SweepAssembler.Assemble(Table(text), new ColumnMap("pressure_kPa", "output_mV", uncertainty: "u_mV"));

        var problem = Assert.Single(result.Problems);
        Assert.Equal(ReasonCodes.InputBadUncertainty.Code, problem.Code);
        Assert.Equal(SourceLocation.At("PS-9.csv", 5, 5), problem.Location);
    }

    [Fact]
    public void Two_column_maps_with_the_same_columns_are_equal()
    {
        Assert.Equal(new ColumnMap(["a", "b"], "y", "leg"), new ColumnMap(["a", "b"], "y", "leg"));
        Assert.NotEqual(new ColumnMap(["a", "b"], "y"), new ColumnMap(["b", "a"], "y"));
        Assert.Equal(new ColumnMap("a", "y"), new ColumnMap(["a"], "y"));
    }
}
