using System.Diagnostics;
using System.Globalization;
using System.Security.Cryptography;
using StandFit.Tests.Support;

namespace StandFit.Tests.Worker;

/// <summary>
/// The acceptance test of exactly-once: `standfit watch` as a child process over 2,000 inputs,
/// killed with SIGKILL at 25 seeded random moments and restarted each time. A kill moment is the
/// N-th file-system event anywhere under the worker's folders (claims, temporary Parquet files,
/// journal and pass/fail appends, renames, moves, status writes), N drawn from a seeded generator,
/// so kills land in every phase: start-up and recovery, judging, publishing, moving, and compacting
/// the journal (every 64 units here, so about 30 compactions fall in the run).
/// </summary>
public sealed class CrashTests
{
    private const int ValidFiles = 1960;
    private const int TruncatedFiles = 20;
    private const int DuplicateFiles = 20;
    private const int Kills = 25;
    private const int Seed = 20261202;
    private static readonly TimeSpan Timeout = TimeSpan.FromMinutes(3);

    [Fact]
    public async Task Killed_25_times_the_worker_still_ends_with_every_input_once_and_one_row_per_input()
    {
        if (!OperatingSystem.IsLinux())
        {
            return; // SIGKILL and inotify as below are Linux; the protocol itself is the same on Windows.
        }

        using var root = new TempFolder();
        var config = WorkerConfig.Write(root, flushUnits: 16, journalCompactUnits: 64);
        var inbox = root.Sub("inbox");
        var inputs = new Dictionary<string, string>(StringComparer.Ordinal); // name -> sha256
        foreach (var path in SweepFiles.Write(inbox, ValidFiles, Seed))
        {
            inputs[Path.GetFileName(path)] = Sha(path);
        }

        var random = new Random(Seed);
        for (var i = 0; i < TruncatedFiles; i++)
        {
            var text = SweepFiles.Text(900_000 + i, Seed);
            var cut = text[..(text.Length - 1 - random.Next(1, 30))]; // no final line end: refused as input.truncated
            var name = string.Create(CultureInfo.InvariantCulture, $"trunc-{i:D3}.csv");
            File.WriteAllText(Path.Combine(inbox, name), cut);
            inputs[name] = Sha(Path.Combine(inbox, name));
        }

        for (var i = 0; i < DuplicateFiles; i++)
        {
            var original = string.Create(CultureInfo.InvariantCulture, $"unit-{1 + (i * 97):D6}.csv");
            var name = string.Create(CultureInfo.InvariantCulture, $"dup-{i:D3}.csv");
            File.Copy(Path.Combine(inbox, original), Path.Combine(inbox, name));
            inputs[name] = inputs[original];
        }

        var killsDuringWork = 0;
        for (var kill = 0; kill < Kills; kill++)
        {
            var after = random.Next(1, 300);
            var remaining = await RunUntilEventThenKillAsync(root.Path, config, after);
            if (remaining > 0)
            {
                killsDuringWork++;
            }
        }

        // The last start runs to the end and stops cleanly.
        var exit = await RunToCompletionAsync(root.Path, config, inbox);
        Assert.Equal(0, exit);

        // Every input exactly once in archive/ or rejected/, unchanged.
        Assert.Empty(Directory.EnumerateFiles(inbox));
        Assert.Empty(Directory.EnumerateFiles(Path.Combine(inbox, ".claimed"), "*", SearchOption.AllDirectories));
        var landed = Directory.EnumerateFiles(Path.Combine(root.Path, "archive"), "*.csv", SearchOption.AllDirectories)
            .Concat(Directory.EnumerateFiles(Path.Combine(root.Path, "rejected"), "*.csv", SearchOption.AllDirectories))
            .ToList();
        Assert.Equal(inputs.Count, landed.Count);
        foreach (var file in landed)
        {
            var name = Path.GetFileName(file);
            Assert.True(inputs.TryGetValue(name, out var sha), $"{name} was not an input");
            Assert.Equal(sha, Sha(file));
        }

        Assert.Equal(inputs.Count, landed.Select(Path.GetFileName).Distinct(StringComparer.Ordinal).Count());

        // Exactly one summary row per input content across all Parquet files (duplicates add none).
        var glob = Duck.Literal(Path.Combine(root.Path, "output", "summaries", "**", "*.parquet"));
        var totals = Duck.Query($"SELECT count(*) AS n, count(DISTINCT unit_key) AS keys, count(DISTINCT source_sha256) AS contents, count(*) FILTER (WHERE ruling = 'rejected') AS rejected FROM read_parquet({glob})")[0];
        var distinctContents = inputs.Values.Distinct(StringComparer.Ordinal).Count();
        Assert.Equal(ValidFiles + TruncatedFiles, distinctContents);
        Assert.Equal((long)distinctContents, Convert.ToInt64(totals["n"], CultureInfo.InvariantCulture));
        Assert.Equal((long)distinctContents, Convert.ToInt64(totals["keys"], CultureInfo.InvariantCulture));
        Assert.Equal((long)distinctContents, Convert.ToInt64(totals["contents"], CultureInfo.InvariantCulture));
        Assert.Equal((long)TruncatedFiles, Convert.ToInt64(totals["rejected"], CultureInfo.InvariantCulture));
        var shas = Duck.Query($"SELECT source_sha256 FROM read_parquet({glob})").Select(r => (string)r["source_sha256"]!).ToHashSet(StringComparer.Ordinal);
        Assert.True(shas.SetEquals(inputs.Values), "the rows' contents are not the inputs' contents");

        // The per-point rows were published with their summary rows: n_points rows for each fitted unit, none twice, none without its row.
        var pointsGlob = Duck.Literal(Path.Combine(root.Path, "output", "points", "**", "*.parquet"));
        var points = Duck.Query($"""
            SELECT (SELECT sum(n_points)::BIGINT FROM read_parquet({glob}) WHERE df IS NOT NULL) AS expected,
                   (SELECT count(*) FROM read_parquet({pointsGlob})) AS n,
                   (SELECT count(DISTINCT unit_key || ':' || point) FROM read_parquet({pointsGlob})) AS distinct_points,
                   (SELECT count(*) FROM read_parquet({pointsGlob}) p ANTI JOIN read_parquet({glob}) s USING (unit_key)) AS orphans
            """)[0];
        Assert.True(Convert.ToInt64(points["expected"], CultureInfo.InvariantCulture) > 0);
        Assert.Equal(Convert.ToInt64(points["expected"], CultureInfo.InvariantCulture), Convert.ToInt64(points["n"], CultureInfo.InvariantCulture));
        Assert.Equal(Convert.ToInt64(points["n"], CultureInfo.InvariantCulture), Convert.ToInt64(points["distinct_points"], CultureInfo.InvariantCulture));
        Assert.Equal(0L, Convert.ToInt64(points["orphans"], CultureInfo.InvariantCulture));
        Assert.Empty(Directory.EnumerateFiles(Path.Combine(root.Path, "output", "summaries"), "*.tmp", SearchOption.AllDirectories));
        Assert.Empty(Directory.EnumerateFiles(Path.Combine(root.Path, "output", "points"), "*.tmp", SearchOption.AllDirectories));

        // The duplicates are recorded as such, once each, and not counted.
        var duplicateNotes = Directory.EnumerateFiles(Path.Combine(root.Path, "rejected"), "*.rejected.txt", SearchOption.AllDirectories)
            .Count(f => File.ReadAllText(f).Contains("code: input.duplicate\n", StringComparison.Ordinal));
        Assert.Equal(DuplicateFiles, duplicateNotes);

        // Pass/fail lines: one key per input content, and any repeated line is identical to the first.
        var lines = Directory.EnumerateFiles(Path.Combine(root.Path, "output", "passfail"), "*.log").SelectMany(File.ReadAllLines).ToList();
        var byInput = lines.GroupBy(l => (Key: l[(l.LastIndexOf(" key=", StringComparison.Ordinal) + 5)..], File: FileField(l)));
        Assert.Equal(inputs.Count, byInput.Count());
        Assert.All(byInput, g => Assert.Single(g.Distinct(StringComparer.Ordinal)));
        Assert.Equal(distinctContents, lines.Select(l => l[(l.LastIndexOf(" key=", StringComparison.Ordinal) + 5)..]).Distinct(StringComparer.Ordinal).Count());

        // The journal was compacted: its keys are in index files, and it holds fewer units than one compaction.
        var journal = Path.Combine(root.Path, "output", "journal");
        Assert.NotEmpty(Directory.EnumerateFiles(journal, "test-worker.*.idx"));
        var journalUnits = File.ReadLines(Path.Combine(journal, "test-worker.jsonl")).Sum(l => l.Split("\"key\":").Length - 1);
        Assert.InRange(journalUnits, 0, 64 + 16);

        // The kills fell while work was in hand, not only after the end.
        Assert.True(killsDuringWork >= Kills * 3 / 4, $"only {killsDuringWork} of {Kills} kills fell while inputs remained");
    }

