using System.Collections.Immutable;
using System.Globalization;
using StandFit.Core.Diagnostics;
using StandFit.Core.Evaluation;
using StandFit.Core.Fitting;
using StandFit.Core.Ingest;
using StandFit.Core.Judging;
using StandFit.Core.Merit;
using StandFit.Core.Problems;
using StandFit.Core.Recipes;
using StandFit.Core.Screening;
using StandFit.Core.Uncertainty;

namespace StandFit.Edges.RecipeFiles;

/// <summary>
/// The recipe language (described by <see cref="RecipeSchema"/>): binds a recipe's YAML tree to the
/// core's immutable <see cref="Recipe"/>, reporting every problem of the file at once.
/// docs/recipes.md documents each key.
/// </summary>
public static partial class RecipeBinder
{
    public static readonly ImmutableArray<string> TopKeys = RecipeSchema.Root.ChildNames;
    public static readonly ImmutableArray<string> ColumnKeys = RecipeSchema.Root.Child("columns").ChildNames;
    public static readonly ImmutableArray<string> UnitKeys = RecipeSchema.Root.Child("units").ChildNames;
    public static readonly ImmutableArray<string> ModelKeys = RecipeSchema.Root.Child("model").ChildNames;
    public static readonly ImmutableArray<string> ModelTypes = RecipeSchema.ModelTypes;
    public static readonly ImmutableArray<string> LimitKeys = RecipeSchema.Root.Child("limits").ChildNames;
    public static readonly ImmutableArray<string> GateKeys = RecipeSchema.Root.Child("gates").ChildNames;
    public static readonly ImmutableArray<string> RunsGateKeys = RecipeSchema.Root.Child("gates").Child("runs_test").ChildNames;

    public static readonly ImmutableArray<string> DecimalSeparators = RecipeSchema.DecimalSeparators;
    public static readonly ImmutableArray<string> TemperatureUnits = RecipeSchema.TemperatureUnits;
    public static readonly ImmutableArray<string> WeightKeys = RecipeSchema.Root.Child("weights").ChildNames;

    /// <summary>The most stimulus columns a recipe may name (the inputs x1 ... x9).</summary>
    public const int MaxInputs = 9;

    /// <summary>The most terms a basis model may have.</summary>
    public const int MaxTerms = 20;

    private static readonly KeySpec Root = RecipeSchema.Root;

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

