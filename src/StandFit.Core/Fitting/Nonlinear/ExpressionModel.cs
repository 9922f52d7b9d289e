using System.Collections.Immutable;
using System.Text;
using StandFit.Core.Fitting.Expressions;

namespace StandFit.Core.Fitting.Nonlinear;

/// <summary>One parameter of an expression model as a recipe declares it: where the search starts, optional bounds, and its unit.</summary>
public sealed record ExpressionParameter(string Name, double Start, double? Min = null, double? Max = null, string Unit = "");

/// <summary>
/// A transfer curve written in the expression language (docs/expressions.md), nonlinear in its
/// parameters in general, fitted by <see cref="LevenbergMarquardt"/> from the recipe's start values
/// within the recipe's bounds. The inputs are the expression's variables: <c>x</c> for one stimulus
/// column, <c>x1</c>, <c>x2</c> ... for several.
/// </summary>
public sealed class ExpressionModel : CurveModel
{
    public ExpressionModel(ModelExpression expression, IEnumerable<ExpressionParameter> parameters, int maxIterations = 1000)
    {
        ArgumentNullException.ThrowIfNull(expression);
        Expression = expression;
        Parameters = [.. parameters];
        if (!Parameters.Select(p => p.Name).SequenceEqual(expression.ParameterNames, StringComparer.Ordinal))
        {
            throw new ArgumentException("One declared parameter is needed per parameter of the expression, in its order.", nameof(parameters));
        }

        foreach (var p in Parameters)
        {
            if (!double.IsFinite(p.Start) || p.Start < (p.Min ?? double.NegativeInfinity) || p.Start > (p.Max ?? double.PositiveInfinity))
            {
                throw new ArgumentException($"The start of {p.Name} must be finite and within its bounds.", nameof(parameters));
            }
        }

        ArgumentOutOfRangeException.ThrowIfLessThan(maxIterations, 1);
        Name = NameOf(expression);
        Start = [.. Parameters.Select(p => p.Start)];
        var bounded = Parameters.Any(p => p.Min is not null || p.Max is not null);
        Options = LevenbergMarquardtOptions.Default with
        {
            MaxIterations = maxIterations,
            LowerBounds = bounded ? [.. Parameters.Select(p => p.Min ?? double.NegativeInfinity)] : default,
            UpperBounds = bounded ? [.. Parameters.Select(p => p.Max ?? double.PositiveInfinity)] : default,
        };
    }

    /// <summary>The compiled expression.</summary>
    public ModelExpression Expression { get; }

    /// <summary>The declared parameters, in the expression's parameter order.</summary>
    public ImmutableArray<ExpressionParameter> Parameters { get; }

    /// <summary>The start vector.</summary>
    public ImmutableArray<double> Start { get; }

    /// <summary>The fit's options: the bounds and the iteration limit, the tolerances of <see cref="LevenbergMarquardtOptions.Default"/>.</summary>
    public LevenbergMarquardtOptions Options { get; }

    public override string Name { get; }

    public override ImmutableArray<string> ParameterNames => Expression.ParameterNames;

    public override int InputCount => Expression.VariableCount;

    public override string UnitOf(int parameter, ImmutableArray<string> inputUnits, string outputUnit) => Parameters[parameter].Unit;

    /// <summary><c>expression(</c> the text with every run of white space as one space <c>)</c>: the model's name in outputs.</summary>
    public static string NameOf(ModelExpression expression)
    {
        ArgumentNullException.ThrowIfNull(expression);
        var text = new StringBuilder("expression(");
        var space = false;
        foreach (var c in expression.Text.Trim())
        {
            if (char.IsWhiteSpace(c))
            {
                space = true;
                continue;
            }

            if (space)
            {
                text.Append(' ');
                space = false;
            }

            text.Append(c);
        }

        return text.Append(')').ToString();
    }
}
