using System.Globalization;

namespace StandFit.Tests.Support;

/// <summary>A configuration for worker tests: all folders under one root, the demo's recipes (or a copy), fast timings.</summary>
public static class WorkerConfig
{
    public static string Write(TempFolder root, int flushUnits = 16, double stableSeconds = 0, string? recipes = null, string? workerId = "test-worker", double statusSeconds = 0.5, double faultLogSeconds = 3600, long maxFileBytes = 4194304, int? journalCompactUnits = null, double flushSeconds = 0)
    {
        var recipeFolder = (recipes ?? DemoSet.Recipes).Replace("\\", "/", StringComparison.Ordinal);
        var id = workerId is null ? "" : $"\n  worker_id: {workerId}";
        var compact = journalCompactUnits is { } units ? string.Create(CultureInfo.InvariantCulture, $"\n  journal_compact_units: {units}") : "";
        return root.File("standfit.yaml", string.Create(CultureInfo.InvariantCulture, $"""
            folders:
              inbox: inbox
              archive: archive
              rejected: rejected
              output: output
              recipes: "{recipeFolder}"
              logs: logs
            reader:
              max_file_bytes: {maxFileBytes}
            watch:
              poll_seconds: 0.1
              stable_seconds: {stableSeconds}
              status_seconds: {statusSeconds}
              fault_log_seconds: {faultLogSeconds}{id}
            output:
              flush_units: {flushUnits}
              flush_seconds: {flushSeconds}{compact}
            """));
    }
}
