using System.Globalization;
using System.Text;
using StandFit.Core.Evaluation;
using StandFit.Core.Problems;
using StandFit.Edges.Outputs;

namespace StandFit.Cli.Commands;

/// <summary>The readable report of <c>inspect</c>: who, which recipe, the parameters, the residual checks, the ruling and its reasons.</summary>
internal static class UnitReport
{
    public static string Render(UnitEvaluation unit, SummaryRecord record)
    {
        var text = new StringBuilder();
        void Line(FormattableString s) => text.Append(s.ToString(CultureInfo.InvariantCulture)).Append('\n');

        Line($"file        {record.SourceFile}  (sha256 {record.SourceSha256[..16]}...)");
        Line($"unit        serial {PassFailLog.Escape(record.Serial)}  part {PassFailLog.Escape(record.Part)}  station {PassFailLog.Escape(record.Station)}  test start {record.TestStart:yyyy-MM-dd'T'HH:mm:ss'Z'}");
        if (unit.Recipe is { } recipe)
        {
            Line($"recipe      {recipe.Name}  version {recipe.Version}  ({recipe.SourceFile}, sha256 {recipe.ContentHash[..16]}...)");
        }

        if (unit.Search is { } search)
        {
            Line($"search      Levenberg-Marquardt {search.StatusCode}, {search.Iterations} iterations: {search.StatusReason}");
        }

        if (unit.Fit is { } fit)
        {
            var level = unit.Recipe!.Confidence;
            Line($"model       {fit.ModelName}  {fit.Count} points, {fit.DegreesOfFreedom} df, condition number {Numbers.Format(fit.ConditionNumber, 4)}");
            Line($"");
            Line($"{"parameter",-10} {"estimate",14} {"SE",12} {"CI low (" + level + ")",18} {"CI high",14} {"t",10} {"p",10}  unit");
            foreach (var p in unit.Parameters)
            {
                Line($"{p.Name,-10} {Numbers.Format(p.Estimate, 8),14} {Numbers.Format(p.StandardError, 4),12} {Numbers.Format(p.Low, 8),18} {Numbers.Format(p.High, 8),14} {Numbers.Format(p.T, 4),10} {Numbers.Format(p.P, 3),10}  {unit.Recipe.UnitOf(p.Name)}");
            }

            Line($"");
            Line($"residual SD {Numbers.Format(fit.ResidualSd, 5)} {unit.Recipe.Units.Output}   R^2 {Numbers.Format(fit.RSquared, 10)}   adjusted R^2 {Numbers.Format(fit.AdjustedRSquared, 10)}");
            if (unit.Runs is { IsApplicable: true } runs)
            {
                Line($"runs test   {runs.Runs} runs of {runs.Positive}+/{runs.Negative}- in stimulus order, expected {Numbers.Format(runs.Expected, 4)}, z = {Numbers.Format(runs.Z, 3)}, p = {Numbers.Format(runs.P, 3)} ({runs.Method.ToString().ToLowerInvariant()})");
            }
        }

        Line($"");
        Line($"ruling      {record.Ruling.ToUpperInvariant()}");
        foreach (var reason in unit.Verdict.Reasons)
        {
            Line($"  {reason.Code}: {reason.Sentence}");
        }

        return text.ToString().TrimEnd('\n');
    }
}
