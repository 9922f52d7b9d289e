using System.Collections.Immutable;
using System.Globalization;
using StandFit.Core.Fitting;
using StandFit.Core.Ingest;
using StandFit.Core.Judging;
using StandFit.Core.Problems;
using StandFit.Core.Recipes;
using StandFit.Core.Uncertainty;

namespace StandFit.Edges.RecipeFiles;

/// <summary>
/// The recipe language: binds a recipe file's YAML tree to the core's immutable <see cref="Recipe"/>,
/// reporting every problem of the file at once. docs/recipes.md documents each key.
/// </summary>
public static class RecipeBinder
{
    public static readonly ImmutableArray<string> TopKeys = ["recipe", "version", "parts", "columns", "units", "model", "confidence", "weights", "limits", "gates"];
    public static readonly ImmutableArray<string> ColumnKeys = ["stimulus", "output", "leg", "order"];
    public static readonly ImmutableArray<string> UnitKeys = ["stimulus", "output"];
    public static readonly ImmutableArray<string> ModelKeys = ["type", "degree", "terms", "temperature"];
    public static readonly ImmutableArray<string> ModelTypes = ["straight-line", "straight-line-through-zero", "polynomial", "basis", "steinhart-hart", "callendar-van-dusen"];
    public static readonly ImmutableArray<string> TemperatureUnits = ["kelvin", "celsius"];
    public static readonly ImmutableArray<string> WeightKeys = ["column", "u_fixed", "u_relative"];
    public static readonly ImmutableArray<string> LimitKeys = ["min", "max"];
    public static readonly ImmutableArray<string> GateKeys = ["runs_test"];
    public static readonly ImmutableArray<string> RunsGateKeys = ["p_min"];

    /// <summary>The most stimulus columns a recipe may name (the inputs x1 ... x9).</summary>
    public const int MaxInputs = 9;

    /// <summary>The most terms a basis model may have.</summary>
    public const int MaxTerms = 20;

    /// <summary>Reads one recipe file's text. <paramref name="file"/> is the name shown in messages.</summary>
    public static Result<Recipe> Bind(string file, string text, string contentHash)
    {
        var tree = YamlTree.Parse(file, text);
        if (!tree.IsSuccess)
        {
            return Result<Recipe>.Failure(tree.Problems);
        }

        var sink = new ProblemSink(file);
        if (tree.Value is not YamlMap root)
        {
            sink.Add(RecipeCodes.BadValue, tree.Value is null ? Messages.RecipeEmptyFile() : Messages.ExpectedMap("the file"), tree.Value);
            return Result<Recipe>.Failure(sink.Problems);
        }

        var top = new MapReader(root, "the file", sink, TopKeys);
        var name = top.Text("recipe", required: true);
        var version = top.Text("version", required: true);
        var parts = top.TextList("parts", required: true);
        var (columns, inputCount) = ReadColumns(top);
        var units = ReadUnits(top, inputCount);
        var model = ReadModel(top, inputCount);
        var confidence = ReadConfidence(top);
        var weights = ReadWeights(top);
        var limits = ReadLimits(top, model);
        var runsGate = ReadGates(top);

        if (sink.HasProblems || name is null || version is null || columns is null || model is null || confidence is null || weights is null)
        {
            return Result<Recipe>.Failure(sink.Problems);
        }

        return new Recipe(
            name,
            version,
            [.. parts.Select(p => p.Text)],
            new ColumnMap(columns.Inputs, columns.Output, columns.Leg, columns.Order, weights.Column),
            units ?? ColumnUnits.None,
            model,
            confidence.Value,
            limits,
            runsGate,
            contentHash,
            file,
            weights.Rule);
    }

    /// <summary>The column map (without the uncertainty column, which 'weights' names) and the number of stimulus columns read.</summary>
    private static (ColumnMap? Columns, int InputCount) ReadColumns(MapReader top)
    {
        var columns = top.Map("columns", ColumnKeys, required: true);
        if (columns is null)
        {
            return (null, 1);
        }

        var inputs = ReadTextOrList(columns, "stimulus");
        var output = columns.Text("output", required: true);
        var leg = columns.Text("leg", required: false);
        var order = columns.Text("order", required: false);
        var ok = inputs.Count > 0;
        if (inputs.Count > MaxInputs)
        {
            columns.Sink.Add(RecipeCodes.BadValue, Messages.TooManyInputs(inputs.Count, MaxInputs), columns.Node("stimulus"));
            ok = false;
        }

        for (var k = 0; k < inputs.Count; k++)
        {
            var first = inputs.FindIndex(i => string.Equals(i.Text, inputs[k].Text, StringComparison.OrdinalIgnoreCase));
            if (first < k)
            {
                columns.Sink.Add(RecipeCodes.Contradiction, Messages.DuplicateInput(inputs[k].Text, first + 1), inputs[k].Node);
                ok = false;
            }
        }

        var count = Math.Clamp(inputs.Count, 1, MaxInputs);
        return !ok || output is null ? (null, count) : (new ColumnMap([.. inputs.Select(i => i.Text)], output, leg, order), count);
    }

