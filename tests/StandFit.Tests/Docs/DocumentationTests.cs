using System.Globalization;
using System.Reflection;
using System.Text.Json.Serialization;
using System.Text.RegularExpressions;
using System.Xml.Linq;
using Microsoft.Extensions.Logging;
using StandFit.Core.Evaluation;
using StandFit.Core.Problems;
using StandFit.Edges.Configuration;
using StandFit.Edges.Logging;
using StandFit.Edges.Outputs;
using StandFit.Edges.RecipeFiles;
using StandFit.Tests.Support;

namespace StandFit.Tests.Docs;

/// <summary>
/// The engineer-facing pages in docs/ checked against the code they describe, in both directions
/// where a page holds a reference table: everything the code has is documented, and nothing
/// documented is gone from the code. The SQL examples are run against a real demo run.
/// </summary>
public sealed partial class DocumentationTests(DocumentationTests.DemoOutput demo) : IClassFixture<DocumentationTests.DemoOutput>
{
    private static readonly TimeSpan Timeout = TimeSpan.FromMinutes(3);

    [Fact]
    public void Every_reason_code_is_documented()
    {
        var page = Page("reasons.md");
        var rows = CodeRows(page, "## Reason codes");
        var documented = rows.Select(r => r.Code).ToList();

        foreach (var reason in ReasonCodes.All)
        {
            Assert.True(page.Contains("`" + reason.Code + "`", StringComparison.Ordinal), $"docs/reasons.md does not mention `{reason.Code}`.");
            var row = rows.Where(r => r.Code == reason.Code).ToList();
            Assert.True(row.Count == 1, $"`{reason.Code}` should have exactly one row in the reason code table of docs/reasons.md, not {row.Count}.");
            Assert.True(
                row[0].Cells.Length > 1 && string.Equals(row[0].Cells[1], reason.Kind.ToString(), StringComparison.OrdinalIgnoreCase),
                $"`{reason.Code}` is of kind {reason.Kind}, but docs/reasons.md says '{(row[0].Cells.Length > 1 ? row[0].Cells[1] : "")}'.");
        }

        var stale = documented.Where(code => ReasonCodes.All.All(r => r.Code != code)).ToList();
        Assert.True(stale.Count == 0, "docs/reasons.md documents codes the registry does not have: " + string.Join(", ", stale));
    }

    [Fact]
    public void Every_recipe_problem_code_is_documented()
    {
        var codes = typeof(RecipeCodes).GetFields(BindingFlags.Public | BindingFlags.Static)
            .Where(f => f.IsLiteral)
            .Select(f => (string)f.GetRawConstantValue()!)
            .Order(StringComparer.Ordinal)
            .ToList();
        var documented = CodeRows(Page("reasons.md"), "## Recipe and configuration problem codes").Select(r => r.Code).Order(StringComparer.Ordinal).ToList();
        Assert.Equal(codes, documented);
    }

    [Fact]
    public void Every_summary_column_is_documented()
    {
        var page = Page("outputs.md");
        var columns = JsonNames(typeof(SummaryRecord));
        var fields = JsonNames(typeof(ParameterRecord));
        var derivedFields = JsonNames(typeof(DerivedRecord));
        foreach (var name in columns.Concat(fields).Concat(derivedFields))
        {
            Assert.True(page.Contains("`" + name + "`", StringComparison.Ordinal), $"docs/outputs.md does not mention `{name}`.");
        }

        // The column table lists the stored columns in schema order, then the partition column.
        var documentedColumns = CodeRows(page, "### Columns").Select(r => r.Code).ToList();
        Assert.Equal(columns.Append("date"), documentedColumns);
        var documentedFields = CodeRows(page, "#### Fields of `parameters`").Select(r => r.Code).ToList();
        Assert.Equal(fields, documentedFields);
        Assert.Equal(derivedFields, CodeRows(page, "#### Fields of `derived`").Select(r => r.Code).ToList());
    }

    [Fact]
    public void The_documented_column_types_are_the_ones_DuckDB_reports()
    {
        var reported = Duck.Query($"SELECT column_name, column_type FROM (DESCRIBE SELECT * FROM read_parquet({Duck.Literal(demo.SummaryGlob)}, hive_partitioning = true))")
            .ToDictionary(r => (string)r["column_name"]!, r => (string)r["column_type"]!, StringComparer.Ordinal);
        foreach (var row in CodeRows(Page("outputs.md"), "### Columns"))
        {
            Assert.True(reported.TryGetValue(row.Code, out var type), $"DuckDB reports no column `{row.Code}`.");
            Assert.True(row.Cells[1] == type, $"`{row.Code}`: docs/outputs.md says {row.Cells[1]}, DuckDB reports {type}.");
        }
    }

