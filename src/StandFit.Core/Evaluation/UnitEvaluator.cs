using StandFit.Core.Diagnostics;
using StandFit.Core.Fitting;
using StandFit.Core.Ingest;
using StandFit.Core.Judging;
using StandFit.Core.Recipes;
using StandFit.Core.Uncertainty;

namespace StandFit.Core.Evaluation;

/// <summary>
/// The pipeline for one unit, with no I/O: assemble the sweep with the recipe's columns, fit the
/// recipe's model, put t-based error bars on the parameters, run the residual gate, and judge.
/// </summary>
public static class UnitEvaluator
{
    public static UnitEvaluation Evaluate(SweepTable table, Recipe recipe, LinearModel? modelOverride = null)
    {
        var assembled = SweepAssembler.Assemble(table, recipe.Columns, recipe.Format);
        if (!assembled.IsSuccess)
        {
            var identity = SweepAssembler.ReadIdentity(table);
            return UnitEvaluation.Rejected(table.SourceName, assembled.Problems[0], identity.IsSuccess ? identity.Value : null, recipe);
        }

        return Evaluate(table.SourceName, assembled.Value, recipe, modelOverride);
    }

    public static UnitEvaluation Evaluate(string sourceName, Sweep sweep, Recipe recipe, LinearModel? modelOverride = null)
    {
        var model = modelOverride ?? recipe.Model;
        var fitted = LeastSquaresFitter.Fit(model, sweep.Stimulus, sweep.Output, sourceName);
        if (!fitted.IsSuccess)
        {
            return UnitEvaluation.Rejected(sourceName, fitted.Problems[0], sweep.Identity, recipe, sweep);
        }

        var fit = fitted.Value;
        var parameters = TIntervals.Compute(fit, recipe.Confidence);
        var runs = RunsTest.Compute(fit.Residuals.AsSpan(), ResidualOrders.ByStimulus(sweep.Stimulus.AsSpan()));

        var findings = new List<Finding>();
        foreach (var limit in recipe.Limits)
        {
            var parameter = parameters.FirstOrDefault(p => p.Name == limit.Figure);
            if (parameter is null)
            {
                // Only reachable with a model override that lacks the recipe's figure.
                continue;
            }

            findings.Add(GuardedAcceptance.Judge(limit, parameter.Low, parameter.High, recipe.UnitOf(limit.Figure)));
        }

        if (recipe.RunsGate is { } gate)
        {
            findings.Add(gate.Judge(runs));
        }

        return UnitEvaluation.Judged(sourceName, recipe, sweep, fit, parameters, runs, Verdict.From(findings));
    }
}
