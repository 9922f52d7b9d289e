using System.Collections.Immutable;
using StandFit.Core.Ingest;
using StandFit.Core.Problems;
using StandFit.Edges.Folders;
using StandFit.Edges.Readers;
using StandFit.Edges.RecipeFiles;

namespace StandFit.Edges.Configuration;

/// <summary>Reads and validates config/standfit.yaml; every problem of the file is reported at once.</summary>
public static class ConfigLoader
{
    public static readonly ImmutableArray<string> TopKeys = ["folders", "reader", "watch", "output"];
    public static readonly ImmutableArray<string> FolderKeys = ["inbox", "archive", "rejected", "output", "recipes", "logs"];
    public static readonly ImmutableArray<string> ReaderKeys = ["max_file_bytes"];
    public static readonly ImmutableArray<string> WatchKeys = ["poll_seconds", "stable_seconds", "worker_id", "status_seconds", "fault_log_seconds"];
    public static readonly ImmutableArray<string> OutputKeys = ["flush_units", "flush_seconds", "journal_compact_units"];

    public static Result<StandFitOptions> Load(string path)
    {
        var full = Path.GetFullPath(path);
        var shown = Path.GetFileName(full);
        byte[] bytes;
        try
        {
            bytes = File.ReadAllBytes(full);
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            return new Problem(RecipeCodes.Unreadable, Messages.UnreadableFile(e.Message), SourceLocation.WholeFile(full));
        }

        var text = SweepFileReader.Decode(shown, bytes);
        if (!text.IsSuccess)
        {
            return Result<StandFitOptions>.Failure(text.Problems);
        }

        var tree = YamlTree.Parse(shown, text.Value);
        if (!tree.IsSuccess)
        {
            return Result<StandFitOptions>.Failure(tree.Problems);
        }

        var sink = new ProblemSink(shown);
        if (tree.Value is not YamlMap root)
        {
            sink.Add(RecipeCodes.BadValue, Messages.ExpectedMap("the file"), tree.Value);
            return Result<StandFitOptions>.Failure(sink.Problems);
        }

        var baseDir = Path.GetDirectoryName(full)!;
        var top = new MapReader(root, "the file", sink, TopKeys);
        var folders = top.Map("folders", FolderKeys, required: true);
        string? Folder(string key)
        {
            var value = folders?.Text(key, required: true);
            return value is null ? null : Path.GetFullPath(Path.Combine(baseDir, value));
        }

        var inbox = Folder("inbox");
        var archive = Folder("archive");
        var rejected = Folder("rejected");
        var output = Folder("output");
        var recipes = Folder("recipes");
        var logs = Folder("logs");

        var reader = top.Map("reader", ReaderKeys, required: false);
        var maxBytes = reader?.Integer("max_file_bytes", required: false);
        var watch = top.Map("watch", WatchKeys, required: false);
        var poll = watch?.Number("poll_seconds", required: false);
        var stable = watch?.Number("stable_seconds", required: false);
        var workerId = watch?.Text("worker_id", required: false);
        var status = watch?.Number("status_seconds", required: false);
        var faultLog = watch?.Number("fault_log_seconds", required: false);
        var outputSection = top.Map("output", OutputKeys, required: false);
        var flushUnits = outputSection?.Integer("flush_units", required: false);
        var flushSeconds = outputSection?.Number("flush_seconds", required: false);
        var compactUnits = outputSection?.Integer("journal_compact_units", required: false);

        Positive(reader, "max_file_bytes", maxBytes);
        Positive(watch, "poll_seconds", poll);
        Positive(watch, "status_seconds", status);
        Positive(watch, "fault_log_seconds", faultLog);
        if (watch is not null && stable is { } s && s < 0)
        {
            watch.Sink.Add(RecipeCodes.BadValue, Messages.OutOfRange(watch.Path("stable_seconds"), Numbers.Format(s), "zero or more"), watch.Node("stable_seconds"));
        }

        if (watch is not null && workerId is not null && !WorkerIdentity.IsValid(workerId))
        {
            watch.Sink.Add(RecipeCodes.BadValue, Messages.BadWorkerId(SweepAssembler.Shown(workerId)), watch.Node("worker_id"));
        }
        Positive(outputSection, "flush_units", flushUnits);
        if (outputSection is not null && flushUnits is { } fu && fu > StandFitOptions.MaxFlushUnits)
        {
            outputSection.Sink.Add(RecipeCodes.BadValue, Messages.OutOfRange(outputSection.Path("flush_units"), Numbers.Format(fu), "at most " + Numbers.Format(StandFitOptions.MaxFlushUnits)), outputSection.Node("flush_units"));
        }

        if (outputSection is not null && flushSeconds is { } fs && (fs < 0 || fs > StandFitOptions.MaxFlushSeconds))
        {
            outputSection.Sink.Add(RecipeCodes.BadValue, Messages.OutOfRange(outputSection.Path("flush_seconds"), Numbers.Format(fs), "from 0 to " + Numbers.Format(StandFitOptions.MaxFlushSeconds)), outputSection.Node("flush_seconds"));
        }

        Positive(outputSection, "journal_compact_units", compactUnits);

        if (sink.HasProblems)
        {
            return Result<StandFitOptions>.Failure(sink.Problems);
        }

        var defaults = new StandFitOptions { ConfigFile = full, ConfigHash = "", Inbox = "", Archive = "", Rejected = "", Output = "", Recipes = "", Logs = "" };
        return defaults with
        {
            ConfigHash = Hashing.Sha256Hex(bytes),
            Inbox = inbox!,
            Archive = archive!,
            Rejected = rejected!,
            Output = output!,
            Recipes = recipes!,
            Logs = logs!,
            MaxFileBytes = maxBytes ?? defaults.MaxFileBytes,
            PollSeconds = poll ?? defaults.PollSeconds,
            StableSeconds = stable ?? defaults.StableSeconds,
            WorkerId = workerId ?? WorkerIdentity.Default(),
            WorkerIdConfigured = workerId is not null,
            StatusSeconds = status ?? defaults.StatusSeconds,
            FaultLogSeconds = faultLog ?? defaults.FaultLogSeconds,
            FlushUnits = flushUnits ?? defaults.FlushUnits,
            FlushSeconds = flushSeconds ?? defaults.FlushSeconds,
            JournalCompactUnits = compactUnits ?? defaults.JournalCompactUnits,
        };
    }