    [Fact]
    public void Every_log_event_id_is_documented()
    {
        var events = typeof(Log).GetMethods(BindingFlags.Public | BindingFlags.Static)
            .Select(m => (Method: m, Attribute: m.GetCustomAttribute<LoggerMessageAttribute>()))
            .Where(e => e.Attribute is not null)
            .ToList();
        Assert.NotEmpty(events);

        var page = Page("operations.md");
        var rows = TableRows(Section(page, "## Event ids"))
            .Where(r => r.Length >= 3 && int.TryParse(r[0], NumberStyles.None, CultureInfo.InvariantCulture, out _))
            .ToDictionary(r => int.Parse(r[0], NumberStyles.None, CultureInfo.InvariantCulture));
        foreach (var (method, attribute) in events)
        {
            var id = attribute!.EventId;
            Assert.True(rows.TryGetValue(id, out var row), string.Create(CultureInfo.InvariantCulture, $"Event {id} ({method.Name}) is not in the event table of docs/operations.md."));
            Assert.True(row[1] == attribute.Level.ToString(), string.Create(CultureInfo.InvariantCulture, $"Event {id} is logged at {attribute.Level}, but docs/operations.md says {row[1]}."));
            Assert.True(row[2] == (attribute.EventName ?? method.Name), string.Create(CultureInfo.InvariantCulture, $"Event {id} is named {attribute.EventName ?? method.Name}, but docs/operations.md says {row[2]}."));
        }

        var stale = rows.Keys.Where(id => events.All(e => e.Attribute!.EventId != id)).ToList();
        Assert.True(stale.Count == 0, "docs/operations.md documents event ids the code does not log: " + string.Join(", ", stale));
    }

    [Fact]
    public void Every_recipe_key_is_documented()
    {
        // Each key is documented at its place, as a backticked path: `columns.stimulus`,
        // `limits.<figure>.coverage_factor`, `folders.inbox`. The recipe keys come from the one
        // description of the language the reader and the JSON Schema use.
        var recipeKeys = RecipeSchema.Paths().ToList();
        var configKeys = Paths("", ConfigLoader.TopKeys)
            .Concat(Paths("folders.", ConfigLoader.FolderKeys))
            .Concat(Paths("reader.", ConfigLoader.ReaderKeys))
            .Concat(Paths("watch.", ConfigLoader.WatchKeys))
            .Concat(Paths("output.", ConfigLoader.OutputKeys))
            .ToList();
        Assert.Contains("decision.rule", recipeKeys);
        Assert.Contains("derived.<name>.sensitivity_at", recipeKeys);

        var page = Page("recipes.md");
        foreach (var key in recipeKeys.Concat(configKeys).Concat(RecipeSchema.ModelTypes).Concat(RecipeSchema.Rules).Concat(RecipeSchema.LegNames))
        {
            Assert.True(page.Contains("`" + key + "`", StringComparison.Ordinal), $"docs/recipes.md does not mention `{key}`.");
        }

        // The key tables hold exactly the keys and choices the code accepts, nothing stale.
        Assert.Equal(recipeKeys.Order(StringComparer.Ordinal), CodeRows(page, "## Recipe keys").Select(r => r.Code).Order(StringComparer.Ordinal));
        Assert.Equal(RecipeSchema.ModelTypes.Order(StringComparer.Ordinal), CodeRows(page, "### Model types").Select(r => r.Code).Order(StringComparer.Ordinal));
        Assert.Equal(RecipeSchema.Rules.Order(StringComparer.Ordinal), CodeRows(page, "### Decision rules").Select(r => r.Code).Order(StringComparer.Ordinal));
        Assert.Equal(configKeys.Order(StringComparer.Ordinal), CodeRows(page, "## Configuration file").Select(r => r.Code).Order(StringComparer.Ordinal));
    }

