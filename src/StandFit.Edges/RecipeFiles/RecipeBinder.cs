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
    public static readonly ImmutableArray<string> TopKeys = ["recipe", "version", "parts", "columns", "decimal_separator", "units", "model", "confidence", "limits", "gates"];
    public static readonly ImmutableArray<string> DecimalSeparators = ["point", "comma"];
    public static readonly ImmutableArray<string> ColumnKeys = ["stimulus", "output", "leg", "order"];
    public static readonly ImmutableArray<string> UnitKeys = ["stimulus", "output"];
    public static readonly ImmutableArray<string> ModelKeys = ["type", "degree"];
    public static readonly ImmutableArray<string> ModelTypes = ["straight-line", "straight-line-through-zero", "polynomial"];
    public static readonly ImmutableArray<string> LimitKeys = ["min", "max"];
    public static readonly ImmutableArray<string> GateKeys = ["runs_test"];
    public static readonly ImmutableArray<string> RunsGateKeys = ["p_min"];

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
        var columns = ReadColumns(top);
        var format = ReadFormat(top);
        var units = ReadUnits(top);
        var model = ReadModel(top);
        var confidence = ReadConfidence(top);
        var limits = ReadLimits(top, model);
        var runsGate = ReadGates(top);

        if (sink.HasProblems || name is null || version is null || columns is null || model is null || confidence is null)
        {
            return Result<Recipe>.Failure(sink.Problems);
        }

        return new Recipe(
            name,
            version,
            [.. parts.Select(p => p.Text)],
            columns,
            units ?? ColumnUnits.None,
            model,
            confidence.Value,
            limits,
            runsGate,
            contentHash,
            file,
            format);
    }

    private static SweepFormat ReadFormat(MapReader top)
    {
        var text = top.Text("decimal_separator", required: false);
        switch (text)
        {
            case null or "point":
                return SweepFormat.Standard;
            case "comma":
                return SweepFormat.DecimalComma;
            default:
                top.Sink.Add(RecipeCodes.BadValue, Messages.UnknownChoice("'decimal_separator'", text, DecimalSeparators, Suggestions.Closest(text, DecimalSeparators)), top.Node("decimal_separator"));
                return SweepFormat.Standard;
        }
    }

    private static ColumnMap? ReadColumns(MapReader top)
    {
        var columns = top.Map("columns", ColumnKeys, required: true);
        if (columns is null)
        {
            return null;
        }

        var stimulus = columns.Text("stimulus", required: true);
        var output = columns.Text("output", required: true);
        var leg = columns.Text("leg", required: false);
        var order = columns.Text("order", required: false);
        return stimulus is null || output is null ? null : new ColumnMap(stimulus, output, leg, order);
    }

    private static ColumnUnits? ReadUnits(MapReader top)
    {
        var units = top.Map("units", UnitKeys, required: false);
        if (units is null)
        {
            return null;
        }

        return new ColumnUnits(units.Text("stimulus", required: true) ?? "", units.Text("output", required: true) ?? "");
    }

    private static LinearModel? ReadModel(MapReader top)
    {
        var model = top.Map("model", ModelKeys, required: true);
        if (model is null)
        {
            return null;
        }

        var type = model.Text("type", required: true);
        var degreeNode = model.Node("degree");
        var degree = model.Integer("degree", required: type == "polynomial");
        switch (type)
        {
            case null:
                return null;
            case "straight-line" or "straight-line-through-zero":
                if (degreeNode is not null)
                {
                    model.Sink.Add(RecipeCodes.Contradiction, Messages.DegreeWithoutPolynomial(type), degreeNode);
                    return null;
                }

                return type == "straight-line" ? Polynomial.StraightLine : Polynomial.StraightLineThroughZero;
            case "polynomial":
                if (degree is null)
                {
                    return null;
                }

                if (degree is < 1 or > Polynomial.MaxDegree)
                {
                    model.Sink.Add(RecipeCodes.BadValue, Messages.OutOfRange(model.Path("degree"), degree.Value.ToString(CultureInfo.InvariantCulture), "a whole number from 1 to 10"), degreeNode);
                    return null;
                }

                return Polynomial.OfDegree(degree.Value);
            default:
                model.Sink.Add(RecipeCodes.BadValue, Messages.UnknownChoice(model.Path("type"), type, ModelTypes, Suggestions.Closest(type, ModelTypes)), model.Node("type"));
                return null;
        }
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
            if (model is not null && model.ParameterNames.IndexOf(figure) < 0)
            {
                limits.Sink.Add(RecipeCodes.UnknownFigure, Messages.UnknownFigure(figure, model.Name, model.ParameterNames), entry.Key);
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

            if (model is not null && model.ParameterNames.IndexOf(figure) >= 0)
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
}
