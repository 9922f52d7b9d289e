namespace StandFit.Core.Judging;

/// <summary>Which interval a guarded limit compares with its limits.</summary>
public enum IntervalSource
{
    /// <summary>The Student-t interval estimate +/- t u (or the coverage factor's k u): the default.</summary>
    T,

    /// <summary>estimate +/- t(level, g - 1) SE_jack from the recipe's jackknife (g deletions).</summary>
    Jackknife,

    /// <summary>The bootstrap percentile interval at the recipe's confidence.</summary>
    BootstrapPercentile,

    /// <summary>The basic bootstrap interval at the recipe's confidence.</summary>
    BootstrapBasic,

    /// <summary>The bootstrap BCa interval at the recipe's confidence.</summary>
    BootstrapBca,
}

/// <summary>An interval of a figure from resampling, with the words that say how it was formed.</summary>
public sealed record FigureInterval(IntervalSource Source, double Low, double High, string Basis);

public static class IntervalSources
{
    /// <summary>The recipe's name of each interval (<c>decision.interval</c>, <c>limits.&lt;figure&gt;.interval</c>).</summary>
    public static string Name(IntervalSource source) => source switch
    {
        IntervalSource.T => "t",
        IntervalSource.Jackknife => "jackknife",
        IntervalSource.BootstrapPercentile => "bootstrap-percentile",
        IntervalSource.BootstrapBasic => "bootstrap-basic",
        _ => "bootstrap-bca",
    };

    public static bool IsBootstrap(IntervalSource source) => source is IntervalSource.BootstrapPercentile or IntervalSource.BootstrapBasic or IntervalSource.BootstrapBca;
}