    /// <summary>A required key whose value is one text, or a non-empty list of texts.</summary>
    private static List<(string Text, YamlNode Node)> ReadTextOrList(MapReader map, string key)
    {
        if (map.Node(key) is YamlList)
        {
            return [.. map.TextList(key, required: true)];
        }

        var text = map.Text(key, required: true);
        return text is null ? [] : [(text, map.Node(key)!)];
    }

    private static ColumnUnits? ReadUnits(MapReader top, int inputCount)
    {
        var units = top.Map("units", UnitKeys, required: false);
        if (units is null)
        {
            return null;
        }

        var inputs = ReadTextOrList(units, "stimulus");
        var output = units.Text("output", required: true) ?? "";
        if (inputs.Count > 0 && inputs.Count != inputCount)
        {
            units.Sink.Add(RecipeCodes.Contradiction, Messages.UnitCountMismatch(inputs.Count, inputCount), units.Node("stimulus"));
            return null;
        }

        return new ColumnUnits(inputs.Count == 0 ? [""] : [.. inputs.Select(i => i.Text)], output);
    }

    private static LinearModel? ReadModel(MapReader top, int inputCount)
    {
        var model = top.Map("model", ModelKeys, required: true);
        if (model is null)
        {
            return null;
        }

        var type = model.Text("type", required: true);
        if (type is null)
        {
            return null;
        }

        if (!ModelTypes.Contains(type))
        {
            model.Sink.Add(RecipeCodes.BadValue, Messages.UnknownChoice(model.Path("type"), type, ModelTypes, Suggestions.Closest(type, ModelTypes)), model.Node("type"));
            return null;
        }

        // Keys that belong to one model type only.
        var ok = true;
        foreach (var (key, owner) in new[] { ("degree", "polynomial"), ("terms", "basis"), ("temperature", "steinhart-hart") })
        {
            if (type != owner && model.Node(key) is { } stray)
            {
                model.Sink.Add(RecipeCodes.Contradiction, Messages.KeyNotForModel(key, owner, type), stray);
                ok = false;
            }
        }

        if (type != "basis" && inputCount != 1)
        {
            model.Sink.Add(RecipeCodes.Contradiction, Messages.ModelTakesOneInput(type, inputCount), model.Node("type"));
            ok = false;
        }

        switch (type)
        {
            case "straight-line":
                return ok ? Polynomial.StraightLine : null;
            case "straight-line-through-zero":
                return ok ? Polynomial.StraightLineThroughZero : null;
            case "callendar-van-dusen":
                return ok ? CallendarVanDusen.AboveZero : null;
            case "steinhart-hart":
                var temperature = model.Text("temperature", required: true);
                if (temperature is null)
                {
                    return null;
                }

                if (!TemperatureUnits.Contains(temperature))
                {
                    model.Sink.Add(RecipeCodes.BadValue, Messages.UnknownChoice(model.Path("temperature"), temperature, TemperatureUnits, Suggestions.Closest(temperature, TemperatureUnits)), model.Node("temperature"));
                    return null;
                }

                return ok ? new SteinhartHart(temperature == "kelvin" ? TemperatureScale.Kelvin : TemperatureScale.Celsius) : null;
            case "polynomial":
                var degree = model.Integer("degree", required: true);
                if (degree is null)
                {
                    return null;
                }

                if (degree is < 1 or > Polynomial.MaxDegree)
                {
                    model.Sink.Add(RecipeCodes.BadValue, Messages.OutOfRange(model.Path("degree"), degree.Value.ToString(CultureInfo.InvariantCulture), "a whole number from 1 to 10"), model.Node("degree"));
                    return null;
                }

                return ok ? Polynomial.OfDegree(degree.Value) : null;
            default:
                var basis = ReadTerms(model, inputCount);
                return ok ? basis : null;
        }
    }

