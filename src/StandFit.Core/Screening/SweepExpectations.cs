using System.Collections.Immutable;
using StandFit.Core.Ingest;

namespace StandFit.Core.Screening;

/// <summary>The stimulus range a sweep is meant to cover, in stimulus units (Min &lt; Max).</summary>
public sealed record StimulusRange
{
    public StimulusRange(double min, double max)
    {
        if (!(max > min))
        {
            throw new ArgumentException("A range's max must be above its min.");
        }

        Min = min;
        Max = max;
    }

    public double Min { get; }

    public double Max { get; }
}

/// <summary>
/// What a good sweep looks like, checked before any fit (the data-quality gates). Every member is
/// optional: null or empty means "not checked".
/// </summary>
public sealed record SweepExpectations
{
    public static SweepExpectations None { get; } = new();

    /// <summary>At least this many points.</summary>
    public int? MinPoints { get; init; }

    /// <summary>The nominal stimulus range (needed for <see cref="SpanPercent"/>).</summary>
    public StimulusRange? Range { get; init; }

    /// <summary>The measured stimulus span must cover at least this % of <see cref="Range"/> (0 to 100].</summary>
    public double? SpanPercent { get; init; }

    /// <summary>Legs that must be present (needs a leg column).</summary>
    public ImmutableArray<Leg> Legs { get; init; } = [];

    /// <summary>When set, within each leg the stimulus must move one way (up legs rising, down legs falling), allowing reversals up to this tolerance in stimulus units.</summary>
    public double? MonotonicTolerance { get; init; }

    /// <summary>When set, a run of this many identical output values at the lowest or highest output marks a clipped or saturated output.</summary>
    public int? SaturationRun { get; init; }

    /// <summary>When true, two points with identical stimulus, output and leg mark a duplicated row.</summary>
    public bool RejectDuplicateRows { get; init; }
}
