using System.Text.Json;
using StandFit.Core.Problems;
using StandFit.Tests.Support;

namespace StandFit.Tests.Cli;

/// <summary>The commands as a user types them, run as a separate process.</summary>
public sealed class CommandLineTests
{
    private static readonly TimeSpan Timeout = TimeSpan.FromMinutes(2);

    [Fact]
    public async Task Recipes_check_on_a_misspelt_key_reports_file_line_and_column_and_exits_with_one()
    {
        using var root = new TempFolder();
        var recipe = File.ReadAllText(Path.Combine(DemoSet.Recipes, "kp-250.yaml")).Replace("confidence: 0.95", "confidance: 0.95", StringComparison.Ordinal);
        var path = root.File("kp-250.yaml", recipe);
        var line = Array.FindIndex(recipe.Split('\n'), l => l.StartsWith("confidance:", StringComparison.Ordinal)) + 1;

        var outcome = await StandFitProcess.RunAsync(root.Path, Timeout, "recipes", "check", path);

        Assert.Equal(1, outcome.ExitCode);
        Assert.Contains($"kp-250.yaml:{line}:1: unknown key 'confidance' in the file; did you mean 'confidence'?", outcome.Output, StringComparison.Ordinal);
        Assert.Contains("[recipe.unknown_key]", outcome.Output, StringComparison.Ordinal);
    }

    [Fact]
    public async Task Recipes_check_on_the_shipped_recipes_exits_with_zero()
    {
        var outcome = await StandFitProcess.RunAsync(RepoPaths.Root, Timeout, "recipes", "check", DemoSet.Recipes);
        Assert.Equal(0, outcome.ExitCode);
        Assert.Contains("all valid", outcome.Output, StringComparison.Ordinal);
    }

    [Fact]
    public async Task Recipes_check_of_a_path_that_does_not_exist_is_a_usage_error_with_exit_code_two()
    {
        using var root = new TempFolder();

        var outcome = await StandFitProcess.RunAsync(root.Path, Timeout, "recipes", "check", Path.Combine(root.Path, "no-such-folder"));

        Assert.Equal(2, outcome.ExitCode);
    }

    [Fact]
    public async Task Recipes_explain_prints_the_recipe_in_force_with_its_version_hash_and_each_values_origin()
    {
        var catalog = StandFit.Edges.RecipeFiles.RecipeCatalog.Load(DemoSet.Recipes);
        var recipe = catalog.ForPart("KP-250")!;

        var outcome = await StandFitProcess.RunAsync(RepoPaths.Root, Timeout, "recipes", "explain", "kp-250", "--recipes", DemoSet.Recipes);

        Assert.Equal(0, outcome.ExitCode);
        var lines = outcome.Output.Split('\n');
        Assert.Equal($"# effective recipe for part kp-250: {recipe.Name} version {recipe.Version}, sha256 {recipe.ContentHash}", lines[0]);
        Assert.Equal(catalog.Explain(recipe), string.Join('\n', lines.Skip(1)));
        Assert.Contains("confidence: 0.95    # kp-250.yaml:", outcome.Output, StringComparison.Ordinal);
    }

    [Fact]
    public async Task Recipes_explain_of_a_part_no_recipe_lists_exits_with_one()
    {
        var outcome = await StandFitProcess.RunAsync(RepoPaths.Root, Timeout, "recipes", "explain", "XYZ-9", "--recipes", DemoSet.Recipes);

        Assert.Equal(1, outcome.ExitCode);
        Assert.Contains("no recipe lists part 'XYZ-9'", outcome.Error, StringComparison.Ordinal);
    }

    [Fact]
    public async Task Inspect_json_prints_every_summary_field_and_writes_nothing()
    {
        using var root = new TempFolder();
        var config = DemoSet.WriteConfig(root);
        var file = Path.Combine(DemoSet.Folder, "KP250-26110-0005.csv");

        var outcome = await StandFitProcess.RunAsync(root.Path, Timeout, "inspect", file, "--config", config, "--json");

        Assert.Equal(0, outcome.ExitCode);
        using var json = JsonDocument.Parse(outcome.Output);
        var properties = json.RootElement.EnumerateObject().Select(p => p.Name).ToHashSet();
        var columns = typeof(StandFit.Edges.Outputs.SummaryRecord).GetProperties()
            .Select(p => p.GetCustomAttributes(typeof(System.Text.Json.Serialization.JsonPropertyNameAttribute), false).Cast<System.Text.Json.Serialization.JsonPropertyNameAttribute>().Single().Name);
        Assert.All(columns, c => Assert.Contains(c, properties));
        Assert.Equal("fail", json.RootElement.GetProperty("ruling").GetString());
        Assert.False(Directory.Exists(Path.Combine(root.Path, "output")), "inspect must not write outputs");
        Assert.False(Directory.Exists(Path.Combine(root.Path, "archive")), "inspect must not create folders");
    }

