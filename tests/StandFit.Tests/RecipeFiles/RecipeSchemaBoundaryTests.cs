using System.Globalization;
using StandFit.Edges.RecipeFiles;

namespace StandFit.Tests.RecipeFiles;

/// <summary>
/// The bounds the JSON Schema gives an editor (RecipeSchema's Minimum, Maximum and their exclusive
/// flags) are the bounds the binder holds a recipe to: for every bounded key, the value on each bound
/// is accepted exactly when the schema includes it, and a value just outside is refused.
/// </summary>
public sealed class RecipeSchemaBoundaryTests
{
    // Block style throughout, so that each key path sits on a line of its own.
    private const string Recipe = """
        recipe: Bounds
        version: "1"
        parts: [B-1]
        columns:
          stimulus: s
          output: o
          leg: leg
          order: step
        model:
          type: polynomial
          degree: 2
        weights:
          u_fixed: 0.001
          u_relative: 0.001
        confidence: 0.95
        decision:
          rule: guarded
          coverage_factor: 2
        sweep:
          min_points: 11
          range:
            min: 0
            max: 100
          span_percent: 90
          monotonic_tolerance: 0.5
          saturation_run: 3
        limits:
          gain:
            min: 0.19
            max: 0.21
            coverage_factor: 3
        set_points:
          tolerance: 0.5
        resampling:
          seed: 1
          bootstrap: pairs
          resamples: 1000
          max_failed_percent: 5
        gates:
          runs_test:
            p_min: 0.01
          durbin_watson:
            p_min: 0.01
          lack_of_fit:
            p_min: 0.01
          curvature:
            p_min: 0.01
          heteroscedasticity:
            p_min: 0.01
          outliers:
            p_min: 0.01
          normality:
            test: shapiro-wilk
            p_min: 0.01
        output:
          points: all
        """;

    /// <summary>For the keys of an expression model, which refuses weights and the curvature gate.</summary>
    private const string ExpressionRecipe = """
        recipe: Bounds
        version: "1"
        parts: [B-1]
        columns:
          stimulus: s
          output: o
        model:
          type: expression
          expression: a + b*x
          parameters:
            a:
              start: 0
            b:
              start: 1
          max_iterations: 1000
        confidence: 0.95
        """;

    public static TheoryData<string> BoundedKeys()
    {
        var data = new TheoryData<string>();
        foreach (var (path, _) in Specs(RecipeSchema.Root, "").Where(s => s.Spec.Minimum is not null || s.Spec.Maximum is not null))
        {
            data.Add(path);
        }

        return data;
    }

    [Fact]
    public void The_recipes_of_these_tests_bind_without_problems()
    {
        foreach (var recipe in new[] { Recipe, ExpressionRecipe })
        {
            var result = RecipeBinder.Bind("bounds.yaml", recipe, "h");
            Assert.True(result.IsSuccess, string.Join('\n', result.Problems));
        }
    }

    [Theory]
    [MemberData(nameof(BoundedKeys))]
    public void A_bounded_key_is_accepted_on_its_bounds_exactly_when_the_schema_includes_them_and_refused_just_outside(string path)
    {
        var spec = Specs(RecipeSchema.Root, "").Single(s => s.Path == path).Spec;
        var step = spec.Kind == ValueKind.Integer ? 1.0 : 0.001;
        if (spec.Minimum is { } min)
        {
            Assert.True(Binds(path, min) == !spec.ExclusiveMinimum, $"{path} = {min}: the schema's minimum is {(spec.ExclusiveMinimum ? "exclusive" : "inclusive")}, the binder disagrees.");
            Assert.False(Binds(path, min - (step * Math.Max(1, Math.Abs(min)))), $"{path} just below its minimum {min} is accepted.");
        }

        if (spec.Maximum is { } max)
        {
            Assert.True(Binds(path, max) == !spec.ExclusiveMaximum, $"{path} = {max}: the schema's maximum is {(spec.ExclusiveMaximum ? "exclusive" : "inclusive")}, the binder disagrees.");
            Assert.False(Binds(path, max + (step * Math.Max(1, Math.Abs(max)))), $"{path} just above its maximum {max} is accepted.");
        }
    }

    /// <summary>A key of choices (the schema's enum) binds each of its choices and refuses a text that is none of them.</summary>
    [Theory]
    [InlineData("output.points")]
    [InlineData("resampling.bootstrap")]
    public void A_key_of_choices_accepts_exactly_the_choices_the_schema_lists(string path)
    {
        var spec = Specs(RecipeSchema.Root, "").Single(s => s.Path == path).Spec;
        Assert.NotEmpty(spec.Choices);
        foreach (var choice in spec.Choices)
        {
            Assert.True(RecipeBinder.Bind("bounds.yaml", With(Recipe, path, choice), "h").IsSuccess, $"{path} = {choice} is refused.");
        }

        Assert.False(RecipeBinder.Bind("bounds.yaml", With(Recipe, path, "not-a-choice"), "h").IsSuccess);
    }

    private static bool Binds(string path, double value) =>
        RecipeBinder.Bind("bounds.yaml", With(path.StartsWith("model.max_iterations", StringComparison.Ordinal) ? ExpressionRecipe : Recipe, path.Replace("<figure>", "gain", StringComparison.Ordinal), value.ToString("R", CultureInfo.InvariantCulture)), "h").IsSuccess;

    /// <summary>The recipe with the value on the line of a key path replaced.</summary>
    private static string With(string recipe, string path, string value)
    {
        var lines = recipe.Split('\n');
        var stack = new List<(int Indent, string Key)>();
        for (var i = 0; i < lines.Length; i++)
        {
            var indent = lines[i].Length - lines[i].TrimStart().Length;
            var colon = lines[i].IndexOf(':', StringComparison.Ordinal);
            if (colon < 0)
            {
                continue;
            }

            stack.RemoveAll(s => s.Indent >= indent);
            stack.Add((indent, lines[i][indent..colon]));
            if (string.Join('.', stack.Select(s => s.Key)) == path)
            {
                lines[i] = lines[i][..(colon + 1)] + " " + value;
                return string.Join('\n', lines);
            }
        }

        throw new InvalidOperationException($"The recipe of {nameof(RecipeSchemaBoundaryTests)} has no line for the bounded key '{path}'; add the key to it.");
    }

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
}
