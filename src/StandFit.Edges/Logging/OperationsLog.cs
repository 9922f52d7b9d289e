using System.Globalization;
using Serilog;
using Serilog.Events;
using Serilog.Formatting.Compact;

namespace StandFit.Edges.Logging;

/// <summary>
/// The operations log: Serilog to the console (standard error, human-readable) and to a daily
/// rolling file of compact JSON (<c>logs/standfit-YYYYMMDD.clef</c>, 31 days kept), invariant culture.
/// The file is opened shared: workers that are configured with one logs folder append to the same
/// file under the sink's cross-process lock. Without it every process writes at its own position
/// and overwrites the others' lines (<c>OperationsLogSharingTests</c>).
/// </summary>
public static class OperationsLog
{
    public static Serilog.Core.Logger Create(string logsFolder, LogEventLevel consoleLevel)
    {
        Directory.CreateDirectory(logsFolder);
        return new LoggerConfiguration()
            .MinimumLevel.Information()
            .MinimumLevel.Override("Microsoft", LogEventLevel.Warning)
            .MinimumLevel.Override("Microsoft.Hosting.Lifetime", LogEventLevel.Information)
            .Enrich.FromLogContext()
            .WriteTo.Console(
                restrictedToMinimumLevel: consoleLevel,
                outputTemplate: "{Timestamp:HH:mm:ss.fff} [{Level:u3}] {Message:lj}{NewLine}{Exception}",
                formatProvider: CultureInfo.InvariantCulture,
                standardErrorFromLevel: LogEventLevel.Verbose)
            .WriteTo.File(
                new CompactJsonFormatter(),
                Path.Combine(logsFolder, "standfit-.clef"),
                rollingInterval: RollingInterval.Day,
                retainedFileCountLimit: 31,
                shared: true)
            .CreateLogger();
    }
}