    [Fact]
    public void The_recipe_key_table_agrees_with_the_schema_on_what_is_required_the_kind_and_the_range()
    {
        var rows = CodeRows(Page("recipes.md"), "## Recipe keys").ToDictionary(r => r.Code, r => r.Cells, StringComparer.Ordinal);
        foreach (var (path, spec) in Specs(RecipeSchema.Root, ""))
        {
            var cells = rows[path];

            // "required" or "required in `parent`" exactly when the schema requires the key; conditions
            // ("required unless ...", "at least one of ...") are for keys the schema leaves optional.
            var required = cells[1] == "required" || cells[1].StartsWith("required in ", StringComparison.Ordinal);
            Assert.True(required == spec.Required, $"`{path}`: the schema says required = {spec.Required}, docs/recipes.md says '{cells[1]}'.");

            var kind = spec.Kind switch
            {
                ValueKind.Text => "text",
                ValueKind.Number => "number",
                ValueKind.Integer => "whole number",
                ValueKind.Boolean => "true or false",
                ValueKind.TextList => "list of text",
                ValueKind.TextOrList => "text, or a list of text",
                ValueKind.Map => "mapping",
                ValueKind.NamedMaps => "mapping by name",
                _ => throw new InvalidOperationException(spec.Kind.ToString()),
            };
            Assert.True(cells[2] == kind, $"`{path}` is of kind {spec.Kind}, so its type should read '{kind}', not '{cells[2]}'.");

            foreach (var bound in new[] { spec.Minimum, spec.Maximum })
            {
                if (bound is { } b)
                {
                    var shown = b.ToString(CultureInfo.InvariantCulture);
                    Assert.True(
                        Regex.IsMatch(cells[5], @"(?<![\d.])" + Regex.Escape(shown) + @"(?!\d|\.\d)", RegexOptions.CultureInvariant),
                        $"`{path}` is bounded by {shown} in the schema, but its row in docs/recipes.md does not say so: {cells[5]}");
                }
            }
        }
    }

    [Fact]
    public void The_recipe_key_table_says_what_every_optional_key_means_when_absent_and_the_units_of_every_number()
    {
        var rows = CodeRows(Page("recipes.md"), "## Recipe keys").ToDictionary(r => r.Code, r => r.Cells, StringComparer.Ordinal);
        foreach (var (path, spec) in Specs(RecipeSchema.Root, ""))
        {
            var cells = rows[path];
            if (cells[1] == "optional")
            {
                Assert.True(cells[4].Length > 0 && cells[4] != "—", $"`{path}` is optional, but docs/recipes.md does not say what its absence means (the default): '{cells[4]}'.");
            }

            if (spec.Kind == ValueKind.Number)
            {
                Assert.True(cells[3].Length > 0, $"`{path}` is a number, but docs/recipes.md gives it no units.");
            }
        }
    }

    [Fact]
    public void The_figure_table_lists_every_figure_every_fit_produces()
    {
        var rows = CodeRows(Page("recipes.md"), "### Figures a limit can name").Select(r => r.Code).ToList();

        Assert.Equal(["<parameter>", "<parameter>" + FigureTable.HalfWidthSuffix, "<name>", "<name>" + FigureTable.HalfWidthSuffix, "<name>" + FigureTable.PredictionHalfWidthSuffix, .. FigureTable.FitFigures], rows);
    }

    [Fact]
    public void The_figure_table_names_every_diagnostic_and_nominal_figure_a_limit_can_name()
    {
        var section = Section(Page("recipes.md"), "### Figures a limit can name");
        foreach (var name in FigureTable.DiagnosticFigures.Concat(FigureTable.NominalFigures))
        {
            Assert.True(section.Contains("`" + name + "`", StringComparison.Ordinal), $"docs/recipes.md, Figures a limit can name, does not list `{name}`.");
        }
    }

    [Fact]
    public void The_shipped_recipe_shown_in_the_docs_is_the_file_as_shipped()
    {
        var shown = ShippedRecipeBlock().Matches(Page("recipes.md")).ToList();

        Assert.NotEmpty(shown);
        foreach (Match block in shown)
        {
            var path = block.Groups["path"].Value;
            var file = File.ReadAllText(RepoPaths.InRepo(path.Split('/'))).Replace("\r\n", "\n", StringComparison.Ordinal);
            Assert.True(file == block.Groups["body"].Value, $"docs/recipes.md shows {path}, but the file has changed since: update the example.");
        }
    }

