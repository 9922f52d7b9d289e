using System.Collections.Immutable;
using StandFit.Core.Diagnostics;
using StandFit.Core.Fitting;
using StandFit.Core.Judging;
using StandFit.Core.Recipes;
using StandFit.Core.Uncertainty;

namespace StandFit.Core.Evaluation;

/// <summary>
/// Every figure of a judged unit that a limit can name: the parameters (with standard errors), the
/// half-widths of their intervals, the derived figures of the recipe (with standard errors), and
/// the fit's diagnostics. <see cref="Names"/> says which exist for a model before any data is seen,
/// so recipes can be checked.
/// </summary>
public static class FigureTable
{
    /// <summary>Figures every fit has, without an uncertainty of their own.</summary>
    public static readonly ImmutableArray<string> FitFigures = ["residual_sd", "r_squared", "adj_r_squared", "condition_number", "runs_p", "runs_z"];

    public const string HalfWidthSuffix = ".half_width";

    /// <summary>Every figure name a recipe with this model and these derived figures can limit, and whether it has an uncertainty.</summary>
    public static ImmutableDictionary<string, bool> Names(LinearModel model, IEnumerable<DerivedFigure> derived)
    {
        var names = ImmutableDictionary.CreateBuilder<string, bool>(StringComparer.Ordinal);
        foreach (var p in model.ParameterNames.Concat(model.DerivedNames))
        {
            names[p] = true;
            names[p + HalfWidthSuffix] = false;
        }

        foreach (var d in derived)
        {
            names[d.Name] = true;
        }

        foreach (var f in FitFigures)
        {
            names[f] = false;
        }

        return names.ToImmutable();
    }

    public static ImmutableDictionary<string, FigureValue> Compute(FitResult fit, ImmutableArray<ParameterEstimate> parameters, ImmutableArray<ParameterEstimate> modelDerived, RunsTestResult runs, Recipe recipe)
    {
        var figures = ImmutableDictionary.CreateBuilder<string, FigureValue>(StringComparer.Ordinal);
        foreach (var p in parameters.Concat(modelDerived))
        {
            var unit = recipe.UnitOf(p.Name);
            figures[p.Name] = new FigureValue(p.Name, p.Estimate, p.StandardError, fit.DegreesOfFreedom, unit);
            figures[p.Name + HalfWidthSuffix] = new FigureValue(p.Name + HalfWidthSuffix, (p.High - p.Low) / 2, null, null, unit);
        }

        var gradient = new double[fit.ParameterCount];
        foreach (var d in recipe.Derived)
        {
            if (d.Kind == DerivedKind.SensitivityAt)
            {
                fit.Model.FillBasisDerivative([d.At], 0, gradient);
            }
            else
            {
                fit.Model.FillBasis([d.At], gradient);
            }

            var (value, se) = Linear(fit, gradient);
            var unit = d.Kind != DerivedKind.SensitivityAt ? recipe.Units.Output : recipe.UnitOfSensitivity();
            figures[d.Name] = new FigureValue(d.Name, value, se, fit.DegreesOfFreedom, unit);
        }

        figures["residual_sd"] = new FigureValue("residual_sd", fit.ResidualSd, null, null, recipe.Units.Output);
        figures["r_squared"] = new FigureValue("r_squared", fit.RSquared, null, null, "");
        figures["adj_r_squared"] = new FigureValue("adj_r_squared", fit.AdjustedRSquared, null, null, "");
        figures["condition_number"] = new FigureValue("condition_number", fit.ConditionNumber, null, null, "");
        if (runs.IsApplicable)
        {
            figures["runs_p"] = new FigureValue("runs_p", runs.P, null, null, "");
            figures["runs_z"] = new FigureValue("runs_z", runs.Z, null, null, "");
        }

        return figures.ToImmutable();
    }

    /// <summary>g'b and sqrt(g' C g): a linear combination of the parameters and its standard error.</summary>
    private static (double Value, double Se) Linear(FitResult fit, double[] g)
    {
        var p = fit.ParameterCount;
        double value = 0, variance = 0;
        for (var i = 0; i < p; i++)
        {
            value += g[i] * fit.Estimates[i];
            for (var j = 0; j < p; j++)
            {
                variance += g[i] * fit.Covariance[(i * p) + j] * g[j];
            }
        }

        return (value, Math.Sqrt(Math.Max(variance, 0)));
    }
}
