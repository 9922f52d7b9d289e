using System.Globalization;
using System.Text;
using System.Text.RegularExpressions;
using StandFit.Core.Problems;
using StandFit.Edges.RecipeFiles;
using StandFit.Tests.Support;

namespace StandFit.Tests.RecipeFiles;

/// <summary>
/// The corpus of broken recipes in tests/StandFit.Tests/Fixtures/broken-recipes: each file states
/// the problems it must report in its header (the convention is in that folder's README.md), and
/// loading it the way the tool loads recipes reports exactly those, at their places, with their
/// codes and messages.
/// </summary>
public sealed partial class BrokenRecipeCorpusTests
{
    private const int MinimumCorpusSize = 30;

    private static string Folder => RepoPaths.InRepo("tests", "StandFit.Tests", "Fixtures", "broken-recipes");

    private static string Families => Path.Combine(Folder, "families");

    public static TheoryData<string> Files()
    {
        var data = new TheoryData<string>();
        foreach (var path in Directory.EnumerateFiles(Folder, "*.yaml").Order(StringComparer.Ordinal))
        {
            data.Add(Path.GetFileName(path));
        }

        return data;
    }

    [Theory]
    [MemberData(nameof(Files))]
    public void A_broken_recipe_reports_exactly_the_problems_its_header_expects(string file)
    {
        var header = Header.Read(Path.Combine(Folder, file));
        using var temp = new TempFolder();
        File.Copy(Path.Combine(Folder, file), Path.Combine(temp.Path, file));
        if (header.Family is { } family)
        {
            File.Copy(Path.Combine(Families, family), Path.Combine(temp.Path, family));
        }

        var catalog = RecipeCatalog.Load(temp.Path);

        var unmatched = catalog.Problems.ToList();
        var missing = new List<Expectation>();
        foreach (var expectation in header.Expectations)
        {
            var index = unmatched.FindIndex(p => expectation.Matches(p, file));
            if (index < 0)
            {
                missing.Add(expectation);
            }
            else
            {
                unmatched.RemoveAt(index);
            }
        }

        Assert.True(
            missing.Count == 0 && unmatched.Count == 0,
            $"{file}: the reported problems differ from the header.\n"
            + $"Expected but not reported:\n{string.Join('\n', missing.Select(m => "  " + m.Line))}\n"
            + $"Reported but not expected:\n{string.Join('\n', unmatched.Select(p => "  " + Expectation.Describe(p, file)))}\n"
            + $"All reported:\n{string.Join('\n', catalog.Problems.Select(p => "  " + Expectation.Describe(p, file)))}");

        // A file with any problem is not in force: it judges nothing.
        Assert.DoesNotContain(catalog.Recipes, r => r.SourceFile == file);
    }

    [Fact]
    public void The_corpus_holds_at_least_thirty_files_each_saying_what_it_shows_and_expecting_a_problem()
    {
        var files = Directory.EnumerateFiles(Folder, "*.yaml").ToList();

        Assert.True(files.Count >= MinimumCorpusSize, string.Create(CultureInfo.InvariantCulture, $"The corpus holds {files.Count} files, fewer than {MinimumCorpusSize}."));
        foreach (var path in files)
        {
            var header = Header.Read(path);
            Assert.False(string.IsNullOrWhiteSpace(header.About), $"{Path.GetFileName(path)} has no '# about:' line.");
            Assert.NotEmpty(header.Expectations);
            if (header.Family is { } family)
            {
                Assert.True(File.Exists(Path.Combine(Families, family)), $"{Path.GetFileName(path)} names family file {family}, which is not in families/.");
            }
        }
    }

    [Fact]
    public void The_corpus_family_file_is_a_valid_family_that_judges_no_part_on_its_own()
    {
        using var temp = new TempFolder();
        foreach (var path in Directory.EnumerateFiles(Families, "*.yaml"))
        {
            File.Copy(path, Path.Combine(temp.Path, Path.GetFileName(path)));
        }

        var catalog = RecipeCatalog.Load(temp.Path);

        Assert.True(catalog.IsValid, catalog.Report());
        Assert.Empty(catalog.Recipes);
        Assert.NotEmpty(catalog.FilesChecked);
    }