    [Fact]
    public void Every_recipe_example_in_the_docs_loads_together_without_a_problem()
    {
        using var folder = new TempFolder();
        var examples = RecipeExamples(folder);

        var catalog = RecipeCatalog.Load(folder.Path);

        Assert.True(catalog.IsValid, catalog.Report());
        Assert.Equal(examples.Count(e => !e.Contains("\nfamily: true\n", StringComparison.Ordinal)), catalog.Recipes.Length);
        Assert.Contains(catalog.Recipes, r => r.Extends is not null);
    }

    [Fact]
    public void The_recipes_explain_example_is_what_explain_prints_for_the_documented_family_and_variant()
    {
        using var folder = new TempFolder();
        RecipeExamples(folder);
        var catalog = RecipeCatalog.Load(folder.Path);
        var recipe = catalog.ForPart("KP-250-HT");
        Assert.NotNull(recipe);

        var section = Section(Page("recipes.md"), "### `standfit recipes explain PART`");
        var output = FencedBlocks().Matches(section).Select(m => m.Groups["body"].Value).Single(b => b.StartsWith("# effective recipe", StringComparison.Ordinal));
        var header = output[..(output.IndexOf('\n', StringComparison.Ordinal) + 1)];

        Assert.Equal($"# effective recipe for part KP-250-HT: {recipe.Name} version {recipe.Version}, sha256 {recipe.ContentHash}\n", header);
        Assert.Equal(catalog.Explain(recipe), output[header.Length..]);
    }

    [Fact]
    public void Every_sql_example_in_the_docs_runs_as_written()
    {
        var blocks = new List<(string Source, int Index, string Sql)>();
        var pages = Directory.EnumerateFiles(RepoPaths.InRepo("docs"), "*.md").Order(StringComparer.Ordinal).ToList();
        var readme = RepoPaths.InRepo("README.md");
        if (File.Exists(readme))
        {
            pages.Add(readme);
        }

        foreach (var path in pages)
        {
            var text = File.ReadAllText(path).Replace("\r\n", "\n", StringComparison.Ordinal);
            var index = 0;
            foreach (Match block in SqlBlock().Matches(text))
            {
                blocks.Add((Path.GetRelativePath(RepoPaths.Root, path), ++index, block.Groups["sql"].Value));
            }
        }

        Assert.NotEmpty(blocks);

        // The examples read 'output/...' relative to the current directory, as an engineer runs them
        // from the folder holding the output folder. DuckDB resolves relative paths against the test
        // process's own current directory, which is not the demo's, so the relative prefix is
        // rewritten to the demo run's absolute output folder instead of changing directory.
        var absolute = Duck.Literal(demo.Output + "/");
        var prefix = absolute[..^1];
        foreach (var (source, index, sql) in blocks)
        {
            var rewritten = sql.Replace("'output/", prefix, StringComparison.Ordinal);
            List<Dictionary<string, object?>> rows;
            try
            {
                rows = Duck.Query(rewritten);
            }
            catch (DuckDB.NET.Data.DuckDBException e)
            {
                Assert.Fail(string.Create(CultureInfo.InvariantCulture, $"SQL example {index} of {source} fails: {e.Message}\n{sql}"));
                return;
            }

            Assert.True(rows.Count > 0, string.Create(CultureInfo.InvariantCulture, $"SQL example {index} of {source} returns no row on the demo's output:\n{sql}"));
        }
    }

    [Fact]
    public void The_decision_rules_page_shows_a_self_contained_zone_picture()
    {
        Assert.Contains("](decision-zones.svg)", Page("decision-rules.md"), StringComparison.Ordinal);
        var svg = XDocument.Load(RepoPaths.InRepo("docs", "decision-zones.svg"));
        XNamespace ns = "http://www.w3.org/2000/svg";
        Assert.Equal(ns + "svg", svg.Root!.Name);
        var text = string.Join(' ', svg.Descendants(ns + "text").Select(t => t.Value));
        foreach (var label in new[] { "pass", "retest", "fail", "conditional pass", "conditional fail", "lower tolerance limit", "upper tolerance limit", "lower acceptance limit", "upper acceptance limit", "guard band", "simple acceptance", "guarded acceptance" })
        {
            Assert.Contains(label, text, StringComparison.Ordinal);
        }

        // Plain SVG: no images, scripts, external references or links of any kind.
        Assert.DoesNotContain(svg.Descendants(), e => e.Name.LocalName is "image" or "script" or "use" or "a" or "foreignObject");
        Assert.DoesNotContain(svg.Descendants().Attributes(), a => a.Name.LocalName == "href" || a.Value.Contains("url(", StringComparison.Ordinal));
    }

