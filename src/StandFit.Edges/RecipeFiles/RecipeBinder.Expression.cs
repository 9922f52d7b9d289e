using System.Collections.Immutable;
using System.Globalization;
using System.Text.RegularExpressions;
using StandFit.Core.Evaluation;
using StandFit.Core.Fitting;
using StandFit.Core.Fitting.Expressions;
using StandFit.Core.Fitting.Nonlinear;
using StandFit.Core.Problems;

namespace StandFit.Edges.RecipeFiles;

/// <summary>
/// The expression model (<c>model: { type: expression, expression: ..., parameters: ... }</c>) and
/// the recipe keys that cannot go with it, and the checks of the curve uses
/// (<c>derived.&lt;name&gt;.band_at</c>, <c>inverse_at</c>).
/// </summary>
public static partial class RecipeBinder
{
    /// <summary>The default iteration limit of the Levenberg-Marquardt search of an expression model.</summary>
    public const int DefaultMaxIterations = 1000;

    private static readonly KeySpec ParameterSpec = Root.Child("model").Child("parameters");

    /// <summary>
    /// 'model.expression' and 'model.parameters': the expression parsed over the stimulus inputs
    /// (x, or x1 ... xk), every name in it declared as a parameter, every declared parameter used,
    /// each start within its bounds. Every problem is reported; null after any.
    /// </summary>
    private static ExpressionModel? ReadExpression(MapReader model, int inputCount)
    {
        var text = model.Text("expression", required: true);
        var parameters = ReadExpressionParameters(model);
        var maxIterations = model.Integer("max_iterations", required: false);
        var iterationsSpec = Root.Child("model").Child("max_iterations");
        if (maxIterations is { } limit && (limit < iterationsSpec.Minimum || limit > iterationsSpec.Maximum))
        {
            model.Sink.Add(RecipeCodes.BadValue, Messages.OutOfRange(model.Path("max_iterations"), limit.ToString(CultureInfo.InvariantCulture), "a whole number from 1 to 100000"), model.Node("max_iterations"));
            maxIterations = null;
            parameters = null;
        }

        if (text is null)
        {
            return null;
        }

        var where = model.Path("expression");
        var at = model.Node("expression")!;
        var inputs = inputCount == 1 ? ImmutableArray.Create(ExpressionLanguage.DefaultVariable) : [.. BasisTerm.InputSymbols(inputCount)];

        // First read the expression on its own (every other name a parameter): a syntax error is
        // reported at its column; then compare the names it uses with the declared parameters.
        var open = ExpressionParser.Parse(text, inputs);
        if (!open.IsSuccess)
        {
            model.Sink.Add(RecipeCodes.BadExpression, Messages.RecipeBadExpression(where, open.Error!.Column, Excerpt(text, open.Error.Column), open.Error.Message), at);
            return null;
        }

        if (model.Node("parameters") is not YamlMap declaredMap)
        {
            return null;
        }

        // The names are compared even when a parameter's values have a problem: every problem at once.
        var ok = parameters is not null;
        var declared = declaredMap.Entries.Select(e => e.Key.Text).ToList();
        foreach (var used in open.Expression.ParameterNames)
        {
            if (declared.Contains(used))
            {
                continue;
            }

            var column = ColumnOf(text, used);
            var message = LooksLikeInput(used)
                ? Messages.RecipeExpressionNotAnInput(where, column, used, inputs)
                : Messages.RecipeExpressionUndeclared(where, column, used, declared, Suggestions.Closest(used, declared));
            model.Sink.Add(RecipeCodes.BadExpression, message, at);
            ok = false;
        }

        foreach (var entry in declaredMap.Entries)
        {
            if (!open.Expression.ParameterNames.Contains(entry.Key.Text) && !LooksLikeInput(entry.Key.Text))
            {
                model.Sink.Add(RecipeCodes.Contradiction, Messages.RecipeParameterUnused(ParameterSpecPath(model, entry.Key.Text), text), entry.Key);
                ok = false;
            }
        }

        if (!ok || parameters is null)
        {
            return null;
        }

        var ordered = ExpressionParser.Parse(text, inputs, declared);
        if (!ordered.IsSuccess)
        {
            model.Sink.Add(RecipeCodes.BadExpression, Messages.RecipeBadExpression(where, ordered.Error!.Column, Excerpt(text, ordered.Error.Column), ordered.Error.Message), at);
            return null;
        }

        return new ExpressionModel(ordered.Expression, parameters.Select(p => p.Parameter), maxIterations ?? DefaultMaxIterations);
    }

