using StandFit.Edges.Configuration;
using StandFit.Edges.Folders;
using StandFit.Edges.Processing;
using StandFit.Edges.Worker;
using StandFit.Tests.Support;

namespace StandFit.Tests.Worker;

/// <summary>Recipe edits while `watch` runs: a broken edit keeps the last good recipes in force (logged once); a good edit is taken into force.</summary>
public sealed class RecipeReloadTests
{
    private static readonly TimeSpan Timeout = TimeSpan.FromMinutes(2);

    [Fact]
    public async Task A_broken_recipe_edit_keeps_the_last_good_recipes_and_a_fixed_one_comes_into_force()
    {
        using var root = new TempFolder();
        var recipes = root.Sub("recipes");
        foreach (var file in Directory.EnumerateFiles(DemoSet.Recipes))
        {
            File.Copy(file, Path.Combine(recipes, Path.GetFileName(file)));
        }

        var recipeFile = Path.Combine(recipes, "kp-250.yaml");
        var good = File.ReadAllText(recipeFile);
        var options = ConfigLoader.Load(WorkerConfig.Write(root, recipes: recipes)).Value;
        Assert.Empty(ConfigLoader.PrepareFolders(options, needInbox: true));
        var log = new CapturingLogger();
        using var pipeline = Pipeline.Build(options, log, DispositionMode.Move, TimeProvider.System);
        var loop = new InboxLoop(options.Inbox, pipeline.Runner, pipeline.Recipes, new LoopSettings { Poll = TimeSpan.FromMilliseconds(50), Stable = TimeSpan.Zero }, TimeProvider.System, log);
        var judged = 0;
        var signals = Enumerable.Range(0, 4).Select(_ => new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously)).ToArray();
        var passes = 0;
        var counting = 0;
        loop.PassCompleted += c =>
        {
            var total = Interlocked.Add(ref judged, c.Processed);
            if (total is >= 1 and <= 3)
            {
                signals[total - 1].TrySetResult();
            }

            if (Volatile.Read(ref counting) == 1 && Interlocked.Increment(ref passes) >= 10)
            {
                signals[3].TrySetResult();
            }
        };
        using var stop = new CancellationTokenSource();
        var running = loop.RunAsync(stop.Token);

        SweepFiles.Drop(options.Inbox, "one.csv", SweepFiles.Text(1, 9));
        await signals[0].Task.WaitAsync(Timeout);

        // A broken edit: a typo'd key. The worker goes on with the recipe it had.
        File.WriteAllText(recipeFile, good.Replace("confidence: 0.95", "confidense: 0.95", StringComparison.Ordinal));
        loop.Nudge();
        SweepFiles.Drop(options.Inbox, "two.csv", SweepFiles.Text(2, 9));
        await signals[1].Task.WaitAsync(Timeout);
        Volatile.Write(ref counting, 1);
        await signals[3].Task.WaitAsync(Timeout); // ten more passes over the broken folder
        Assert.Equal(1, log.Count(3004));
        Assert.Equal(2, log.Count(3002)); // the unknown key and the missing one, each logged once


        // Fixed, with a change: the new recipe comes into force.
        File.WriteAllText(recipeFile, good + "\n# reviewed\n");
        loop.Nudge();
        SweepFiles.Drop(options.Inbox, "three.csv", SweepFiles.Text(3, 9));
        await signals[2].Task.WaitAsync(Timeout);
        await stop.CancelAsync();
        await running.WaitAsync(Timeout);

        var rows = Duck.Query($"SELECT source_file, recipe_hash, ruling FROM read_parquet({Duck.Literal(Path.Combine(options.Output, "summaries", "**", "*.parquet"))})")
            .ToDictionary(r => (string)r["source_file"]!, StringComparer.Ordinal);
        Assert.Equal(rows["one.csv"]["recipe_hash"], rows["two.csv"]["recipe_hash"]);
        Assert.NotEqual(rows["one.csv"]["recipe_hash"], rows["three.csv"]["recipe_hash"]);
        Assert.All(rows.Values, r => Assert.NotEqual("rejected", r["ruling"]));
        Assert.Equal(1, log.Count(3003));
        Assert.Contains(log.Events, e => e.Id == 3002 && e.Message.Contains("confidense", StringComparison.Ordinal));
    }

    [Fact]
    public async Task A_recipe_folder_that_disappears_keeps_the_last_good_recipes()
    {
        using var root = new TempFolder();
        var recipes = root.Sub("recipes");
        foreach (var file in Directory.EnumerateFiles(DemoSet.Recipes))
        {
            File.Copy(file, Path.Combine(recipes, Path.GetFileName(file)));
        }

        var options = ConfigLoader.Load(WorkerConfig.Write(root, recipes: recipes)).Value;
        Assert.Empty(ConfigLoader.PrepareFolders(options, needInbox: true));
        var log = new CapturingLogger();
        using var pipeline = Pipeline.Build(options, log, DispositionMode.Move, TimeProvider.System);
        Directory.Move(recipes, recipes + ".gone");
        Assert.False(pipeline.Recipes.Check());
        Assert.False(pipeline.Recipes.Check());
        Assert.Equal(1, log.Count(3004));

        SweepFiles.Drop(options.Inbox, "one.csv", SweepFiles.Text(1, 9));
        var counts = await pipeline.Runner.ProcessAsync(DropFolder.ListReady(options.Inbox), CancellationToken.None);
        Assert.Equal(1, counts.Processed);
        Assert.Equal(0, counts.Rejected);
    }
}
