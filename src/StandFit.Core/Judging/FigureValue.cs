namespace StandFit.Core.Judging;

/// <summary>
/// A figure a limit can judge: its value, its standard uncertainty and degrees of freedom when it
/// has them (parameters and derived figures do; diagnostics such as p-values do not), and its unit.
/// </summary>
public sealed record FigureValue(string Name, double Value, double? StandardUncertainty, int? DegreesOfFreedom, string Unit)
{
    public bool HasUncertainty => StandardUncertainty is not null;

    /// <summary>Intervals from resampling (jackknife, bootstrap) that a guarded limit can use instead of the t interval.</summary>
    public System.Collections.Immutable.ImmutableArray<FigureInterval> Intervals { get; init; } = [];
}

/// <summary>What a limit decided, kept with the finding for the audit trail and the summary table.</summary>
public sealed record LimitResult(
    string Figure,
    double Value,
    double ExpandedUncertainty,
    double Low,
    double High,
    double? Min,
    double? Max,
    DecisionRule Rule,
    LimitZone Zone,
    string? Conditional)
{
    /// <summary>The interval the limit judged (t unless the limit uses a resampling interval).</summary>
    public IntervalSource Interval { get; init; } = IntervalSource.T;
}