    /// <summary>'model.parameters': each a valid name that is not an input, a start, optional bounds with the start inside them. Null after a problem.</summary>
    private static List<(ExpressionParameter Parameter, YamlScalar Key)>? ReadExpressionParameters(MapReader model)
    {
        var section = model.Map("parameters", knownKeys: null, required: true);
        if (section is null)
        {
            return null;
        }

        var result = new List<(ExpressionParameter, YamlScalar)>();
        var ok = true;
        if (!section.Entries.Any())
        {
            model.Sink.Add(RecipeCodes.BadValue, Messages.RecipeParametersEmpty(model.Path("parameters")), section.Mapping);
            return null;
        }

        if (section.Entries.Count() > ExpressionLanguage.MaxParameters)
        {
            model.Sink.Add(RecipeCodes.BadValue, Messages.ExpressionTooManyParameters(section.Entries.Count(), ExpressionLanguage.MaxParameters), section.Mapping);
            return null;
        }

        foreach (var entry in section.Entries)
        {
            var name = entry.Key.Text;
            var path = ParameterSpecPath(model, name);
            if (LooksLikeInput(name) || !ExpressionLanguage.IsValidName(name))
            {
                model.Sink.Add(RecipeCodes.BadValue, Messages.RecipeBadParameterName(path, name, ExpressionLanguage.IsReserved(name), LooksLikeInput(name)), entry.Key);
                ok = false;
            }

            var spec = section.Map(name, ParameterSpec.ChildNames, required: true);
            if (spec is null)
            {
                ok = false;
                continue;
            }

            var start = spec.Number("start", required: true);
            var min = spec.Number("min", required: false);
            var max = spec.Number("max", required: false);
            var unit = spec.Text("unit", required: false) ?? "";
            if (start is null || (spec.Has("min") && min is null) || (spec.Has("max") && max is null))
            {
                ok = false;
                continue;
            }

            if (min is { } lo && max is { } hi && lo >= hi)
            {
                spec.Sink.Add(RecipeCodes.Contradiction, Messages.MinAboveMax(spec.Where, Numbers.Format(lo), Numbers.Format(hi)), spec.Node("min"));
                ok = false;
                continue;
            }

            if ((min is { } low && start < low) || (max is { } high && start > high))
            {
                spec.Sink.Add(RecipeCodes.BadValue, Messages.RecipeStartOutsideBounds(spec.Path("start"), Numbers.Format(start.Value), min, max), spec.Node("start"));
                ok = false;
                continue;
            }

            result.Add((new ExpressionParameter(name, start.Value, min, max, unit), entry.Key));
        }

        return ok ? result : null;
    }

    /// <summary>
    /// What an expression model cannot have: weights (the Levenberg-Marquardt fit is unweighted)
    /// and the curvature gate and figures (the next power of a polynomial). Each is refused where it
    /// is written. Resampling is allowed: every resample is refitted (docs/uncertainty.md).
    /// </summary>
    private static void CheckExpressionRecipe(MapReader top, CurveModel? model)
    {
        var isExpression = model is ExpressionModel || (top.Node("model") is YamlMap m && m.Entries.Any(e => e.Key.Text == "type" && e.Value is YamlScalar { Text: "expression" }));
        if (!isExpression)
        {
            return;
        }

        if (top.KeyNode("weights") is { } weights)
        {
            top.Sink.Add(RecipeCodes.Contradiction, Messages.RecipeNotForExpression("'weights'"), weights);
        }

        if (top.Node("gates") is YamlMap gates && gates.Entries.FirstOrDefault(e => e.Key.Text == "curvature") is { } curvature)
        {
            top.Sink.Add(RecipeCodes.Contradiction, Messages.RecipeNotForExpression("'gates.curvature'"), curvature.Key);
        }

        if (top.Node("limits") is YamlMap limits)
        {
            foreach (var entry in limits.Entries.Where(e => FigureTable.LinearOnlyFigures.Contains(e.Key.Text)))
            {
                top.Sink.Add(RecipeCodes.Contradiction, Messages.RecipeNotForExpression("a limit on '" + entry.Key.Text + "'"), entry.Key);
            }
        }
    }

    /// <summary>
    /// Derived figures need a model of one input; a band or an inverse prediction of a weighted fit
    /// needs the new reading's uncertainty, which only a weight rule on an untransformed output gives.
    /// </summary>
    private static void CheckCurveUses(MapReader top, CurveModel? model, ImmutableArray<DerivedFigure> derived, int inputCount)
    {
        if (top.Node("derived") is not YamlMap section)
        {
            return;
        }

        foreach (var d in derived)
        {
            var key = section.Entries.First(e => e.Key.Text == d.Name).Key;
            if (inputCount > 1)
            {
                top.Sink.Add(RecipeCodes.Contradiction, Messages.RecipeDerivedOneInput("'derived." + d.Name + "'", inputCount), key);
                continue;
            }

            if (d.Kind is not (DerivedKind.BandAt or DerivedKind.InverseAt) || top.Node("weights") is not YamlMap weights)
            {
                continue;
            }

            if (weights.Entries.Any(e => e.Key.Text == "column"))
            {
                top.Sink.Add(RecipeCodes.Contradiction, Messages.RecipeCurveUseNeedsRule("'derived." + d.Name + "'"), key);
            }
            else if (model is LinearModel { ResponseDescription: not null } transformed)
            {
                top.Sink.Add(RecipeCodes.Contradiction, Messages.RecipeCurveUseTransformed("'derived." + d.Name + "'", transformed.Name), key);
            }
        }
    }

    private static string ParameterSpecPath(MapReader model, string name) => model.Path("parameters").TrimEnd('\'') + "." + name + "'";

    /// <summary>x, or x followed by digits: the names the stimulus inputs have.</summary>
    private static bool LooksLikeInput(string name) => InputName().IsMatch(name);

    /// <summary>The 1-based column of the first use of <paramref name="name"/> as a whole name in the text.</summary>
    private static int ColumnOf(string text, string name)
    {
        var match = Regex.Match(text, @"(?<![A-Za-z0-9_])" + Regex.Escape(name) + @"(?![A-Za-z0-9_])", RegexOptions.CultureInvariant);
        return match.Success ? match.Index + 1 : 0;
    }

    /// <summary>The expression text around a column, for a message (the whole text when it is short).</summary>
    private static string Excerpt(string text, int column)
    {
        var flat = text.ReplaceLineEndings(" ");
        if (column <= 0 || flat.Length <= 60)
        {
            return flat;
        }

        var start = Math.Max(0, column - 30);
        var length = Math.Min(60, flat.Length - start);
        return string.Concat(start > 0 ? "..." : "", flat.AsSpan(start, length), start + length < flat.Length ? "..." : "");
    }

    [GeneratedRegex("^x[0-9]*$", RegexOptions.CultureInvariant)]
    private static partial Regex InputName();
}