    [Fact]
    public void Every_link_between_the_docs_resolves()
    {
        foreach (var path in Directory.EnumerateFiles(RepoPaths.InRepo("docs"), "*.md"))
        {
            var name = Path.GetFileName(path);
            foreach (Match link in Link().Matches(File.ReadAllText(path)))
            {
                var target = link.Groups["target"].Value;
                if (target.Contains("://", StringComparison.Ordinal))
                {
                    continue;
                }

                var hash = target.IndexOf('#', StringComparison.Ordinal);
                var file = hash < 0 ? target : target[..hash];
                var resolved = file.Length == 0 ? path : Path.Combine(Path.GetDirectoryName(path)!, file);
                Assert.True(File.Exists(resolved), $"docs/{name} links to {target}, which does not exist.");
                if (hash >= 0 && resolved.EndsWith(".md", StringComparison.Ordinal))
                {
                    var anchors = Heading().Matches(File.ReadAllText(resolved)).Select(h => Slug(h.Groups["title"].Value)).ToHashSet(StringComparer.Ordinal);
                    Assert.True(anchors.Contains(target[(hash + 1)..]), $"docs/{name} links to {target}, but {file} has no such heading.");
                }
            }
        }
    }

    private static string Page(string name) => File.ReadAllText(RepoPaths.InRepo("docs", name)).Replace("\r\n", "\n", StringComparison.Ordinal);

    private static List<string> JsonNames(Type type) =>
        [.. type.GetProperties(BindingFlags.Public | BindingFlags.Instance)
            .OrderBy(p => p.MetadataToken)
            .Select(p => p.GetCustomAttribute<JsonPropertyNameAttribute>())
            .OfType<JsonPropertyNameAttribute>()
            .Select(a => a.Name)];

    private static IEnumerable<string> Paths(string prefix, IEnumerable<string> keys) => keys.Select(k => prefix + k);

    /// <summary>Every key of the language with its dotted path, in the same form as <see cref="RecipeSchema.Paths"/>.</summary>
    private static IEnumerable<(string Path, KeySpec Spec)> Specs(KeySpec spec, string prefix)
    {
        foreach (var child in spec.Children)
        {
            var path = prefix + child.Name;
            yield return (path, child);
            var inner = child.Kind == ValueKind.NamedMaps ? path + (child.Name == "limits" ? ".<figure>." : ".<name>.") : path + ".";
            foreach (var nested in Specs(child, inner))
            {
                yield return nested;
            }
        }
    }

    /// <summary>
    /// Writes every complete recipe example of docs/recipes.md (a yaml block with a top-level
    /// 'recipe:') into <paramref name="folder"/>, named by its first line ("# kp-family.yaml: ...")
    /// or example-N.yaml, and returns their texts.
    /// </summary>
    private static List<string> RecipeExamples(TempFolder folder)
    {
        var texts = new List<string>();
        foreach (Match block in FencedBlocks().Matches(Page("recipes.md")))
        {
            var body = block.Groups["body"].Value;
            if (block.Groups["lang"].Value != "yaml" || !Regex.IsMatch(body, "^recipe:", RegexOptions.Multiline | RegexOptions.CultureInvariant))
            {
                continue;
            }

            var named = Regex.Match(body, @"^# (?<name>[a-z0-9-]+\.yaml):", RegexOptions.CultureInvariant);
            var name = named.Success ? named.Groups["name"].Value : string.Create(CultureInfo.InvariantCulture, $"example-{texts.Count + 1}.yaml");
            File.WriteAllText(Path.Combine(folder.Path, name), body);
            texts.Add(body);
        }

        Assert.True(texts.Count >= 3, "docs/recipes.md should show the demo recipe, a family and a variant.");
        return texts;
    }

    /// <summary>The lines under a heading, up to the next heading of any level (fenced code is skipped over).</summary>
    private static string Section(string page, string heading)
    {
        var lines = page.Split('\n');
        var start = Array.IndexOf(lines, heading);
        Assert.True(start >= 0, $"The page has no heading '{heading}'.");
        var end = start + 1;
        var fenced = false;
        while (end < lines.Length && (fenced || !lines[end].StartsWith('#')))
        {
            if (lines[end].StartsWith("```", StringComparison.Ordinal))
            {
                fenced = !fenced;
            }

            end++;
        }

        return string.Join('\n', lines[(start + 1)..end]);
    }

