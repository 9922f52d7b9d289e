using System.Text.Json;
using Microsoft.Extensions.Logging.Abstractions;
using StandFit.Edges.Configuration;
using StandFit.Edges.Folders;
using StandFit.Edges.Processing;
using StandFit.Edges.Worker;
using StandFit.Tests.Support;

namespace StandFit.Tests.Worker;

/// <summary>
/// Issue #4 item 7: in <c>watch</c>, a unit whose part has no recipe is held in the claim folder (not
/// judged, not rejected, no row, no pass/fail line), warned about once, counted in the status file,
/// and judged on the first pass after a recipe for its part appears. A unit that names no part is
/// bad input and is rejected; <c>run</c> (a batch must finish) rejects both.
/// </summary>
public sealed class HeldForRecipeTests
{
    private const int Seed = 41;
    private const string NewPart = "KP-250-X";
    private static readonly TimeSpan Timeout = TimeSpan.FromMinutes(2);

    private static string OfPart(int index, string? part) =>
        SweepFiles.Text(index, Seed).Replace("# part: KP-250\n", part is null ? "" : "# part: " + part + "\n", StringComparison.Ordinal);

    private static string CopyDemoRecipes(TempFolder root)
    {
        var recipes = root.Sub("recipes");
        foreach (var file in Directory.EnumerateFiles(DemoSet.Recipes))
        {
            File.Copy(file, Path.Combine(recipes, Path.GetFileName(file)));
        }

        return recipes;
    }

    /// <summary>The demo's KP-250 recipe, for the new part only.</summary>
    private static string RecipeForNewPart() =>
        File.ReadAllText(Path.Combine(DemoSet.Recipes, "kp-250.yaml"))
            .Replace("parts: [KP-250]", "parts: [" + NewPart + "]", StringComparison.Ordinal)
            .Replace("recipe: KP-250 pressure transducer", "recipe: KP-250-X pressure transducer", StringComparison.Ordinal);

    private static IEnumerable<string> FilesUnder(string folder) =>
        Directory.Exists(folder) ? Directory.EnumerateFiles(folder, "*", SearchOption.AllDirectories) : [];

    private static JsonElement Counters(string statusFile)
    {
        using var status = JsonDocument.Parse(File.ReadAllText(statusFile));
        return status.RootElement.GetProperty("counters").Clone();
    }

