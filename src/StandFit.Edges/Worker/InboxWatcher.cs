using Microsoft.Extensions.Logging;
using StandFit.Edges.Logging;

namespace StandFit.Edges.Worker;

/// <summary>
/// A file-system watcher on the inbox whose events are only hints (they wake the loop early); on an
/// error it is recreated. The loop's timed rescan is what guarantees progress.
/// </summary>
internal sealed class InboxWatcher : IDisposable
{
    private readonly string _folder;
    private readonly Action _hint;
    private readonly ILogger _logger;
    private FileSystemWatcher? _watcher;

    public InboxWatcher(string folder, Action hint, ILogger logger)
    {
        _folder = folder;
        _hint = hint;
        _logger = logger;
        Create();
    }

    public void Dispose() => _watcher?.Dispose();

    private void Create()
    {
        try
        {
            var watcher = new FileSystemWatcher(_folder) { IncludeSubdirectories = false, NotifyFilter = NotifyFilters.FileName | NotifyFilters.LastWrite | NotifyFilters.Size };
            watcher.Created += (_, _) => _hint();
            watcher.Renamed += (_, _) => _hint();
            watcher.Changed += (_, _) => _hint();
            watcher.Error += (_, e) =>
            {
                Log.WatcherFailed(_logger, e.GetException());
                _watcher?.Dispose();
                Create();
                _hint();
            };
            watcher.EnableRaisingEvents = true;
            _watcher = watcher;
        }
        catch (Exception e) when (e is IOException or ArgumentException or PlatformNotSupportedException)
        {
            // No watcher (e.g. the folder is on a share without notifications): rescans still run.
            Log.WatcherFailed(_logger, e);
            _watcher = null;
        }
    }
}
