using StandFit.Core.Diagnostics;
using StandFit.Core.Fitting;
using StandFit.Core.Ingest;
using StandFit.Core.Judging;
using StandFit.Core.Problems;
using StandFit.Core.Recipes;
using StandFit.Core.Screening;
using StandFit.Core.Uncertainty;

namespace StandFit.Core.Evaluation;

/// <summary>
/// The pipeline for one unit, with no I/O: assemble the sweep with the recipe's columns, fit the
/// recipe's model, put t-based error bars on the parameters, compute the residual diagnostics and
/// figures of merit, run the residual gates, and judge.
/// </summary>
public static class UnitEvaluator
{
    public static UnitEvaluation Evaluate(SweepTable table, Recipe recipe, LinearModel? modelOverride = null)
    {
        var assembled = SweepAssembler.Assemble(table, recipe.Columns);
        if (!assembled.IsSuccess)
        {
            var identity = SweepAssembler.ReadIdentity(table);
            return UnitEvaluation.Rejected(table.SourceName, assembled.Problems[0], identity.IsSuccess ? identity.Value : null, recipe);
        }

        return Evaluate(table.SourceName, assembled.Value, recipe, modelOverride);
    }

    public static UnitEvaluation Evaluate(string sourceName, Sweep sweep, Recipe recipe, LinearModel? modelOverride = null)
    {
        // A sweep no fit can use is rejected; a sweep that fails a data-quality gate is ruled retest.
        var model = modelOverride ?? recipe.Model;
        if (LeastSquaresFitter.CheckFeasible(model, sweep.Stimulus, sourceName) is { } infeasible)
        {
            return UnitEvaluation.Rejected(sourceName, infeasible, sweep.Identity, recipe, sweep);
        }

        var screened = SweepScreen.Screen(sweep, recipe.Sweep);
        if (screened.Count > 0)
        {
            return UnitEvaluation.Screened(sourceName, recipe, sweep, Verdict.From(screened));
        }

        var fitted = LeastSquaresFitter.Fit(model, sweep.Stimulus, sweep.Output, sourceName);
        if (!fitted.IsSuccess)
        {
            return UnitEvaluation.Rejected(sourceName, fitted.Problems[0], sweep.Identity, recipe, sweep);
        }

        var fit = fitted.Value;
        var parameters = TIntervals.Compute(fit, recipe.Confidence);
        var runs = RunsTest.Compute(fit.Residuals.AsSpan(), ResidualOrders.ByStimulus(sweep.Stimulus.AsSpan()));

        var diagnostics = ResidualDiagnostics.Compute(fit, sweep.Legs.AsSpan(), recipe.DiagnosticsOptions);
        var figures = FigureTable.Compute(fit, parameters, runs, recipe, diagnostics);
        var findings = new List<Finding>();
        foreach (var limit in recipe.Limits)
        {
            if (!figures.TryGetValue(limit.Figure, out var figure))
            {
                // A model override without the recipe's figure, or a runs figure on residuals without signs.
                findings.Add(new Finding(ReasonCodes.LimitNotEvaluated.Code, ReasonCodes.LimitNotEvaluated.Kind, Messages.LimitNotEvaluated(limit.Figure)));
                continue;
            }

            findings.Add(LimitJudge.Judge(limit, figure, recipe.Confidence));
        }

        if (recipe.RunsGate is { } gate)
        {
            findings.Add(gate.Judge(runs));
        }

        foreach (var diagnosticGate in recipe.DiagnosticGates)
        {
            findings.Add(diagnosticGate.Judge(diagnostics, sweep.SourceLines));
        }

        return UnitEvaluation.Judged(sourceName, recipe, sweep, fit, parameters, runs, figures, Verdict.From(findings), diagnostics);
    }
}
