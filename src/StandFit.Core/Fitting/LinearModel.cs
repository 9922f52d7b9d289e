using System.Collections.Immutable;

namespace StandFit.Core.Fitting;

/// <summary>
/// A transfer curve that is linear in its parameters: y = sum_j b_j f_j(x), over one or more
/// inputs x = (x_1 ... x_m). The fitter solves on a scaled basis g(x) = T' f(x) (centred and
/// scaled inputs where the model allows it) and maps the coefficients back, b = T a; each model
/// says how. A model may also fit a transform of the output (Steinhart-Hart fits 1/T), refuse
/// input values outside its domain (ln needs x &gt; 0), and derive trade coefficients from its
/// parameters.
/// </summary>
public abstract class LinearModel : CurveModel
{
    /// <summary>True when the model has a constant term (R^2 is then the centred one).</summary>
    public abstract bool HasIntercept { get; }

    /// <summary>The natural basis functions f_j at the point <paramref name="x"/>: one value per parameter.</summary>
    public abstract void FillBasis(ReadOnlySpan<double> x, Span<double> row);

    /// <summary>The natural basis in double-double arithmetic (for the fitter's refinement step).</summary>
    internal abstract void FillBasisPrecise(ReadOnlySpan<double> x, Span<DoubleDouble> row);

    /// <summary>The partial derivatives d f_j / d x_input at the point <paramref name="x"/>.</summary>
    public abstract void FillBasisDerivative(ReadOnlySpan<double> x, int input, Span<double> row);

    /// <summary>The centring and scaling of each input the solve uses, from the inputs' ranges.</summary>
    public abstract DesignScaling ChooseScaling(ReadOnlySpan<double> min, ReadOnlySpan<double> max);

    /// <summary>The scaled basis g at the point <paramref name="x"/> (natural inputs; the model applies the scaling).</summary>
    public abstract void FillScaledBasis(ReadOnlySpan<double> x, DesignScaling scaling, Span<double> row);

    /// <summary>
    /// The matrix T (p x p, row-major) with b = T a, where a are the coefficients on the scaled
    /// basis and b the natural ones.
    /// </summary>
    public abstract void FillNaturalMap(DesignScaling scaling, Span<double> map);

    /// <summary>The model's value at the point <paramref name="x"/> for natural-scale parameters.</summary>
    public virtual double Evaluate(ReadOnlySpan<double> parameters, ReadOnlySpan<double> x)
    {
        Span<double> row = stackalloc double[ParameterCount];
        FillBasis(x, row);
        var sum = 0.0;
        for (var j = 0; j < row.Length; j++)
        {
            sum += parameters[j] * row[j];
        }

        return sum;
    }

    /// <summary>The model's value at stimulus <paramref name="x"/> (a model of one input).</summary>
    public double Evaluate(ReadOnlySpan<double> parameters, double x)
    {
        RequireSingleInput();
        return Evaluate(parameters, [x]);
    }

    /// <summary>The model's value in double-double arithmetic (for the fitter's refinement step).</summary>
    internal virtual DoubleDouble EvaluatePrecise(ReadOnlySpan<double> parameters, ReadOnlySpan<double> x)
    {
        Span<DoubleDouble> row = stackalloc DoubleDouble[ParameterCount];
        FillBasisPrecise(x, row);
        var sum = DoubleDouble.Zero;
        for (var j = 0; j < row.Length; j++)
        {
            sum += row[j] * parameters[j];
        }

        return sum;
    }

    internal DoubleDouble EvaluatePrecise(ReadOnlySpan<double> parameters, double x)
    {
        RequireSingleInput();
        return EvaluatePrecise(parameters, [x]);
    }

    /// <summary>The slope d y / d x_input of the curve at the point <paramref name="x"/>.</summary>
    public double Derivative(ReadOnlySpan<double> parameters, ReadOnlySpan<double> x, int input = 0)
    {
        Span<double> row = stackalloc double[ParameterCount];
        FillBasisDerivative(x, input, row);
        var sum = 0.0;
        for (var j = 0; j < row.Length; j++)
        {
            sum += parameters[j] * row[j];
        }

        return sum;
    }

    /// <summary>
    /// What the point <paramref name="x"/> breaks of the model's domain: the input and the condition
    /// it must meet (for example "ln(x) needs x &gt; 0"), or null when the point is inside.
    /// </summary>
    public virtual DomainViolation? CheckDomain(ReadOnlySpan<double> x) => null;

    /// <summary>The response the model fits, from the output column's value (the identity unless the model says otherwise).</summary>
    public virtual double TransformResponse(double output) => output;

    /// <summary>
    /// The standard uncertainty of the fitted response from that of the output reading, by the
    /// delta method (|d response / d output| u); u itself unless the model transforms the output.
    /// </summary>
    public virtual double TransformUncertainty(double output, double uncertainty) => uncertainty;

    /// <summary>What an output value breaks of the response transform's domain, or null.</summary>
    public virtual string? CheckResponse(double output) => null;

    /// <summary>What the fitted response is, when it is not the output column itself ("1/T in 1/K"), or null.</summary>
    public virtual string? ResponseDescription => null;

    /// <summary>
    /// The derived quantities from natural parameters <paramref name="parameters"/>, and their
    /// Jacobian (d x p, row-major) for the delta method.
    /// </summary>
    public virtual void Derive(ReadOnlySpan<double> parameters, Span<double> values, Span<double> jacobian)
    {
        if (DerivedNames.Length != 0)
        {
            throw new NotSupportedException(Name + " names derived quantities but does not compute them.");
        }
    }

    private void RequireSingleInput()
    {
        if (InputCount != 1)
        {
            throw new InvalidOperationException(Name + " takes " + InputCount.ToString(System.Globalization.CultureInfo.InvariantCulture) + " inputs; pass a point.");
        }
    }
}

/// <summary>z = (x - Centre) / HalfRange; HalfRange is positive. Centre 0 and HalfRange 1 leave an input as it is.</summary>
public readonly record struct StimulusScaling(double Centre, double HalfRange)
{
    public static StimulusScaling None { get; } = new(0.0, 1.0);
}

/// <summary>The scaling of each input in one fit.</summary>
public sealed record DesignScaling(ImmutableArray<StimulusScaling> Inputs)
{
    public StimulusScaling this[int input] => Inputs[input];
}

/// <summary>A point outside a model's domain: which input, and the condition it must meet (for example "ln(x) needs x &gt; 0").</summary>
public sealed record DomainViolation(int Input, string Condition);