    private static string FileField(string line)
    {
        var start = line.IndexOf(" file=", StringComparison.Ordinal) + 6;
        return line[start..line.IndexOf(' ', start)];
    }

    /// <summary>Starts the worker, kills it (SIGKILL) at the N-th file-system event under the root, and returns how many inputs were still in the inbox or claimed.</summary>
    private static async Task<int> RunUntilEventThenKillAsync(string root, string config, int events)
    {
        var reached = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        var seen = 0;
        using var watcher = new FileSystemWatcher(root) { IncludeSubdirectories = true, InternalBufferSize = 64 * 1024 };
        void Count()
        {
            if (Interlocked.Increment(ref seen) >= events)
            {
                reached.TrySetResult();
            }
        }

        watcher.Created += (_, _) => Count();
        watcher.Changed += (_, _) => Count();
        watcher.Renamed += (_, _) => Count();
        watcher.Deleted += (_, _) => Count();
        watcher.Error += (_, _) => Count();
        watcher.EnableRaisingEvents = true;
        using var process = StandFitProcess.Start(root, "watch", "--config", config);
        process.BeginErrorReadLine();
        process.BeginOutputReadLine();
        var exited = process.WaitForExitAsync();
        try
        {
            var first = await Task.WhenAny(reached.Task, exited).WaitAsync(Timeout);
            if (first != reached.Task)
            {
                Assert.Fail("the worker exited by itself before it was killed, with exit code " + process.ExitCode.ToString(CultureInfo.InvariantCulture));
            }
        }
        finally
        {
            if (!process.HasExited)
            {
                process.Kill(); // SIGKILL
            }
        }

        await process.WaitForExitAsync().WaitAsync(Timeout);
        var inbox = Path.Combine(root, "inbox");
        return Directory.EnumerateFiles(inbox).Count() + Directory.EnumerateFiles(Path.Combine(inbox, ".claimed"), "*.csv", SearchOption.AllDirectories).Count();
    }