    [Fact]
    public async Task A_unit_of_a_part_without_a_recipe_is_held_and_warned_once_then_judged_when_its_recipe_appears()
    {
        using var root = new TempFolder();
        var recipes = CopyDemoRecipes(root);
        var options = ConfigLoader.Load(WorkerConfig.Write(root, recipes: recipes)).Value;
        Assert.Empty(ConfigLoader.PrepareFolders(options, needInbox: true));
        var log = new CapturingLogger();
        using var pipeline = Pipeline.Build(options, log, DispositionMode.Move, TimeProvider.System, holdUncoveredParts: true);
        var loop = new InboxLoop(
            options.Inbox,
            pipeline.Runner,
            pipeline.Recipes,
            new LoopSettings { Poll = TimeSpan.FromMilliseconds(50), Stable = TimeSpan.Zero, StatusInterval = TimeSpan.FromMilliseconds(50), StatusFile = options.StatusFile },
            TimeProvider.System,
            log);

        var held = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        var passesWhileHeld = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        var judged = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        var statusWhileHeld = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        var passes = 0;
        loop.PassCompleted += _ =>
        {
            // The known part and the unit without a part are published; the new part's unit is held.
            if (loop.Totals.HeldForRecipe == 1 && loop.Totals.Processed == 2)
            {
                held.TrySetResult();
                if (Interlocked.Increment(ref passes) >= 10)
                {
                    passesWhileHeld.TrySetResult();
                }
            }

            if (loop.Totals.Processed == 3)
            {
                judged.TrySetResult();
            }
        };
        loop.StatusWritten += () =>
        {
            if (held.Task.IsCompleted && !judged.Task.IsCompleted)
            {
                statusWhileHeld.TrySetResult();
            }
        };

        SweepFiles.Drop(options.Inbox, "known.csv", OfPart(1, "KP-250"));
        SweepFiles.Drop(options.Inbox, "new-part.csv", OfPart(1, NewPart));
        SweepFiles.Drop(options.Inbox, "no-part.csv", OfPart(3, null));
        using var stop = new CancellationTokenSource();
        var running = loop.RunAsync(stop.Token);

        await held.Task.WaitAsync(Timeout);
        await passesWhileHeld.Task.WaitAsync(Timeout); // ten rescans over the held unit
        await statusWhileHeld.Task.WaitAsync(Timeout);

        // Held: still claimed, neither archived nor rejected, no row, no pass/fail line, one warning.
        var claimed = Assert.Single(Directory.EnumerateFiles(pipeline.Claims!.Folder), f => !Path.GetFileName(f).StartsWith('.'));
        Assert.EndsWith("~new-part.csv", claimed, StringComparison.Ordinal);
        Assert.DoesNotContain(FilesUnder(options.Archive), f => Path.GetFileName(f) == "new-part.csv");
        Assert.DoesNotContain(FilesUnder(options.Rejected), f => Path.GetFileName(f).StartsWith("new-part.csv", StringComparison.Ordinal));
        Assert.Contains(FilesUnder(options.Archive), f => Path.GetFileName(f) == "known.csv");
        Assert.Contains(FilesUnder(options.Rejected), f => Path.GetFileName(f) == "no-part.csv");
        var passFail = string.Concat(FilesUnder(Path.Combine(options.Output, "passfail")).Select(File.ReadAllText));
        Assert.DoesNotContain("new-part.csv", passFail, StringComparison.Ordinal);
        var warning = Assert.Single(log.Events, e => e.Id == 1006);
        Assert.Equal(Microsoft.Extensions.Logging.LogLevel.Warning, warning.Level);
        Assert.Contains("new-part.csv", warning.Message, StringComparison.Ordinal);
        Assert.Contains(NewPart, warning.Message, StringComparison.Ordinal);
        Assert.Equal(0, log.Count(1007));

        // The status file counts it as held, and says why.
        var counters = Counters(options.StatusFile);
        Assert.Equal(1, counters.GetProperty("held").GetInt32());
        Assert.Equal(1, counters.GetProperty("awaiting_recipe").GetInt32());
        Assert.Equal(2, counters.GetProperty("processed").GetInt32());
        Assert.Equal(1, counters.GetProperty("rejected").GetInt32());

        // A recipe for the part appears: the held unit is judged on the next pass.
        File.WriteAllText(Path.Combine(recipes, "kp-250-x.yaml"), RecipeForNewPart());
        loop.Nudge();
        await judged.Task.WaitAsync(Timeout);
        await stop.CancelAsync();
        await running.WaitAsync(Timeout);

        Assert.DoesNotContain(Directory.EnumerateFiles(pipeline.Claims!.Folder), f => !Path.GetFileName(f).StartsWith('.'));
        Assert.Contains(FilesUnder(options.Archive), f => Path.GetFileName(f) == "new-part.csv");
        var rows = Duck.Query($"SELECT source_file, part, recipe_name, ruling FROM read_parquet({Duck.Literal(Path.Combine(options.Output, "summaries", "**", "*.parquet"))})")
            .ToDictionary(r => (string)r["source_file"]!, StringComparer.Ordinal);
        Assert.Equal(3, rows.Count);
        Assert.Equal("KP-250-X pressure transducer", rows["new-part.csv"]["recipe_name"]);
        Assert.Equal(NewPart, rows["new-part.csv"]["part"]);
        Assert.Equal(rows["known.csv"]["ruling"], rows["new-part.csv"]["ruling"]); // the same sweep under the same limits
        Assert.Equal("rejected", rows["no-part.csv"]["ruling"]);
        passFail = string.Concat(FilesUnder(Path.Combine(options.Output, "passfail")).Select(File.ReadAllText));
        Assert.Single(passFail.Split('\n'), l => l.Contains("new-part.csv", StringComparison.Ordinal));
        Assert.Equal(1, log.Count(1006));
        Assert.Equal(1, log.Count(1007));
        Assert.Equal(1, log.Count(3003));

        var final = Counters(options.StatusFile);
        Assert.Equal(0, final.GetProperty("held").GetInt32());
        Assert.Equal(0, final.GetProperty("awaiting_recipe").GetInt32());
        Assert.Equal(3, final.GetProperty("processed").GetInt32());
    }

