namespace StandFit.Core.Judging;

/// <summary>
/// Specification limits on one figure (a parameter such as gain or offset, a derived figure, an
/// uncertainty or a diagnostic), in the figure's own units, with the decision rule that applies.
/// Either bound may be open. Limits are inclusive: a value on a limit conforms. A guarded limit
/// without a <see cref="Guard"/> uses the recipe's confidence level.
/// </summary>
public sealed record FigureLimit
{
    public FigureLimit(string figure, double? min, double? max)
    {
        ArgumentException.ThrowIfNullOrWhiteSpace(figure);
        if (min is null && max is null)
        {
            throw new ArgumentException("A limit needs a min, a max or both.");
        }

        if (min is { } lo && max is { } hi && lo > hi)
        {
            throw new ArgumentException("A limit's min must not be above its max.");
        }

        Figure = figure;
        Min = min;
        Max = max;
    }

    public string Figure { get; }

    public double? Min { get; }

    public double? Max { get; }

    public DecisionRule Rule { get; init; } = DecisionRule.Guarded;

    /// <summary>The guard band of a guarded limit; null means the recipe's confidence level.</summary>
    public GuardBand? Guard { get; init; }

    /// <summary>The interval a guarded limit judges: the t interval (default) or one from resampling.</summary>
    public IntervalSource Interval { get; init; } = IntervalSource.T;
}
