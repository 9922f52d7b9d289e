using System.Collections.Immutable;
using StandFit.Core.Diagnostics;

namespace StandFit.Core.Judging;

/// <summary>
/// The recommended residual gates (docs/diagnostics.md, "Recommended gates"): chosen by the
/// decision-quality study (bench/StandFit.Benchmarks, <c>gates</c>) so that on well-behaved 21-point
/// up/down straight-line sweeps at most 1 % of units are failed by any of them, while a mid-scale bow
/// of 4 noise SDs is caught in at least 99 % of units. A recipe gets them by stating them: the demo
/// recipes (config/recipes/*.yaml) carry this block verbatim, and a test keeps the two equal. A
/// recipe's gates are only ever those it states; nothing here applies to a recipe by itself.
/// </summary>
public static class RecommendedGates
{
    /// <summary>Runs test on the residual signs in stimulus order.</summary>
    public static RunsGate Runs { get; } = new(0.001, ResidualOrder.Stimulus);

    /// <summary>Durbin-Watson in acquisition order, the partial F of the next power, and the Bonferroni outlier test, in that order.</summary>
    public static ImmutableArray<DiagnosticGate> Diagnostic { get; } =
    [
        new(DiagnosticGateKind.DurbinWatson, 0.001, order: ResidualOrder.Acquisition),
        new(DiagnosticGateKind.Curvature, 0.005),
        new(DiagnosticGateKind.Outliers, 0.002),
    ];
}