    [Fact]
    public async Task A_unit_without_part_metadata_is_rejected_as_no_recipe_even_when_units_are_held()
    {
        using var root = new TempFolder();
        var options = ConfigLoader.Load(WorkerConfig.Write(root, recipes: CopyDemoRecipes(root))).Value;
        Assert.Empty(ConfigLoader.PrepareFolders(options, needInbox: true));
        using var pipeline = Pipeline.Build(options, NullLoggerFactory.Instance, DispositionMode.Move, TimeProvider.System, holdUncoveredParts: true);
        SweepFiles.Drop(options.Inbox, "no-part.csv", OfPart(1, null));

        var counts = await pipeline.Runner.ProcessAsync(DropFolder.ListReady(options.Inbox), CancellationToken.None);

        Assert.Equal(1, counts.Rejected);
        Assert.Equal(0, counts.HeldForRecipe);
        var sidecar = Assert.Single(FilesUnder(options.Rejected), f => f.EndsWith(".rejected.txt", StringComparison.Ordinal));
        Assert.Contains("\ncode: input.no_recipe\n", File.ReadAllText(sidecar), StringComparison.Ordinal);
    }

    [Fact]
    public async Task Without_holding_a_one_shot_batch_rejects_a_unit_of_a_part_without_a_recipe()
    {
        using var root = new TempFolder();
        var options = ConfigLoader.Load(WorkerConfig.Write(root, recipes: CopyDemoRecipes(root))).Value;
        Assert.Empty(ConfigLoader.PrepareFolders(options, needInbox: true));
        using var pipeline = Pipeline.Build(options, NullLoggerFactory.Instance, DispositionMode.Move, TimeProvider.System);
        SweepFiles.Drop(options.Inbox, "new-part.csv", OfPart(1, NewPart));

        var counts = await pipeline.Runner.ProcessAsync(DropFolder.ListReady(options.Inbox), CancellationToken.None);

        Assert.Equal(1, counts.Rejected);
        Assert.Equal(0, pipeline.Runner.Held());
        var sidecar = Assert.Single(FilesUnder(options.Rejected), f => f.EndsWith(".rejected.txt", StringComparison.Ordinal));
        Assert.Contains("\ncode: input.no_recipe\n", File.ReadAllText(sidecar), StringComparison.Ordinal);
    }

    [Fact]
    public async Task A_held_unit_stays_held_and_is_warned_about_once_across_passes_and_a_reload_that_brings_no_recipe_for_it()
    {
        using var root = new TempFolder();
        var recipes = CopyDemoRecipes(root);
        var options = ConfigLoader.Load(WorkerConfig.Write(root, recipes: recipes)).Value;
        Assert.Empty(ConfigLoader.PrepareFolders(options, needInbox: true));
        var log = new CapturingLogger();
        using var pipeline = Pipeline.Build(options, log, DispositionMode.Move, TimeProvider.System, holdUncoveredParts: true);
        SweepFiles.Drop(options.Inbox, "new-part.csv", OfPart(1, NewPart));

        var first = await pipeline.Runner.ProcessAsync(DropFolder.ListReady(options.Inbox), CancellationToken.None);
        var again = await pipeline.Runner.ProcessAsync([], CancellationToken.None);

        // A reload that still lists no recipe for the part reads it again, holds it again, warns no more.
        File.AppendAllText(Path.Combine(recipes, "kp-250.yaml"), "# reviewed\n");
        Assert.True(pipeline.Recipes.Check());
        var reloaded = await pipeline.Runner.ProcessAsync([], CancellationToken.None);

        Assert.Equal((1, 0, 0), (first.HeldForRecipe, again.HeldForRecipe, reloaded.HeldForRecipe));
        Assert.Equal((0, 0, 0), (first.Processed, again.Processed, reloaded.Processed));
        Assert.Equal(1, pipeline.Runner.Held());
        Assert.Equal(1, pipeline.Runner.HeldForRecipe);
        Assert.Equal(1, log.Count(1006));
        Assert.Empty(FilesUnder(options.Rejected));
        Assert.Empty(FilesUnder(options.Archive));
    }
}
