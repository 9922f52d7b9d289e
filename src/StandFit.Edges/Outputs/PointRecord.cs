using System.Text.Json.Serialization;
using Parquet.Serialization.Attributes;

namespace StandFit.Edges.Outputs;

/// <summary>
/// One row of the per-point table (output/points/date=YYYY-MM-DD/*.parquet): one sweep point of a
/// fitted unit, with its fitted value, residual, confidence band and influence figures. Published
/// in the same atomic step as the batch's summary rows (same file names, under points/ instead of
/// summaries/), so a unit has either all its points and its summary row, or neither.
/// docs/outputs.md documents every column; an approval test pins the schema.
/// </summary>
public sealed class PointRecord
{
    /// <summary>Bumped whenever a column is added, removed or changes meaning.</summary>
    public const int CurrentSchemaVersion = 1;

    [JsonPropertyName("schema_version")]
    public int SchemaVersion { get; set; } = CurrentSchemaVersion;

    /// <summary>The unit's row key in the summary table.</summary>
    [JsonPropertyName("unit_key")]
    [ParquetRequired]
    public string UnitKey { get; set; } = "";

    /// <summary>The point's place in acquisition order, from 1.</summary>
    [JsonPropertyName("point")]
    public int Point { get; set; }

    /// <summary>The 1-based line of the sweep file the point came from.</summary>
    [JsonPropertyName("source_line")]
    public int SourceLine { get; set; }

    /// <summary><c>up</c>, <c>down</c>, or null when the recipe names no leg column.</summary>
    [JsonPropertyName("leg")]
    public string? Leg { get; set; }

    /// <summary>The first (or only) input.</summary>
    [JsonPropertyName("stimulus")]
    public double Stimulus { get; set; }

    /// <summary>Every input after the first, in the recipe's order; empty for a model of one input.</summary>
    [JsonPropertyName("further_inputs")]
    public List<double> FurtherInputs { get; set; } = [];

    /// <summary>The output reading as the sweep file holds it.</summary>
    [JsonPropertyName("output")]
    public double Output { get; set; }

    /// <summary>What the model fitted: the output, or the model's transform of it (1/T for Steinhart-Hart).</summary>
    [JsonPropertyName("response")]
    public double Response { get; set; }

    /// <summary>The reading's standard uncertainty in a weighted fit; null when the fit is unweighted.</summary>
    [JsonPropertyName("uncertainty")]
    public double? Uncertainty { get; set; }

    [JsonPropertyName("fitted")]
    public double Fitted { get; set; }

    /// <summary>Response minus fitted value.</summary>
    [JsonPropertyName("residual")]
    public double Residual { get; set; }

    /// <summary>Low end of the confidence band of the mean curve at the point, at the recipe's confidence.</summary>
    [JsonPropertyName("band_low")]
    public double BandLow { get; set; }

    [JsonPropertyName("band_high")]
    public double BandHigh { get; set; }

    [JsonPropertyName("leverage")]
    public double Leverage { get; set; }

    /// <summary>The externally studentized residual (rstudent); null where it is not defined (leverage 1, or df below 2).</summary>
    [JsonPropertyName("studentized_residual")]
    public double? StudentizedResidual { get; set; }

    [JsonPropertyName("cooks_distance")]
    public double? CooksDistance { get; set; }
}