    /// <summary>Starts the worker, waits (on its status-file writes) until nothing is left in the inbox or claimed, then stops it with SIGTERM.</summary>
    private static async Task<int> RunToCompletionAsync(string root, string config, string inbox)
    {
        var done = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        bool Finished() =>
            !Directory.EnumerateFiles(inbox).Any()
            && !Directory.EnumerateFiles(Path.Combine(inbox, ".claimed"), "*.csv", SearchOption.AllDirectories).Any()
            && File.Exists(Path.Combine(root, "output", "status-test-worker.json"));
        using var watcher = new FileSystemWatcher(Path.Combine(root, "output")) { Filter = "status-test-worker.json" };
        watcher.Renamed += (_, _) =>
        {
            if (Finished())
            {
                done.TrySetResult();
            }
        };
        watcher.EnableRaisingEvents = true;
        using var process = StandFitProcess.Start(root, "watch", "--config", config);
        process.BeginErrorReadLine();
        process.BeginOutputReadLine();
        try
        {
            await done.Task.WaitAsync(Timeout);
            using (var term = Process.Start("kill", ["-TERM", process.Id.ToString(CultureInfo.InvariantCulture)]))
            {
                await term.WaitForExitAsync();
            }

            await process.WaitForExitAsync().WaitAsync(Timeout);
        }
        finally
        {
            if (!process.HasExited)
            {
                process.Kill();
            }
        }

        return process.ExitCode;
    }

    private static string Sha(string path) => Convert.ToHexStringLower(SHA256.HashData(File.ReadAllBytes(path)));

}