    [Fact]
    public void The_header_of_a_corpus_file_is_read_as_the_readme_describes()
    {
        var header = Header.Parse(
            """
            # about: two problems
            # family: kp-family.yaml
            # expect: 17:1 recipe.unknown_key = unknown key 'x' in the file; the keys here are: a.
            # expect: kp-family.yaml:22:3 recipe.unknown_figure ~ limit on 'offset'
            # expect: 0:0 recipe.unreadable ~ not valid UTF-8
            recipe: r
            # expect: 1:1 recipe.syntax = not part of the header
            """);

        Assert.Equal("two problems", header.About);
        Assert.Equal("kp-family.yaml", header.Family);
        Assert.Equal(3, header.Expectations.Count);
        var own = new Problem("recipe.unknown_key", "unknown key 'x' in the file; the keys here are: a.", SourceLocation.At("broken.yaml", 17, 1));
        Assert.True(header.Expectations[0].Matches(own, "broken.yaml"));
        Assert.False(header.Expectations[0].Matches(own with { Message = own.Message + " More." }, "broken.yaml"));
        Assert.False(header.Expectations[0].Matches(own with { Location = SourceLocation.At("broken.yaml", 17, 2) }, "broken.yaml"));
        Assert.True(header.Expectations[1].Matches(new Problem("recipe.unknown_figure", "limit on 'offset', but ...", SourceLocation.At("kp-family.yaml", 22, 3)), "broken.yaml"));
        Assert.False(header.Expectations[1].Matches(new Problem("recipe.unknown_figure", "limit on 'offset', but ...", SourceLocation.At("broken.yaml", 22, 3)), "broken.yaml"));
        Assert.True(header.Expectations[2].Matches(new Problem("recipe.unreadable", "byte 3 is not valid UTF-8", SourceLocation.WholeFile("broken.yaml")), "broken.yaml"));
    }

    private sealed record Header(string About, string? Family, IReadOnlyList<Expectation> Expectations)
    {
        /// <summary>The header of a corpus file. The header is ASCII, so a file that is not UTF-8 (on purpose) still has a readable header.</summary>
        public static Header Read(string path) => Parse(Encoding.Latin1.GetString(File.ReadAllBytes(path)));

        public static Header Parse(string text)
        {
            string about = "";
            string? family = null;
            var expectations = new List<Expectation>();
            foreach (var raw in text.Replace("\r\n", "\n", StringComparison.Ordinal).Split('\n'))
            {
                if (!raw.StartsWith('#'))
                {
                    break;
                }

                if (raw.StartsWith("# about: ", StringComparison.Ordinal))
                {
                    about = raw["# about: ".Length..];
                }
                else if (raw.StartsWith("# family: ", StringComparison.Ordinal))
                {
                    family = raw["# family: ".Length..].Trim();
                }
                else if (raw.StartsWith("# expect:", StringComparison.Ordinal))
                {
                    var match = ExpectLine().Match(raw);
                    Assert.True(match.Success, $"'{raw}' is not of the form '# expect: [FILE:]LINE:COLUMN CODE =|~ TEXT'.");
                    expectations.Add(new Expectation(
                        raw,
                        match.Groups["file"].Success ? match.Groups["file"].Value : null,
                        int.Parse(match.Groups["line"].Value, CultureInfo.InvariantCulture),
                        int.Parse(match.Groups["column"].Value, CultureInfo.InvariantCulture),
                        match.Groups["code"].Value,
                        match.Groups["op"].Value == "~",
                        match.Groups["text"].Value));
                }
            }

            return new Header(about, family, expectations);
        }
    }

    private sealed record Expectation(string Line, string? File, int LineNumber, int Column, string Code, bool IsSubstring, string Text)
    {
        public bool Matches(Problem problem, string ownFile) =>
            problem.Location == new SourceLocation(File ?? ownFile, LineNumber, Column)
            && problem.Code == Code
            && (IsSubstring ? problem.Message.Contains(Text, StringComparison.Ordinal) : problem.Message == Text);

        /// <summary>A reported problem written as the header line that would expect it exactly.</summary>
        public static string Describe(Problem problem, string ownFile)
        {
            var where = problem.Location.File == ownFile ? "" : problem.Location.File + ":";
            return string.Create(CultureInfo.InvariantCulture, $"# expect: {where}{problem.Location.Line}:{problem.Location.Column} {problem.Code} = {problem.Message}");
        }
    }

    [GeneratedRegex(@"^# expect: (?:(?<file>[^\s:]+):)?(?<line>\d+):(?<column>\d+) (?<code>\S+) (?<op>[=~]) (?<text>.+)$", RegexOptions.CultureInvariant)]
    private static partial Regex ExpectLine();
}
