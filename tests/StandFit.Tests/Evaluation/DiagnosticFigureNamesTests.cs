using System.Reflection;
using System.Text.Json.Serialization;
using StandFit.Core.Evaluation;
using StandFit.Core.Ingest;
using StandFit.Edges.Outputs;
using StandFit.Edges.RecipeFiles;
using StandFit.Tests.Support;

namespace StandFit.Tests.Evaluation;

/// <summary>
/// Every diagnostic figure the summary writes can be named by a recipe limit (docs/recipes.md,
/// "Figures a limit can name"), under its column name and with the column's value: the numeric
/// summary columns from <c>runs_count</c> to <c>llf</c> (docs/outputs.md), but for the outlier's
/// point and file line, which locate a point rather than measure the unit. The unit is a demo sweep
/// judged by the KP-250 recipe with limits on the Durbin-Watson tests in the orders its gate does
/// not take, so that every order's test is computed.
/// </summary>
public sealed class DiagnosticFigureNamesTests
{
    private static readonly string[] NotFigures = ["outlier_point", "outlier_line"];

    [Fact]
    public void Every_numeric_diagnostic_summary_column_is_a_figure_a_limit_can_name_with_the_columns_value()
    {
        var recipeText = File.ReadAllText(RepoPaths.InRepo("config", "recipes", "kp-250.yaml")).Replace(
            "limits:\n",
            "limits:\n  dw_stimulus_p: { min: 0.0001, rule: simple }\n  dw_per_leg_p: { min: 0.0001, rule: simple }\n  runs_within_legs_mid_p: { min: 0.0001, rule: simple }\n  bp_f_p: { min: 0.0001, rule: simple }\n",
            StringComparison.Ordinal) + "set_points: { tolerance: 1.0 }\nnominal: { offset: 0, gain: 0.2 }\n";
        var bound = RecipeBinder.Bind("kp-250.yaml", recipeText, "hash");
        Assert.True(bound.IsSuccess, string.Join("; ", bound.Problems));
        var recipe = bound.Value;
        var file = RepoPaths.InRepo("sample-runs", "line-3", "KP250-26110-0001.csv");
        var table = SweepTextParser.Parse("KP250-26110-0001.csv", File.ReadAllText(file)).Value;

        var unit = UnitEvaluator.Evaluate(table, recipe);
        var row = SummaryRecordFactory.Create(unit, "sha", DateTime.UnixEpoch, "test");
        var names = FigureTable.Names(recipe.Model, recipe.Derived);

        var checkedColumns = 0;
        var empty = new List<string>();
        foreach (var (name, value) in DiagnosticColumns(row))
        {
            if (NotFigures.Contains(name))
            {
                continue;
            }

            Assert.True(names.ContainsKey(name), $"summary column `{name}` is not a figure a limit can name (FigureTable)");
            if (value is null)
            {
                // A column the unit cannot fill (nonrepeatability without repeated cycles) is no figure either.
                Assert.False(unit.Figures.ContainsKey(name), $"`{name}` is empty in the summary but a figure of the unit");
                empty.Add(name);
                continue;
            }

            Assert.True(unit.Figures.TryGetValue(name, out var figure), $"the unit's figure table has no `{name}`");
            Assert.Equal(value.Value, figure.Value);
            checkedColumns++;
        }

        // One sweep up and down has no repeated cycle: every other column has a value here.
        Assert.Equal(["nonrepeatability_pct"], empty);
        Assert.Equal(59, checkedColumns);

        // The four limits were judged, not left undecided.
        Assert.DoesNotContain(unit.Verdict.Reasons, f => f.Code == "limit.not_evaluated");
    }

    /// <summary>The numeric columns of the summary's diagnostics, runs_count to llf in schema order, with their values.</summary>
    private static IEnumerable<(string Name, double? Value)> DiagnosticColumns(SummaryRecord row)
    {
        var inside = false;
        foreach (var property in typeof(SummaryRecord).GetProperties())
        {
            var name = property.GetCustomAttribute<JsonPropertyNameAttribute>()!.Name;
            inside |= name == "runs_count";
            if (!inside)
            {
                continue;
            }

            var value = property.GetValue(row);
            if (property.PropertyType == typeof(double?) || property.PropertyType == typeof(int?))
            {
                yield return (name, value is null ? null : Convert.ToDouble(value, System.Globalization.CultureInfo.InvariantCulture));
            }

            if (name == "llf")
            {
                yield break;
            }
        }
    }
}
