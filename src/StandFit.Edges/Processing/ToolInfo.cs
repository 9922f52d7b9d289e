using System.Globalization;
using System.Reflection;

namespace StandFit.Edges.Processing;

/// <summary>The tool's version as written to every output row, and run identifiers.</summary>
public static class ToolInfo
{
    public static string Version { get; } =
        typeof(ToolInfo).Assembly.GetCustomAttribute<AssemblyInformationalVersionAttribute>()?.InformationalVersion ?? "0.0.0";

    /// <summary>A run id unique among workers: UTC start time, worker id and process id, safe in file names.</summary>
    public static string NewRunId(DateTimeOffset nowUtc, string workerId = "worker") =>
        string.Create(CultureInfo.InvariantCulture, $"run-{nowUtc.UtcDateTime:yyyyMMdd'T'HHmmssfff}-{workerId}-{Environment.ProcessId}");
}
