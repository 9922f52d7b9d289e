namespace StandFit.Core.Evaluation;

/// <summary>What a derived figure computes from the fitted curve.</summary>
public enum DerivedKind
{
    /// <summary>The sensitivity dy/dx at a stimulus point.</summary>
    SensitivityAt,

    /// <summary>The fitted output at a stimulus point (the mean response).</summary>
    ValueAt,
}

/// <summary>A figure the recipe names and computes from the curve at a stimulus point, with its standard uncertainty.</summary>
public sealed record DerivedFigure(string Name, DerivedKind Kind, double At);