    [Fact]
    public async Task Inspect_with_a_model_override_fits_that_model()
    {
        var file = Path.Combine(DemoSet.Folder, "KP250-26110-0022.csv");
        var outcome = await StandFitProcess.RunAsync(RepoPaths.Root, Timeout, "inspect", file, "--recipe", Path.Combine(DemoSet.Recipes, "kp-250.yaml"), "--model", "polynomial-2");
        Assert.Equal(0, outcome.ExitCode);
        Assert.Contains("model       polynomial-2", outcome.Output, StringComparison.Ordinal);
        Assert.Contains("c2", outcome.Output, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("run")]
    [InlineData("watch")]
    [InlineData("inspect")]
    [InlineData("recipes check")]
    [InlineData("report")]
    [InlineData("compact")]
    public async Task Every_command_has_help(string command)
    {
        var outcome = await StandFitProcess.RunAsync(RepoPaths.Root, Timeout, [.. command.Split(' '), "--help"]);
        Assert.Equal(0, outcome.ExitCode);
        Assert.Contains("Usage: standfit " + command, outcome.Output, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("report")]
    [InlineData("compact")]
    public async Task The_output_folder_commands_read_output_and_dates_alike(string command)
    {
        using var root = new TempFolder();
        var output = Path.GetDirectoryName(root.Sub("output", "summaries"))!;
        var missing = Path.Combine(root.Path, "none");

        async Task Expect(int exit, string message, params string[] args)
        {
            var outcome = await StandFitProcess.RunAsync(root.Path, Timeout, [command, .. args]);
            Assert.Equal(exit, outcome.ExitCode);
            Assert.Contains($"standfit {command}: {message}", outcome.Error, StringComparison.Ordinal);
        }

        await Expect(2, "--output OUTPUT_FOLDER is required");
        await Expect(2, "unexpected argument extra", "--output", output, "extra");
        await Expect(2, Messages.ReportBadDate("--from", "2026-13-01"), "--output", output, "--from", "2026-13-01");
        await Expect(2, Messages.ReportBadDate("--to", "1.12.2026"), "--output", output, "--to", "1.12.2026");
        await Expect(2, Messages.ReportDatesReversed("2026-12-02", "2026-12-01"), "--output", output, "--from", "2026-12-02", "--to", "2026-12-01");
        await Expect(1, Messages.ReportNoOutputFolder(missing), "--output", missing, "--from", "2026-12-01");
        if (command == "compact")
        {
            // The table is read before the dates, as before the options were shared.
            await Expect(2, Messages.CompactBadTable("x"), "--output", output, "--table", "x", "--from", "bad");
        }
    }

    [Fact]
    public async Task An_unknown_option_is_a_usage_error()
    {
        var outcome = await StandFitProcess.RunAsync(RepoPaths.Root, Timeout, "run", "--frmo", "x");
        Assert.Equal(2, outcome.ExitCode);
        Assert.Contains("unknown option --frmo", outcome.Error, StringComparison.Ordinal);
    }

    [Fact]
    public async Task A_configuration_with_problems_reports_them_all_and_exits_with_three()
    {
        using var root = new TempFolder();
        var config = root.File("bad.yaml", "folders:\n  inbox: in\n  archiv: a\nwatch:\n  poll_seconds: 0\n");
        var outcome = await StandFitProcess.RunAsync(root.Path, Timeout, "run", "--config", config);
        Assert.Equal(3, outcome.ExitCode);
        Assert.Contains("unknown key 'archiv'", outcome.Error, StringComparison.Ordinal);
        Assert.Contains("needs the key 'archive'", outcome.Error, StringComparison.Ordinal);
        Assert.Contains("'watch.poll_seconds' is 0", outcome.Error, StringComparison.Ordinal);
    }
}
