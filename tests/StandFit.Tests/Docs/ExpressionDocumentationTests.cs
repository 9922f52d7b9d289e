using System.Globalization;
using System.Text.RegularExpressions;
using StandFit.Core.Fitting.Expressions;
using StandFit.Tests.Reference;
using StandFit.Tests.Support;

namespace StandFit.Tests.Docs;

/// <summary>
/// docs/expressions.md checked against the expression language: the function table holds exactly
/// the functions the parser knows, the limits are the ones it enforces, the documented errors come
/// out as documented, every example parses, and the NIST models are the ones the reference tests fit.
/// </summary>
public sealed partial class ExpressionDocumentationTests
{
    private static readonly string Page = File.ReadAllText(RepoPaths.InRepo("docs", "expressions.md")).Replace("\r\n", "\n", StringComparison.Ordinal);

    [Fact]
    public void The_function_table_lists_exactly_the_functions_of_the_language()
    {
        var documented = Rows("## Functions").Select(r => Backticked(r[0])).Order(StringComparer.Ordinal);
        Assert.Equal(ExpressionLanguage.Functions, documented);
    }

    [Fact]
    public void The_documented_limits_are_the_ones_the_parser_enforces()
    {
        var limits = Rows("## Limits").ToDictionary(r => r[0], r => int.Parse(r[1].Split(' ')[0], NumberStyles.None, CultureInfo.InvariantCulture), StringComparer.Ordinal);
        Assert.Equal(ExpressionLanguage.MaxLength, limits["Longest expression"]);
        Assert.Equal(ExpressionLanguage.MaxDepth, limits["Deepest nesting"]);
        Assert.Equal(ExpressionLanguage.MaxParameters, limits["Most parameters"]);
        Assert.Equal(ExpressionLanguage.MaxVariables, limits["Most variables"]);
        Assert.True(ExpressionLanguage.IsValidName(new string('a', limits["Longest name"])));
        Assert.False(ExpressionLanguage.IsValidName(new string('a', limits["Longest name"] + 1)));
    }

    [Fact]
    public void The_documented_errors_come_out_with_their_columns_and_messages()
    {
        var rows = Rows("## Errors");
        Assert.NotEmpty(rows);
        foreach (var row in rows)
        {
            var result = ExpressionParser.Parse(Backticked(row[0]), ["x"]);
            Assert.False(result.IsSuccess, row[0] + " parses, but the page lists it as an error.");
            Assert.Equal(int.Parse(row[1], NumberStyles.None, CultureInfo.InvariantCulture), result.Error!.Column);
            Assert.StartsWith(row[2], result.Error.Message, StringComparison.Ordinal);
        }
    }

    [Fact]
    public void Every_example_parses_over_the_variables_it_names()
    {
        var rows = Rows("## Examples").Concat(Rows("### The NIST StRD nonlinear models")).ToList();
        Assert.True(rows.Count >= 27 + 5);
        foreach (var row in rows)
        {
            var variables = row[2].Split(',').Select(v => Backticked(v.Trim())).ToArray();
            var result = ExpressionParser.Parse(Backticked(row[1]), variables);
            Assert.True(result.IsSuccess, row[1] + ": " + result.Error?.Message);
        }
    }

    [Fact]
    public void The_NIST_models_on_the_page_are_the_ones_the_reference_tests_fit()
    {
        var documented = Rows("### The NIST StRD nonlinear models").Select(r => Normalised(Backticked(r[1]))).ToList();
        Assert.Equal(StrdNonlinearCases.All.Select(c => Normalised(c.Expression)), documented);
    }

    private static string Normalised(string text) => Whitespace().Replace(text.Trim(), " ");

    private static string Backticked(string cell)
    {
        var match = BacktickedCell().Match(cell);
        Assert.True(match.Success, "Expected one backticked value, not " + cell);
        return match.Groups["text"].Value;
    }

    /// <summary>The body rows of the tables under a heading (up to the next heading).</summary>
    private static List<string[]> Rows(string heading)
    {
        var lines = Page.Split('\n');
        var start = Array.IndexOf(lines, heading);
        Assert.True(start >= 0, "docs/expressions.md has no heading " + heading);
        var rows = new List<string[]>();
        var fenced = false;
        for (var i = start + 1; i < lines.Length && (fenced || !lines[i].StartsWith('#')); i++)
        {
            fenced ^= lines[i].StartsWith("```", StringComparison.Ordinal);
            var isRow = !fenced && lines[i].StartsWith('|') && !lines[i].StartsWith("|-", StringComparison.Ordinal);
            var isHeader = i + 1 < lines.Length && lines[i + 1].StartsWith("|-", StringComparison.Ordinal);
            if (isRow && !isHeader)
            {
                rows.Add([.. lines[i].Trim().Trim('|').Split('|').Select(c => c.Trim())]);
            }
        }

        return rows;
    }

    [GeneratedRegex(@"^`(?<text>[^`]+)`$", RegexOptions.CultureInvariant)]
    private static partial Regex BacktickedCell();

    [GeneratedRegex(@"\s+", RegexOptions.CultureInvariant)]
    private static partial Regex Whitespace();
}
