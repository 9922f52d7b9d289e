namespace StandFit.Core.Evaluation;

/// <summary>What a derived figure computes from the fitted curve.</summary>
public enum DerivedKind
{
    /// <summary>The sensitivity dy/dx at a stimulus point.</summary>
    SensitivityAt,

    /// <summary>The fitted output at a stimulus point (the mean response).</summary>
    ValueAt,

    /// <summary>The fitted output at a stimulus point with its confidence and prediction bands.</summary>
    BandAt,

    /// <summary>The stimulus that gives an output value (inverse prediction), with its uncertainty.</summary>
    InverseAt,
}

/// <summary>
/// A figure the recipe names and computes from the curve, with its standard uncertainty: at a
/// stimulus point (<see cref="DerivedKind.SensitivityAt"/>, <see cref="DerivedKind.ValueAt"/>,
/// <see cref="DerivedKind.BandAt"/>), or at an output value (<see cref="DerivedKind.InverseAt"/>:
/// <see cref="At"/> is then the output, on the fitted response's scale).
/// </summary>
public sealed record DerivedFigure(string Name, DerivedKind Kind, double At);
