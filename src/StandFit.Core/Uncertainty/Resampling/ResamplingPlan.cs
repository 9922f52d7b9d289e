namespace StandFit.Core.Uncertainty.Resampling;

/// <summary>How bootstrap resamples are drawn from a fitted sweep.</summary>
public enum BootstrapScheme
{
    /// <summary>Pairs (cases): n points drawn with replacement, each with its stimulus and output.</summary>
    Pairs,

    /// <summary>Residual: set points kept, outputs fitted value plus a leverage-adjusted, centred residual drawn with replacement.</summary>
    Residual,

    /// <summary>Wild, Rademacher weights: set points kept, each leverage-adjusted residual multiplied by +1 or -1 (probability 1/2 each).</summary>
    WildRademacher,

    /// <summary>Wild, Mammen's two-point weights: -(sqrt 5 - 1)/2 with probability (sqrt 5 + 1)/(2 sqrt 5), else (sqrt 5 + 1)/2.</summary>
    WildMammen,
}

/// <summary>What the jackknife leaves out.</summary>
public enum JackknifeGroups
{
    /// <summary>One point at a time.</summary>
    DeleteOne,

    /// <summary>One leg at a time: a maximal run of consecutive points (acquisition order) with the same leg label.</summary>
    DeleteLeg,

    /// <summary>One repeat of the sweep at a time: the k-th leg together with the leg that follows it (legs 1+2, 3+4, ...).</summary>
    DeleteCycle,
}

/// <summary>
/// The recipe's resampling section (<c>resampling:</c>): the seed every draw starts from, the
/// bootstrap scheme and number of resamples, the jackknife's groups and the failure budget.
/// </summary>
public sealed record ResamplingPlan
{
    /// <summary>The number of bootstrap resamples when the recipe does not state it.</summary>
    public const int DefaultResamples = 1000;

    public ResamplingPlan(ulong seed)
    {
        Seed = seed;
    }

    /// <summary>The recipe's seed; each unit's stream seed is derived from it and the unit's identity (<see cref="StreamSeed"/>).</summary>
    public ulong Seed { get; }

    /// <summary>The bootstrap scheme, or null for no bootstrap (jackknife only).</summary>
    public BootstrapScheme? Bootstrap { get; init; }

    /// <summary>Bootstrap resamples B.</summary>
    public int Resamples { get; init; } = DefaultResamples;

    /// <summary>True when the recipe states <see cref="Resamples"/> (required when a limit uses a bootstrap interval).</summary>
    public bool ResamplesStated { get; init; }

    /// <summary>What the reported jackknife leaves out (the delete-one jackknife is always computed too: it gives the BCa acceleration and the influence of each point).</summary>
    public JackknifeGroups Jackknife { get; init; } = JackknifeGroups.DeleteOne;

    /// <summary>When set, more failed resamples than this percentage of B is a reason on the ruling (retest).</summary>
    public double? MaxFailedPercent { get; init; }

    public static string SchemeName(BootstrapScheme scheme) => scheme switch
    {
        BootstrapScheme.Pairs => "pairs",
        BootstrapScheme.Residual => "residual",
        BootstrapScheme.WildRademacher => "wild-rademacher",
        _ => "wild-mammen",
    };

    public static string JackknifeName(JackknifeGroups groups) => groups switch
    {
        JackknifeGroups.DeleteOne => "delete-one",
        JackknifeGroups.DeleteLeg => "delete-leg",
        _ => "delete-cycle",
    };
}
