using StandFit.Core.Uncertainty;

namespace StandFit.Core.Judging;

/// <summary>How a limit uses the uncertainty of its figure (ILAC-G8:09/2019; JCGM 106:2012).</summary>
public enum DecisionRule
{
    /// <summary>Simple acceptance: the estimate itself inside the limits passes, outside fails; no guard band.</summary>
    Simple,

    /// <summary>
    /// Guarded acceptance, non-binary: the acceptance interval is the tolerance interval narrowed by
    /// the expanded uncertainty U on each side. Estimate within the acceptance interval: pass; beyond
    /// a tolerance limit by more than U: fail; in between (the interval estimate +/- U contains a
    /// limit): undecided, ruled retest, with the conditional state (conditional pass or conditional
    /// fail) recorded.
    /// </summary>
    Guarded,
}

/// <summary>How the expanded uncertainty U of a guarded limit is formed from the figure's standard uncertainty u.</summary>
public enum GuardKind
{
    /// <summary>U = t(1 - alpha/2, df) u at a confidence level (the recipe's, unless the limit names its own).</summary>
    ConfidenceLevel,

    /// <summary>U = k u for a stated coverage factor k (k = 2 gives about 95 % for a normal, NIST TN 1297 6.2).</summary>
    CoverageFactor,
}

/// <summary>The guard band of a guarded limit. Coverage factors lie in [1, 10]; levels are <see cref="ConfidenceLevel"/>s.</summary>
public readonly record struct GuardBand
{
    private GuardBand(GuardKind kind, double value)
    {
        Kind = kind;
        Value = value;
    }

    public GuardKind Kind { get; }

    /// <summary>The confidence level (a fraction) or the coverage factor k.</summary>
    public double Value { get; }

    public static GuardBand AtConfidence(ConfidenceLevel level) => new(GuardKind.ConfidenceLevel, level.Value);

    public static GuardBand WithCoverageFactor(double k) =>
        k is >= 1 and <= 10 ? new GuardBand(GuardKind.CoverageFactor, k) : throw new ArgumentOutOfRangeException(nameof(k), k, "A coverage factor lies between 1 and 10.");

    /// <summary>The multiplier of the standard uncertainty for a figure with <paramref name="df"/> degrees of freedom (null: infinite).</summary>
    public double Multiplier(int? df) => Kind == GuardKind.CoverageFactor
        ? Value
        : df is { } d ? StudentT.TwoSidedCritical(ConfidenceLevel.Of(Value), d) : StudentT.NormalTwoSidedCritical(ConfidenceLevel.Of(Value));
}