    /// <summary>Creates the folders the worker writes to; the problems of those it cannot create, all together.</summary>
    public static ImmutableArray<Problem> PrepareFolders(StandFitOptions options, bool needInbox)
    {
        var problems = ImmutableArray.CreateBuilder<Problem>();
        var wanted = new List<(string Key, string Path)> { ("archive", options.Archive), ("rejected", options.Rejected), ("output", options.Output), ("logs", options.Logs) };
        if (needInbox)
        {
            wanted.Insert(0, ("inbox", options.Inbox));
        }

        foreach (var (key, path) in wanted)
        {
            try
            {
                Directory.CreateDirectory(path);
            }
            catch (Exception e) when (e is IOException or UnauthorizedAccessException)
            {
                problems.Add(new Problem(RecipeCodes.BadValue, Messages.ConfigFolderMissing(key, path), SourceLocation.WholeFile(options.ConfigFile)));
            }
        }

        if (!Directory.Exists(options.Recipes) && !File.Exists(options.Recipes))
        {
            problems.Add(new Problem(RecipeCodes.BadValue, Messages.ConfigFolderMissing("recipes", options.Recipes), SourceLocation.WholeFile(options.ConfigFile)));
        }

        return problems.ToImmutable();
    }

    private static void Positive(MapReader? section, string key, double? value)
    {
        if (section is not null && value is { } v && v <= 0)
        {
            section.Sink.Add(RecipeCodes.BadValue, Messages.OutOfRange(section.Path(key), Numbers.Format(v), "above zero"), section.Node(key));
        }
    }
}
