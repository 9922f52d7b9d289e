using System.Collections.Immutable;

namespace StandFit.Core.Fitting;

/// <summary>
/// A transfer curve as a recipe declares it, before any data is seen: its name, its parameters,
/// its inputs and the units of its coefficients. A <see cref="LinearModel"/> is fitted by
/// <see cref="LeastSquaresFitter"/> into a <see cref="FitResult"/>; an
/// <see cref="Nonlinear.ExpressionModel"/> by <see cref="Nonlinear.LevenbergMarquardt"/> into a
/// <see cref="Nonlinear.NonlinearFitResult"/>. Both results are <see cref="IFitResult"/>: what
/// figures, limits, diagnostics and uses of the curve read.
/// </summary>
public abstract class CurveModel
{
    /// <summary>The model's name as recipes and outputs write it.</summary>
    public abstract string Name { get; }

    /// <summary>Parameter names in output order.</summary>
    public abstract ImmutableArray<string> ParameterNames { get; }

    public int ParameterCount => ParameterNames.Length;

    /// <summary>Number of inputs (stimulus columns) the model takes.</summary>
    public virtual int InputCount => 1;

    /// <summary>Names of the quantities derived from the parameters (the trade's own coefficients), in output order.</summary>
    public virtual ImmutableArray<string> DerivedNames => [];

    /// <summary>The unit of parameter <paramref name="parameter"/>, from the units of the inputs and the output ("" when none are given).</summary>
    public abstract string UnitOf(int parameter, ImmutableArray<string> inputUnits, string outputUnit);

    /// <summary>The unit of derived quantity <paramref name="derived"/>.</summary>
    public virtual string DerivedUnitOf(int derived, ImmutableArray<string> inputUnits, string outputUnit) => "";

    public override string ToString() => Name;
}