    /// <summary>The body rows of every Markdown table in the text (no header rows), as trimmed cells; an escaped \| stays in its cell.</summary>
    private static List<string[]> TableRows(string text)
    {
        static bool IsSeparator(string line) => line.StartsWith("|-", StringComparison.Ordinal) || line.StartsWith("| -", StringComparison.Ordinal);
        var lines = text.Split('\n');
        return [.. lines
            .Where((line, i) => line.StartsWith('|') && !IsSeparator(line) && !(i + 1 < lines.Length && IsSeparator(lines[i + 1])))
            .Select(line => CellSplit().Split(line.Trim().Trim('|')).Select(c => c.Trim()).ToArray())];
    }

    /// <summary>The rows of a section's tables whose first cell is one backticked name, with that name.</summary>
    private static List<(string Code, string[] Cells)> CodeRows(string page, string heading) =>
        [.. TableRows(Section(page, heading))
            .Select(cells => (Match: BacktickedCell().Match(cells[0]), Cells: cells))
            .Where(x => x.Match.Success)
            .Select(x => (x.Match.Groups["name"].Value, x.Cells))];

    /// <summary>The anchor a Markdown renderer gives a heading: lower case, punctuation dropped, spaces as hyphens.</summary>
    private static string Slug(string title)
    {
        var kept = new string([.. title.ToLowerInvariant().Where(c => char.IsLetterOrDigit(c) || c is ' ' or '-' or '_')]);
        return kept.Trim().Replace(' ', '-');
    }

    [GeneratedRegex(@"^```sql[ \t]*\n(?<sql>.*?)^```[ \t]*$", RegexOptions.Multiline | RegexOptions.Singleline | RegexOptions.CultureInvariant)]
    private static partial Regex SqlBlock();

    [GeneratedRegex(@"^```(?<lang>[a-z]*)[ \t]*\n(?<body>.*?)^```[ \t]*$", RegexOptions.Multiline | RegexOptions.Singleline | RegexOptions.CultureInvariant)]
    private static partial Regex FencedBlocks();

    [GeneratedRegex(@"This is `(?<path>config/recipes/[^`]+\.yaml)`[^\n]*:\n\n```yaml\n(?<body>.*?)^```", RegexOptions.Multiline | RegexOptions.Singleline | RegexOptions.CultureInvariant)]
    private static partial Regex ShippedRecipeBlock();

    [GeneratedRegex(@"(?<!\\)\|", RegexOptions.CultureInvariant)]
    private static partial Regex CellSplit();

    [GeneratedRegex(@"^`(?<name>[^`]+)`$", RegexOptions.CultureInvariant)]
    private static partial Regex BacktickedCell();

    [GeneratedRegex(@"\]\((?<target>[^)\s]+)\)", RegexOptions.CultureInvariant)]
    private static partial Regex Link();

    [GeneratedRegex(@"^#{1,6} (?<title>.+)$", RegexOptions.Multiline | RegexOptions.CultureInvariant)]
    private static partial Regex Heading();

    /// <summary>One in-place run of the demo (`run --from sample-runs/line-3`), its output under a temp folder.</summary>
    public sealed class DemoOutput : IAsyncLifetime, IDisposable
    {
        private readonly TempFolder _root = new();

        /// <summary>The output folder; DemoSet.WriteConfig puts it at output/ under the temp root.</summary>
        public string Output => Path.Combine(_root.Path, "output");

        public string SummaryGlob => Path.Combine(Output, "summaries", "**", "*.parquet");

        public async Task InitializeAsync()
        {
            var config = DemoSet.WriteConfig(_root);
            var outcome = await StandFitProcess.RunAsync(_root.Path, Timeout, "run", "--config", config, "--from", DemoSet.Folder, "--quiet");
            Assert.True(outcome.ExitCode == 0, string.Create(CultureInfo.InvariantCulture, $"The demo run exited with {outcome.ExitCode}: {outcome.Error}"));
            Assert.True(Directory.Exists(Path.Combine(Output, "summaries")), "The demo run wrote no summaries under the temp folder's output/.");
        }

        public Task DisposeAsync() => Task.CompletedTask;

        public void Dispose() => _root.Dispose();
    }
}
