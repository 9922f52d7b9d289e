using StandFit.Core.Curve;
using StandFit.Core.Diagnostics;
using StandFit.Core.Fitting;
using StandFit.Core.Fitting.Nonlinear;
using StandFit.Core.Ingest;
using StandFit.Core.Judging;
using StandFit.Core.Problems;
using StandFit.Core.Recipes;
using StandFit.Core.Screening;
using StandFit.Core.Uncertainty;
using StandFit.Core.Uncertainty.Resampling;

namespace StandFit.Core.Evaluation;

/// <summary>
/// The pipeline for one unit, with no I/O: assemble the sweep with the recipe's columns, fit the
/// recipe's model (a linear model by QR, weighted when the recipe says so; an expression model by
/// Levenberg-Marquardt, a search that gives no solution rejecting the unit), put t-based error bars
/// on the parameters, the derived quantities and the uses of the curve, compute the residual diagnostics and figures of merit, resample when the
/// recipe asks, run the residual gates, and judge.
/// </summary>
public static class UnitEvaluator
{
    /// <param name="table">The parsed sweep file.</param>
    /// <param name="recipe">The recipe that judges it.</param>
    /// <param name="modelOverride">A model to fit instead of the recipe's.</param>
    /// <param name="sourceSha256">SHA-256 of the file's bytes (lower-case hex): with the serial and the recipe's seed it seeds the unit's resampling stream.</param>
    /// <param name="probe">Told as the unit finishes each stage (time per stage); null: nobody is told.</param>
    public static UnitEvaluation Evaluate(SweepTable table, Recipe recipe, LinearModel? modelOverride = null, string? sourceSha256 = null, IStageProbe? probe = null)
    {
        var assembled = SweepAssembler.Assemble(table, recipe.Columns, recipe.Format);
        probe?.Done(EvaluationStage.Assemble);
        if (!assembled.IsSuccess)
        {
            var identity = SweepAssembler.ReadIdentity(table);
            return UnitEvaluation.Rejected(table.SourceName, assembled.Problems[0], identity.IsSuccess ? identity.Value : null, recipe);
        }

        return Evaluate(table.SourceName, assembled.Value, recipe, modelOverride, sourceSha256, probe);
    }

    public static UnitEvaluation Evaluate(string sourceName, Sweep sweep, Recipe recipe, LinearModel? modelOverride = null, string? sourceSha256 = null, IStageProbe? probe = null)
    {
        // A sweep no fit can use is rejected; a sweep that fails a data-quality gate is ruled retest.
        CurveModel model = modelOverride ?? recipe.Model;
        var uncertainties = sweep.Uncertainties;
        if (recipe.Weights is { } rule)
        {
            uncertainties = [.. sweep.Output.Select(rule.UncertaintyOf)];
        }

        var data = new FitData(sweep.Inputs, sweep.Output)
        {
            Uncertainties = uncertainties,
            SourceName = sourceName,
            SourceLines = sweep.SourceLines,
            InputNames = recipe.Columns.Inputs,
        };
        if (LeastSquaresFitter.CheckFeasible(model, data) is { } infeasible)
        {
            return UnitEvaluation.Rejected(sourceName, infeasible, sweep.Identity, recipe, sweep);
        }

        var screened = SweepScreen.Screen(sweep, recipe.Sweep);
        if (screened.Count > 0)
        {
            return UnitEvaluation.Screened(sourceName, recipe, sweep, Verdict.From(screened));
        }

        IFitResult fit;
        if (model is ExpressionModel expression)
        {
            var searched = NonlinearFitter.Fit(expression, data);
            if (searched.Problem is { } problem)
            {
                return searched.Search is { } search
                    ? UnitEvaluation.RejectedSearch(sourceName, problem, recipe, sweep, search)
                    : UnitEvaluation.Rejected(sourceName, problem, sweep.Identity, recipe, sweep);
            }

            fit = searched.Search!;
        }
        else
        {
            var fitted = LeastSquaresFitter.Fit((LinearModel)model, data);
            if (!fitted.IsSuccess)
            {
                return UnitEvaluation.Rejected(sourceName, fitted.Problems[0], sweep.Identity, recipe, sweep);
            }

            fit = fitted.Value;
        }

        probe?.Done(EvaluationStage.Fit);
        var parameters = TIntervals.Compute(fit, recipe.Confidence);
        var derived = fit is FitResult linear ? DerivedEstimates.Compute(linear, recipe.Confidence) : [];
        var runs = RunsTest.Compute(fit.Residuals.AsSpan(), ResidualOrders.ByStimulus(sweep.Stimulus.AsSpan()));

        var diagnostics = ResidualDiagnostics.Compute(fit, sweep.Legs.AsSpan(), recipe.DiagnosticsOptions);
        var curve = CurveFigures.Compute(fit, recipe);
        var figures = FigureTable.Compute(fit, parameters, derived, curve, runs, recipe, diagnostics);
        probe?.Done(EvaluationStage.Diagnostics);
        var findings = new List<Finding>();
        ResamplingResult? resampling = null;
        if (recipe.Resampling is { } plan)
        {
            var streamSeed = StreamSeed.Derive(plan.Seed, sweep.Identity.Serial, sourceSha256 ?? "");
            resampling = fit is NonlinearFitResult nonlinear
                ? ResamplingAnalysis.Run(nonlinear, (ExpressionModel)model, sweep, recipe, plan, streamSeed)
                : ResamplingAnalysis.Run((FitResult)fit, sweep, recipe, plan, streamSeed);
            figures = resampling.Attach(figures);
            findings.AddRange(resampling.Findings);
        }

        probe?.Done(EvaluationStage.Resampling);
        foreach (var limit in recipe.Limits)
        {
            if (!figures.TryGetValue(limit.Figure, out var figure))
            {
                // A model override without the recipe's figure, a runs figure on residuals without
                // signs, an inverse prediction outside the calibrated range.
                findings.Add(new Finding(ReasonCodes.LimitNotEvaluated.Code, ReasonCodes.LimitNotEvaluated.Kind, Messages.LimitNotEvaluated(limit.Figure)));
                continue;
            }

            findings.Add(LimitJudge.Judge(limit, figure, recipe.Confidence));
        }

        if (recipe.RunsGate is { } gate)
        {
            findings.Add(gate.Judge(runs, diagnostics));
        }

        foreach (var diagnosticGate in recipe.DiagnosticGates)
        {
            findings.Add(diagnosticGate.Judge(diagnostics, sweep.SourceLines));
        }

        var judged = UnitEvaluation.Judged(sourceName, recipe, sweep, fit, parameters, derived, runs, figures, Verdict.From(findings), resampling, diagnostics, curve);
        probe?.Done(EvaluationStage.Judge);
        return judged;
    }
}
