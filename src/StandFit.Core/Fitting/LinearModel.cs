using System.Collections.Immutable;

namespace StandFit.Core.Fitting;

/// <summary>
/// A transfer curve that is linear in its parameters: y = sum_j b_j f_j(x). The fitter works on a
/// centred and scaled stimulus z = (x - c) / h and maps the coefficients back; each model says how.
/// </summary>
public abstract class LinearModel
{
    /// <summary>The model's name as recipes and outputs write it.</summary>
    public abstract string Name { get; }

    /// <summary>Parameter names in output order.</summary>
    public abstract ImmutableArray<string> ParameterNames { get; }

    public int ParameterCount => ParameterNames.Length;

    /// <summary>True when the model has a constant term (R^2 is then the centred one).</summary>
    public abstract bool HasIntercept { get; }

    /// <summary>The model's value at stimulus <paramref name="x"/> for natural-scale parameters.</summary>
    public abstract double Evaluate(ReadOnlySpan<double> parameters, double x);

    /// <summary>The model's value in double-double arithmetic (for the fitter's refinement step).</summary>
    internal abstract DoubleDouble EvaluatePrecise(ReadOnlySpan<double> parameters, double x);

    /// <summary>The basis functions at natural stimulus x (one value per parameter): the gradient of f(x) with respect to the parameters.</summary>
    public abstract void FillNaturalBasis(double x, Span<double> row);

    /// <summary>The derivatives d f_j / dx at natural stimulus x: the gradient of the sensitivity f'(x) with respect to the parameters.</summary>
    public abstract void FillNaturalBasisDerivative(double x, Span<double> row);

    /// <summary>The centre c and half-range h of the scaled stimulus z = (x - c) / h.</summary>
    public abstract StimulusScaling ChooseScaling(double min, double max);

    /// <summary>The basis functions at scaled stimulus z: one value per parameter.</summary>
    public abstract void FillBasis(double z, Span<double> row);

    /// <summary>
    /// The matrix T (p x p, row-major) with b = T a, where a are the coefficients on the scaled
    /// stimulus and b the natural ones.
    /// </summary>
    public abstract void FillNaturalMap(StimulusScaling scaling, Span<double> map);

    public override string ToString() => Name;
}

/// <summary>z = (x - Centre) / HalfRange; HalfRange is positive.</summary>
public readonly record struct StimulusScaling(double Centre, double HalfRange);