        return Bind(root, sink, contentHash);
    }

    /// <summary>Binds a recipe tree (a family's keys already merged in); problems go to <paramref name="sink"/>.</summary>
    public static Result<Recipe> Bind(YamlMap root, ProblemSink sink, string contentHash)
    {
        var top = new MapReader(root, "the file", sink, TopKeys);
        var name = top.Text("recipe", required: true);
        var version = top.Text("version", required: true);
        var family = top.Boolean("family", required: false) ?? false;
        var extends = top.Text("extends", required: false);
        var parts = top.TextList("parts", required: false);
        if (!family && !top.Has("parts") && !root.Entries.Any(e => e.Key.Text == "parts"))
        {
            sink.Add(RecipeCodes.MissingKey, Messages.PartsNeeded(), root);
        }

        var patterns = top.TextList("file_patterns", required: false);
        var (columns, inputCount) = ReadColumns(top);
        var units = ReadUnits(top, inputCount);
        var model = ReadModel(top, inputCount);
        var format = ReadFormat(top);
        var confidence = ReadConfidence(top);
        var weights = ReadWeights(top);
        if (columns is not null && weights?.Column is { } uncertainty && top.Node("weights") is YamlMap weightsMap)
        {
            var roles = columns.Inputs.Select(i => ("stimulus", i, (YamlNode)root)).ToList();
            roles.AddRange(new[] { ("output", columns.Output), ("leg", columns.Leg), ("order", columns.Order) }.Where(r => r.Item2 is not null).Select(r => (r.Item1, r.Item2!, (YamlNode)root)));
            roles.Add(("uncertainty ('weights.column')", uncertainty, weightsMap.Entries.First(e => e.Key.Text == "column").Value));
            if (!CheckOneRole(roles, sink))
            {
                weights = null;
            }
        }
        var derived = ReadDerived(top, model);
        var decision = ReadDecision(top);
        var limits = ReadLimits(top, model, derived, decision);
        var resampling = ReadResampling(top, columns, limits);
        var sweep = ReadSweep(top, columns);
        var gates = top.Map("gates", GateKeys, required: false);
        var runsGate = ReadGates(gates);
        var diagnosticGates = ReadDiagnosticGates(gates);
        var setPointTolerance = ReadSetPoints(top);
        var nominal = ReadNominal(top);
        var points = ReadOutput(top);
        CheckNominalFigures(top, limits, nominal);
        CheckExpressionRecipe(top, model);
        CheckCurveUses(top, model, derived, inputCount);

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
            sink.File,
            weights.Rule,
            format)
        {
            Derived = derived,
            Sweep = sweep,
            FilePatterns = [.. patterns.Select(p => p.Text)],
            Extends = extends,
            IsFamily = family,
            Resampling = resampling,
            DiagnosticGates = diagnosticGates,
            SetPointTolerance = setPointTolerance,
            Nominal = nominal,
            Points = points,
        };
    }

    /// <summary>The <c>output</c> section: which units' points go to the per-point table.</summary>
    private static PointsOutput ReadOutput(MapReader top)
    {
        var section = top.Map("output", Root.Child("output").ChildNames, required: false);
        var text = section?.Text("points", required: false);
        switch (text)
        {
            case null or "all":
                return PointsOutput.All;
            case "flagged":
                return PointsOutput.Flagged;
            case "none":
                return PointsOutput.None;
            default:
                section!.Sink.Add(RecipeCodes.BadValue, Messages.UnknownChoice(section.Path("points"), text, RecipeSchema.PointsOutputs, Suggestions.Closest(text, RecipeSchema.PointsOutputs)), section.Node("points"));
                return PointsOutput.All;
        }
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

        // One column, one role: a column read as both stimulus and output (or leg, or order) is a contradiction.
        var roles = inputs.Select(i => ("stimulus", i.Text, i.Node)).ToList();
        foreach (var (role, text) in new[] { ("output", output), ("leg", leg), ("order", order) })
        {
            if (text is not null)
            {
                roles.Add((role, text, columns.Node(role)!));
            }
        }

        ok &= CheckOneRole(roles, columns.Sink);
        var count = Math.Clamp(inputs.Count, 1, MaxInputs);
        return !ok || output is null ? (null, count) : (new ColumnMap([.. inputs.Select(i => i.Text)], output, leg, order), count);
    }

    /// <summary>Reports each column named after an earlier one of another role (header names match ignoring case); true when none is.</summary>
    private static bool CheckOneRole(List<(string Role, string Text, YamlNode Node)> roles, ProblemSink sink)
    {
        var ok = true;
        for (var k = 1; k < roles.Count; k++)
        {
            var first = roles.FindIndex(r => string.Equals(r.Text, roles[k].Text, StringComparison.OrdinalIgnoreCase));
            if (first < k && roles[first].Role != roles[k].Role)
            {
                sink.Add(RecipeCodes.Contradiction, Messages.ColumnInTwoRoles(roles[k].Text, roles[k].Role, roles[first].Role), roles[k].Node);
                ok = false;
            }
        }

        return ok;
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

    private static CurveModel? ReadModel(MapReader top, int inputCount)
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
        foreach (var (key, owner) in new[] { ("degree", "polynomial"), ("terms", "basis"), ("temperature", "steinhart-hart"), ("expression", "expression"), ("parameters", "expression"), ("max_iterations", "expression") })
        {
            if (type != owner && model.Node(key) is { } stray)
            {
                model.Sink.Add(RecipeCodes.Contradiction, Messages.KeyNotForModel(key, owner, type), stray);
                ok = false;
            }
        }

        if (type is not ("basis" or "expression") && inputCount != 1)
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
            case "expression":
                var expression = ReadExpression(model, inputCount);
                return ok ? expression : null;
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

    private sealed record Decision(DecisionRule Rule, GuardBand? Guard, IntervalSource? Interval = null);

    private static Decision? ReadDecision(MapReader top)
    {
        var section = top.Map("decision", Root.Child("decision").ChildNames, required: false);
        if (section is null)
        {
            return null;
        }

        var rule = ReadRule(section, required: true);
        var guard = ReadCoverage(section, rule);
        var interval = ReadInterval(section, rule);
        return rule is null ? null : new Decision(rule.Value, guard, interval);
    }

    private static DecisionRule? ReadRule(MapReader section, bool required)
    {
        var text = section.Text("rule", required);
        switch (text)
        {
            case null:
                return null;
            case "guarded":
                return DecisionRule.Guarded;
            case "simple":
                return DecisionRule.Simple;
            default:
                section.Sink.Add(RecipeCodes.BadValue, Messages.UnknownChoice(section.Path("rule"), text, RecipeSchema.Rules, Suggestions.Closest(text, RecipeSchema.Rules)), section.Node("rule"));
                return null;
        }
    }

    private static GuardBand? ReadCoverage(MapReader section, DecisionRule? rule)
    {
        var spec = CoverageSpec();
        var k = section.Number("coverage_factor", required: false);
        if (k is null)
        {
            return null;
        }

        if (rule == DecisionRule.Simple)
        {
            section.Sink.Add(RecipeCodes.Contradiction, Messages.CoverageWithoutGuarded(section.Where), section.Node("coverage_factor"));
            return null;
        }

        if (k.Value < spec.Minimum || k.Value > spec.Maximum)
        {
            section.Sink.Add(RecipeCodes.BadValue, Messages.OutOfRange(section.Path("coverage_factor"), Numbers.Format(k.Value), "from 1 to 10 (2 is common)"), section.Node("coverage_factor"));
            return null;
        }

        return GuardBand.WithCoverageFactor(k.Value);
    }

    private static KeySpec CoverageSpec() => Root.Child("decision").Child("coverage_factor");

    private static ImmutableArray<DerivedFigure> ReadDerived(MapReader top, CurveModel? model)
    {
        var section = top.Map("derived", knownKeys: null, required: false);
        if (section is null)
        {
            return [];
        }

        var builder = ImmutableArray.CreateBuilder<DerivedFigure>();
        var fitFigures = model is null ? ImmutableDictionary<string, bool>.Empty : FigureTable.Names(model, []);
        foreach (var entry in section.Entries)
        {
            var name = entry.Key.Text;
            if (fitFigures.ContainsKey(name))
            {
                section.Sink.Add(RecipeCodes.Contradiction, Messages.DerivedNameClash(name), entry.Key);
                continue;
            }

            var figure = section.Map(name, Root.Child("derived").ChildNames, required: true);
            if (figure is null)
            {
                continue;
            }

            var kinds = new[] { ("sensitivity_at", DerivedKind.SensitivityAt), ("value_at", DerivedKind.ValueAt), ("band_at", DerivedKind.BandAt), ("inverse_at", DerivedKind.InverseAt) };
            var given = kinds.Where(k => figure.Has(k.Item1)).ToList();
            if (given.Count != 1)
            {
                figure.Sink.Add(RecipeCodes.BadValue, Messages.DerivedNeedsOneKey(figure.Where), entry.Value);
                continue;
            }

            if (figure.Number(given[0].Item1, required: true) is { } at)
            {
                builder.Add(new DerivedFigure(name, given[0].Item2, at));
            }
        }

        return builder.ToImmutable();
    }

    private static ImmutableArray<FigureLimit> ReadLimits(MapReader top, CurveModel? model, ImmutableArray<DerivedFigure> derived, Decision? decision)
    {
        var limits = top.Map("limits", knownKeys: null, required: false);
        if (limits is null)
        {
            return [];
        }

        if (decision is null && !top.Has("decision") && limits.Entries.Any())
        {
            limits.Sink.Add(RecipeCodes.MissingKey, Messages.DecisionNeeded(), top.KeyNode("limits"));
        }

        var figures = model is null ? null : FigureTable.Names(model, derived);
        var builder = ImmutableArray.CreateBuilder<FigureLimit>();
        foreach (var entry in limits.Entries)
        {
            var figure = entry.Key.Text;
            var known = figures is null || figures.ContainsKey(figure);
            if (!known)
            {
                limits.Sink.Add(RecipeCodes.UnknownFigure, Messages.UnknownFigure(figure, model!.Name, ModelFigures(model, derived), Suggestions.Closest(figure, AllFigures(model, derived))), entry.Key);
            }

            var bounds = limits.Map(figure, LimitKeys, required: true);
            if (bounds is null)
            {
                continue;
            }

            var min = bounds.Number("min", required: false);
            var max = bounds.Number("max", required: false);
            var ownRule = ReadRule(bounds, required: false);
            var rule = ownRule ?? decision?.Rule;
            var guard = ReadCoverage(bounds, rule) ?? (ownRule is null ? decision?.Guard : null);
            var interval = ReadInterval(bounds, rule) ?? (ownRule is null ? decision?.Interval : null) ?? IntervalSource.T;
            var hasMin = bounds.Has("min");
            var hasMax = bounds.Has("max");
            if (!hasMin && !hasMax)
            {
                bounds.Sink.Add(RecipeCodes.MissingKey, Messages.LimitNeedsBound(bounds.Where), entry.Value);
                continue;
            }

            if ((hasMin && min is null) || (hasMax && max is null) || rule is null)
            {
                continue; // already reported
            }

            if (min is { } lo && max is { } hi && lo > hi)
            {
                bounds.Sink.Add(RecipeCodes.Contradiction, Messages.MinAboveMax(bounds.Where, Numbers.Format(lo), Numbers.Format(hi)), bounds.Node("min"));
                continue;
            }

            if (figures is not null && figures.TryGetValue(figure, out var hasUncertainty) && !hasUncertainty && rule == DecisionRule.Guarded)
            {
                bounds.Sink.Add(RecipeCodes.Contradiction, Messages.GuardedNeedsUncertainty(figure), entry.Key);
                continue;
            }

            if (known && figures is not null)
            {
                builder.Add(new FigureLimit(figure, min, max) { Rule = rule.Value, Guard = rule == DecisionRule.Guarded ? guard : null, Interval = rule == DecisionRule.Guarded ? interval : IntervalSource.T });
            }
        }

        return builder.ToImmutable();
    }

    /// <summary>The figures a recipe can limit, in the order a reader expects: parameters, half-widths, derived, fit figures.</summary>
    /// <summary>The figures this model and these derived figures add: parameters, trade coefficients, their half-widths, the recipe's derived figures.</summary>
    private static IEnumerable<string> ModelFigures(CurveModel model, ImmutableArray<DerivedFigure> derived) =>
        model.ParameterNames.Concat(model.DerivedNames)
            .Concat(model.ParameterNames.Concat(model.DerivedNames).Select(p => p + FigureTable.HalfWidthSuffix))
            .Concat(derived.SelectMany(d => d.Kind == DerivedKind.BandAt
                ? new[] { d.Name, d.Name + FigureTable.HalfWidthSuffix, d.Name + FigureTable.PredictionHalfWidthSuffix }
                : [d.Name, d.Name + FigureTable.HalfWidthSuffix]));

    private static IEnumerable<string> AllFigures(CurveModel model, ImmutableArray<DerivedFigure> derived) =>
        ModelFigures(model, derived)
            .Concat(FigureTable.FitFigures)
            .Concat(FigureTable.DiagnosticFigures)
            .Concat(FigureTable.NominalFigures);

    private static SweepExpectations ReadSweep(MapReader top, ColumnMap? columns)
    {
        var spec = Root.Child("sweep");
        var sweep = top.Map("sweep", spec.ChildNames, required: false);
        if (sweep is null)
        {
            return SweepExpectations.None;
        }

        var minPoints = sweep.Integer("min_points", required: false);
        if (minPoints is < 2)
        {
            sweep.Sink.Add(RecipeCodes.BadValue, Messages.OutOfRange(sweep.Path("min_points"), minPoints.Value.ToString(CultureInfo.InvariantCulture), "a whole number of at least 2"), sweep.Node("min_points"));
        }

        StimulusRange? range = null;
        var rangeMap = sweep.Map("range", spec.Child("range").ChildNames, required: false);
        if (rangeMap is not null)
        {
            var lo = rangeMap.Number("min", required: true);
            var hi = rangeMap.Number("max", required: true);
            if (lo is { } a && hi is { } b)
            {
                if (a >= b)
                {
                    var message = a == b ? Messages.EmptyRange(rangeMap.Where, Numbers.Format(a)) : Messages.MinAboveMax(rangeMap.Where, Numbers.Format(a), Numbers.Format(b));
                    rangeMap.Sink.Add(RecipeCodes.Contradiction, message, rangeMap.Node("min"));
                }
                else
                {
                    range = new StimulusRange(a, b);
                }
            }
        }

        var span = sweep.Number("span_percent", required: false);
        if (span is { } sp && !(sp is > 0 and <= 100))
        {
            sweep.Sink.Add(RecipeCodes.BadValue, Messages.OutOfRange(sweep.Path("span_percent"), Numbers.Format(sp), "above 0 and at most 100"), sweep.Node("span_percent"));
        }

        if (span is not null && rangeMap is null)
        {
            sweep.Sink.Add(RecipeCodes.MissingKey, Messages.NeedsRange(sweep.Path("span_percent")), sweep.Node("span_percent"));
        }

        var legs = ImmutableArray.CreateBuilder<Leg>();
        foreach (var (text, node) in sweep.TextList("legs", required: false))
        {
            if (text == "up" || text == "down")
            {
                legs.Add(text == "up" ? Leg.Up : Leg.Down);
            }
            else
            {
                sweep.Sink.Add(RecipeCodes.BadValue, Messages.UnknownChoice(sweep.Path("legs"), text, RecipeSchema.LegNames, Suggestions.Closest(text, RecipeSchema.LegNames)), node);
            }
        }

        var tolerance = sweep.Number("monotonic_tolerance", required: false);
        if (tolerance is < 0)
        {
            sweep.Sink.Add(RecipeCodes.BadValue, Messages.OutOfRange(sweep.Path("monotonic_tolerance"), Numbers.Format(tolerance.Value), "zero or more"), sweep.Node("monotonic_tolerance"));
        }

        foreach (var needsLeg in new[] { "legs", "monotonic_tolerance" })
        {
            if (sweep.Has(needsLeg) && columns is not null && columns.Leg is null)
            {
                sweep.Sink.Add(RecipeCodes.Contradiction, Messages.NeedsLegColumn(sweep.Path(needsLeg)), sweep.Node(needsLeg));
            }
        }

        var saturation = sweep.Integer("saturation_run", required: false);
        if (saturation is < 2)
        {
            sweep.Sink.Add(RecipeCodes.BadValue, Messages.OutOfRange(sweep.Path("saturation_run"), saturation.Value.ToString(CultureInfo.InvariantCulture), "a whole number of at least 2"), sweep.Node("saturation_run"));
        }

        var duplicates = sweep.Boolean("duplicate_rows", required: false) ?? false;
        return new SweepExpectations
        {
            MinPoints = minPoints,
            Range = range,
            SpanPercent = span,
            Legs = legs.ToImmutable(),
            MonotonicTolerance = tolerance,
            SaturationRun = saturation,
            RejectDuplicateRows = duplicates,
        };
    }

    private static ImmutableArray<DiagnosticGate> ReadDiagnosticGates(MapReader? gates)
    {
        if (gates is null)
        {
            return [];
        }

        var spec = Root.Child("gates");
        var builder = ImmutableArray.CreateBuilder<DiagnosticGate>();
        foreach (var entry in gates.Entries)
        {
            var key = entry.Key.Text;
            var kind = key switch
            {
                "durbin_watson" => DiagnosticGateKind.DurbinWatson,
                "lack_of_fit" => DiagnosticGateKind.LackOfFit,
                "curvature" => DiagnosticGateKind.Curvature,
                "normality" => DiagnosticGateKind.Normality,
                "heteroscedasticity" => DiagnosticGateKind.Heteroscedasticity,
                "outliers" => DiagnosticGateKind.Outliers,
                _ => (DiagnosticGateKind?)null,
            };
            if (kind is null)
            {
                continue; // runs_test, read by ReadGates
            }

            var gate = gates.Map(key, spec.Child(key).ChildNames, required: false);
            if (gate is null)
            {
                continue;
            }

            var normality = NormalityTest.ShapiroWilk;
            var order = ResidualOrder.Acquisition;
            if (kind == DiagnosticGateKind.DurbinWatson)
            {
                order = ReadOrder(gate, ResidualOrder.Acquisition);
            }

            if (kind == DiagnosticGateKind.Normality)
            {
                var test = gate.Text("test", required: true);
                switch (test)
                {
                    case null:
                        break;
                    case "shapiro-wilk":
                        normality = NormalityTest.ShapiroWilk;
                        break;
                    case "anderson-darling":
                        normality = NormalityTest.AndersonDarling;
                        break;
                    default:
                        gate.Sink.Add(RecipeCodes.BadValue, Messages.UnknownChoice(gate.Path("test"), test, RecipeSchema.NormalityTests, Suggestions.Closest(test, RecipeSchema.NormalityTests)), gate.Node("test"));
                        break;
                }
            }

            if (ReadFloor(gate) is { } floor)
            {
                builder.Add(new DiagnosticGate(kind.Value, floor, normality, order));
            }
        }

        return builder.ToImmutable();
    }

    /// <summary>A gate's <c>order</c> (stimulus, acquisition or per-leg), or <paramref name="fallback"/> when not given or not valid (reported).</summary>
    private static ResidualOrder ReadOrder(MapReader gate, ResidualOrder fallback)
    {
        var text = gate.Text("order", required: false);
        if (text is null)
        {
            return fallback;
        }

        if (ResidualOrderNames.Parse(text) is { } order)
        {
            return order;
        }

        gate.Sink.Add(RecipeCodes.BadValue, Messages.UnknownChoice(gate.Path("order"), text, RecipeSchema.OrderChoices, Suggestions.Closest(text, RecipeSchema.OrderChoices)), gate.Node("order"));
        return fallback;
    }

    private static double? ReadFloor(MapReader gate)
    {
        var floor = gate.Number("p_min", required: true);
        if (floor is null)
        {
            return null;
        }

        if (!(floor.Value is > 0 and < 0.5))
        {
            gate.Sink.Add(RecipeCodes.BadValue, Messages.OutOfRange(gate.Path("p_min"), Numbers.Format(floor.Value), "a p-value above 0 and below 0.5 (0.01 is common)"), gate.Node("p_min"));
            return null;
        }

        return floor;
    }

    private static double ReadSetPoints(MapReader top)
    {
        var section = top.Map("set_points", Root.Child("set_points").ChildNames, required: false);
        var tolerance = section?.Number("tolerance", required: true);
        if (section is null || tolerance is null)
        {
            return 0;
        }

        if (!(tolerance.Value >= 0))
        {
            section.Sink.Add(RecipeCodes.BadValue, Messages.OutOfRange(section.Path("tolerance"), Numbers.Format(tolerance.Value), "zero or more (stimulus units)"), section.Node("tolerance"));
            return 0;
        }

        return tolerance.Value;
    }

    private static NominalLine? ReadNominal(MapReader top)
    {
        var section = top.Map("nominal", Root.Child("nominal").ChildNames, required: false);
        if (section is null)
        {
            return null;
        }

        var offset = section.Number("offset", required: true);
        var gain = section.Number("gain", required: true);
        if (offset is null || gain is null)
        {
            return null;
        }

        if (gain.Value == 0)
        {
            section.Sink.Add(RecipeCodes.BadValue, Messages.OutOfRange(section.Path("gain"), "0", "a sensitivity other than 0"), section.Node("gain"));
            return null;
        }

        return new NominalLine(offset.Value, gain.Value);
    }

    /// <summary>A limit on an error against the nominal curve needs the curve.</summary>
    private static void CheckNominalFigures(MapReader top, ImmutableArray<FigureLimit> limits, NominalLine? nominal)
    {
        if (nominal is not null || top.Has("nominal"))
        {
            return;
        }

        var section = top.Node("limits") as YamlMap;
        foreach (var limit in limits.Where(l => FigureTable.NominalFigures.Contains(l.Figure)))
        {
            var node = section?.Entries.FirstOrDefault(e => e.Key.Text == limit.Figure)?.Key;
            top.Sink.Add(RecipeCodes.Contradiction, Messages.NominalNeeded(limit.Figure), node);
        }
    }

    private static RunsGate? ReadGates(MapReader? gates)
    {
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

        var order = ReadOrder(runs, ResidualOrder.Stimulus);
        return new RunsGate(floor.Value, order);
    }

    private sealed record Weights(string? Column, WeightRule? Rule);
}