    /// <summary>
    /// 'model.terms' of a basis model: a list of terms (parameters b0, b1 ...) or a mapping of
    /// parameter name to term, in order.
    /// </summary>
    private static BasisModel? ReadTerms(MapReader model, int inputCount)
    {
        var where = model.Path("terms");
        var node = model.Node("terms");
        var items = new List<(string? Name, YamlNode NameNode, string Text, YamlNode Node)>();
        switch (node)
        {
            case null:
                model.Text("terms", required: true); // reports the missing key
                return null;
            case YamlList:
                items.AddRange(model.TextList("terms", required: true).Select(t => ((string?)null, t.Node, t.Text, t.Node)));
                break;
            case YamlMap:
                var map = model.Map("terms", knownKeys: null, required: true)!;
                if (!map.Entries.Any())
                {
                    map.Sink.Add(RecipeCodes.BadValue, Messages.EmptyList(where), node);
                }

                foreach (var entry in map.Entries)
                {
                    if (MapReader.ReadText(entry.Value, map.Path(entry.Key.Text), map.Sink) is { } text)
                    {
                        items.Add((entry.Key.Text, entry.Key, text, entry.Value));
                    }
                }

                break;
            default:
                model.Sink.Add(RecipeCodes.BadValue, Messages.ExpectedList(where), node);
                return null;
        }

        if (items.Count > MaxTerms)
        {
            model.Sink.Add(RecipeCodes.BadValue, Messages.TooManyTerms(where, items.Count, MaxTerms), node);
            return null;
        }

        var symbols = BasisTerm.InputSymbols(inputCount);
        var terms = new List<BasisTerm>();
        var ok = items.Count > 0;
        foreach (var (name, nameNode, text, at) in items)
        {
            if (name is not null && !IsParameterName(name))
            {
                model.Sink.Add(RecipeCodes.BadValue, Messages.BadParameterName(where, name), nameNode);
                ok = false;
            }

            var (term, error) = BasisTermParser.Parse(text, inputCount);
            if (error is not null)
            {
                var message = error.Kind switch
                {
                    TermErrorKind.UnknownFunction => Messages.TermUnknownFunction(where, text, error.Token, SuggestFunction(error.Token)),
                    TermErrorKind.UnknownInput => Messages.TermUnknownInput(where, text, error.Token, SuggestInput(error.Token, symbols), symbols),
                    TermErrorKind.BadPower => Messages.TermBadPower(where, text, error.Token, error.Expected),
                    _ => Messages.TermSyntax(where, text, error.Position, error.Expected),
                };
                model.Sink.Add(RecipeCodes.BadValue, message, at);
                ok = false;
                continue;
            }

            if (terms.FirstOrDefault(t => t.Equals(term)) is { } earlier)
            {
                model.Sink.Add(RecipeCodes.Contradiction, Messages.DuplicateTerm(where, text, earlier.Text), at);
                ok = false;
                continue;
            }

            terms.Add(term!);
        }

        for (var k = 0; ok && k < inputCount; k++)
        {
            if (!terms.Any(t => t.Uses(k)))
            {
                model.Sink.Add(RecipeCodes.Contradiction, Messages.UnusedInput(where, symbols[k], k + 1), node);
                ok = false;
            }
        }

        if (!ok)
        {
            return null;
        }

        return items[0].Name is null
            ? new BasisModel(terms, inputCount)
            : new BasisModel(terms, inputCount, items.Select(i => i.Name!));
    }

    /// <summary>The function meant: 'log' (and 'loge') is the natural logarithm of most languages, so 'ln'; else the closest name.</summary>
    private static string? SuggestFunction(string token) =>
        token.ToUpperInvariant() is "LOG" or "LOGE" ? "ln" : Suggestions.Closest(token, BasisTermParser.Functions);

    /// <summary>No suggestion for an input number the recipe does not have (x3 of two inputs): the message lists the inputs.</summary>
    private static string? SuggestInput(string token, IReadOnlyCollection<string> symbols) =>
        token.Length > 1 && (token[0] is 'x' or 'X') && token[1..].All(char.IsAsciiDigit) && symbols.Count > 1 ? null : Suggestions.Closest(token, symbols);

    private static bool IsParameterName(string name) =>
        name.Length is > 0 and <= 32 && char.IsAsciiLetter(name[0]) && name.All(c => char.IsAsciiLetterOrDigit(c) || c == '_');

