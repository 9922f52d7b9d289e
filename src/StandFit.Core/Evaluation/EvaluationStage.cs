namespace StandFit.Core.Evaluation;

/// <summary>The stages of <see cref="UnitEvaluator"/>, in the order a unit goes through them.</summary>
public enum EvaluationStage
{
    /// <summary>The parsed table made into a sweep with the recipe's columns.</summary>
    Assemble,

    /// <summary>Feasibility, the data-quality screen and the fit.</summary>
    Fit,

    /// <summary>t intervals, derived figures, the runs test, the residual diagnostics, the curve's figures, the figure table.</summary>
    Diagnostics,

    /// <summary>The jackknife and the bootstrap (when the recipe asks).</summary>
    Resampling,

    /// <summary>Limits and gates judged, the verdict.</summary>
    Judge,
}

/// <summary>
/// Told when a unit finishes each stage of its evaluation, on the thread that evaluates it. The
/// core reads no clock: a caller that wants time per stage (<c>standfit run --stats</c>) measures
/// between the calls itself.
/// </summary>
public interface IStageProbe
{
    void Done(EvaluationStage stage);
}
