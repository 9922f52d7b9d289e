using System.Collections.Immutable;
using StandFit.Core.Judging;

namespace StandFit.Core.Reporting;

/// <summary>What one limit decided for a unit, as the summary's <c>limit_results</c> holds it.</summary>
public sealed record ReportedLimit(string Figure, double Value, double Low, double High, double? Min, double? Max, string Rule, string Zone, string Interval);

/// <summary>One summary row, with the columns the morning report reads.</summary>
public sealed record ReportedUnit
{
    public required string UnitKey { get; init; }

    public string? RetestOf { get; init; }

    public string? Serial { get; init; }

    public string? Part { get; init; }

    public string? Station { get; init; }

    /// <summary>The unit's test start (UTC), when the file gave one.</summary>
    public DateTime? TestStart { get; init; }

    /// <summary>When the unit's batch was judged (UTC).</summary>
    public DateTime ProcessedAt { get; init; }

    public string SourceFile { get; init; } = "";

    public string? RecipeName { get; init; }

    public string? RecipeVersion { get; init; }

    public string? Model { get; init; }

    public double? Confidence { get; init; }

    public int? Points { get; init; }

    public Ruling Ruling { get; init; }

    public ImmutableArray<string> ReasonCodes { get; init; } = [];

    /// <summary>One sentence for each code, with the unit's numbers.</summary>
    public ImmutableArray<string> Reasons { get; init; } = [];

    public ImmutableArray<ReportedLimit> Limits { get; init; } = [];

    public double? Gain { get; init; }

    public double? GainCiLow { get; init; }

    public double? GainCiHigh { get; init; }

    /// <summary>The gain's unit (for example <c>mV/kPa</c>), or empty.</summary>
    public string GainUnit { get; init; } = "";

    public double? Offset { get; init; }

    public double? OffsetCiLow { get; init; }

    public double? OffsetCiHigh { get; init; }

    public string OffsetUnit { get; init; } = "";

    public double? ResidualSd { get; init; }

    public double? RSquared { get; init; }

    public ImmutableArray<double> HistogramEdges { get; init; } = [];

    public ImmutableArray<int> HistogramCounts { get; init; } = [];

    /// <summary>The moment the unit is placed at in test order: its test start, or else its processing time.</summary>
    public DateTime TestOrderTime => TestStart ?? ProcessedAt;
}

/// <summary>One sweep point of a fitted unit, as the per-point table holds it (<paramref name="HasFurtherInputs"/>: the model has inputs besides the stimulus).</summary>
public sealed record ReportedPoint(int Point, int SourceLine, string? Leg, double Stimulus, bool HasFurtherInputs, double Response, double Fitted, double Residual, double BandLow, double BandHigh, double? Studentized);

/// <summary>One row of the runs table.</summary>
public sealed record ReportedRun(string RunId, string Command, string WorkerId, string State, DateTime StartedAt, DateTime EndedAt, string ToolVersion, string ConfigHash, int Processed, int Pass, int Fail, int Retest, int Rejected, int Duplicate);

/// <summary>Everything one morning report is made of: the rows in its date range and what it says about itself.</summary>
public sealed record ReportData
{
    /// <summary>The first partition date read (inclusive), or null for no lower bound.</summary>
    public DateOnly? From { get; init; }

    /// <summary>The last partition date read (inclusive), or null for no upper bound.</summary>
    public DateOnly? To { get; init; }

    /// <summary>When the report was made (UTC).</summary>
    public DateTime GeneratedAt { get; init; }

    public string ToolVersion { get; init; } = "";

    /// <summary>Every summary row in the range, in no particular order.</summary>
    public ImmutableArray<ReportedUnit> Rows { get; init; } = [];

    /// <summary>The points of the units drawn in detail, by unit key.</summary>
    public ImmutableDictionary<string, ImmutableArray<ReportedPoint>> Points { get; init; } = ImmutableDictionary<string, ImmutableArray<ReportedPoint>>.Empty;

    /// <summary>The runs that started in the range.</summary>
    public ImmutableArray<ReportedRun> Runs { get; init; } = [];

    /// <summary>Files that could not be read, with why (shown in the report, never silently left out).</summary>
    public ImmutableArray<string> Unreadable { get; init; } = [];
}