    /// <summary>The weights: the uncertainty column, the rule, or neither (an unweighted fit). Null after a problem.</summary>
    private static Weights? ReadWeights(MapReader top)
    {
        var weights = top.Map("weights", WeightKeys, required: false);
        if (weights is null)
        {
            return top.Has("weights") ? null : new Weights(null, null);
        }

        var column = weights.Text("column", required: false);
        var hasRule = weights.Has("u_fixed") || weights.Has("u_relative");
        if (weights.Has("column") && hasRule)
        {
            weights.Sink.Add(RecipeCodes.Contradiction, Messages.WeightsTwoSources(weights.Where), weights.Mapping);
            return null;
        }

        if (weights.Has("column"))
        {
            return column is null ? null : new Weights(column, null);
        }

        if (!hasRule)
        {
            weights.Sink.Add(RecipeCodes.MissingKey, Messages.WeightsNeedSource(weights.Where), weights.Mapping);
            return null;
        }

        var fixedPart = weights.Number("u_fixed", required: true);
        var relative = weights.Number("u_relative", required: true);
        if (fixedPart is null || relative is null)
        {
            return null;
        }

        var ok = true;
        foreach (var (key, value) in new[] { ("u_fixed", fixedPart.Value), ("u_relative", relative.Value) })
        {
            if (value < 0)
            {
                weights.Sink.Add(RecipeCodes.BadValue, Messages.OutOfRange(weights.Path(key), Numbers.Format(value), "0 or more"), weights.Node(key));
                ok = false;
            }
        }

        if (ok && fixedPart.Value == 0 && relative.Value == 0)
        {
            weights.Sink.Add(RecipeCodes.BadValue, Messages.WeightRuleZero(weights.Where), weights.Mapping);
            ok = false;
        }

        return ok ? new Weights(null, new WeightRule(fixedPart.Value, relative.Value)) : null;
    }

    private static ConfidenceLevel? ReadConfidence(MapReader top)
    {
        var value = top.Number("confidence", required: true);
        if (value is null)
        {
            return null;
        }

        if (!ConfidenceLevel.TryCreate(value.Value, out var level))
        {
            top.Sink.Add(RecipeCodes.BadValue, Messages.OutOfRange("'confidence'", Numbers.Format(value.Value), "a fraction from 0.5 to 0.999999 (0.95 is 95 %)"), top.Node("confidence"));
            return null;
        }

        return level;
    }

    private static ImmutableArray<FigureLimit> ReadLimits(MapReader top, LinearModel? model)
    {
        var limits = top.Map("limits", knownKeys: null, required: false);
        if (limits is null)
        {
            return [];
        }

        var builder = ImmutableArray.CreateBuilder<FigureLimit>();
        foreach (var entry in limits.Entries)
        {
            var figure = entry.Key.Text;
            if (model is not null && !HasFigure(model, figure))
            {
                limits.Sink.Add(RecipeCodes.UnknownFigure, Messages.UnknownFigure(figure, model.Name, model.ParameterNames.Concat(model.DerivedNames).Distinct()), entry.Key);
            }

            var bounds = limits.Map(figure, LimitKeys, required: true);
            if (bounds is null)
            {
                continue;
            }

            var min = bounds.Number("min", required: false);
            var max = bounds.Number("max", required: false);
            var hasMin = bounds.Has("min");
            var hasMax = bounds.Has("max");
            if (!hasMin && !hasMax)
            {
                bounds.Sink.Add(RecipeCodes.MissingKey, Messages.LimitNeedsBound(bounds.Where), entry.Value);
                continue;
            }

            if ((hasMin && min is null) || (hasMax && max is null))
            {
                continue; // already reported
            }

            if (min is { } lo && max is { } hi && lo > hi)
            {
                bounds.Sink.Add(RecipeCodes.Contradiction, Messages.MinAboveMax(bounds.Where, Numbers.Format(lo), Numbers.Format(hi)), bounds.Node("min"));
                continue;
            }

            if (model is not null && HasFigure(model, figure))
            {
                builder.Add(new FigureLimit(figure, min, max));
            }
        }

        return builder.ToImmutable();
    }

    private static RunsGate? ReadGates(MapReader top)
    {
        var gates = top.Map("gates", GateKeys, required: false);
        var runs = gates?.Map("runs_test", RunsGateKeys, required: false);
        if (runs is null)
        {
            return null;
        }

        var floor = runs.Number("p_min", required: true);
        if (floor is null)
        {
            return null;
        }

        if (!(floor.Value is > 0 and < 0.5))
        {
            runs.Sink.Add(RecipeCodes.BadValue, Messages.OutOfRange(runs.Path("p_min"), Numbers.Format(floor.Value), "a p-value above 0 and below 0.5 (0.01 is common)"), runs.Node("p_min"));
            return null;
        }

        return new RunsGate(floor.Value);
    }

    /// <summary>A figure is a parameter of the model or one of its derived quantities.</summary>
    private static bool HasFigure(LinearModel model, string figure) =>
        model.ParameterNames.IndexOf(figure) >= 0 || model.DerivedNames.IndexOf(figure) >= 0;

    private sealed record Weights(string? Column, WeightRule? Rule);
}
