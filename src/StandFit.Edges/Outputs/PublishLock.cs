namespace StandFit.Edges.Outputs;

/// <summary>
/// <c>TABLE/.publish.lock</c>: every writer of a table's folders holds it shared while it has files
/// in flight there (a worker from writing its temporary files to renaming them, a recovery while it
/// renames, a run record while it replaces its file); <c>standfit compact</c> holds it exclusively
/// for the moment it lists a folder, links the files it keeps into the staged folder and swaps the
/// two (milliseconds). So no file lands in a folder between that listing and the swap, where it
/// would be left behind in the retired folder. An advisory lock (<c>flock</c>) on Linux, a sharing
/// lock on Windows; the system releases it when the process dies. Shared holders never wait for
/// each other.
/// </summary>
public static class PublishLock
{
    public const string FileName = ".publish.lock";

    /// <summary>How long a writer waits for a compaction's swap before it gives up with an <see cref="IOException"/> (the swap itself takes milliseconds).</summary>
    public static readonly TimeSpan WriterWait = TimeSpan.FromSeconds(30);

    /// <summary>Takes the lock shared, waiting up to <paramref name="wait"/> (default <see cref="WriterWait"/>) for an exclusive holder. Creates the table folder if needed (never the output folder: a missing one throws <see cref="DirectoryNotFoundException"/>).</summary>
    public static IDisposable Shared(string tableFolder, TimeSpan? wait = null) =>
        Acquire(tableFolder, exclusive: false, wait ?? WriterWait)
        ?? throw new IOException($"{Path.Combine(tableFolder, FileName)} stayed held by a compaction's swap for over {(wait ?? WriterWait).TotalSeconds:F0} s; the files are written at the next try.");

    /// <summary>Takes the lock exclusively, waiting up to <paramref name="wait"/> for the shared holders to finish; null when they did not.</summary>
    public static IDisposable? Exclusive(string tableFolder, TimeSpan wait) => Acquire(tableFolder, exclusive: true, wait);

    private static FileStream? Acquire(string tableFolder, bool exclusive, TimeSpan wait)
    {
        if (!Directory.Exists(tableFolder))
        {
            var output = Path.GetDirectoryName(Path.GetFullPath(tableFolder));
            if (output is null || !Directory.Exists(output))
            {
                throw new DirectoryNotFoundException($"The output folder {output} does not exist (removed, or a share not mounted).");
            }

            Directory.CreateDirectory(tableFolder);
        }

        var path = Path.Combine(tableFolder, FileName);
        var deadline = DateTime.UtcNow + wait;
        var pause = 1;
        while (true)
        {
            try
            {
                // .NET maps FileShare.None to flock(LOCK_EX) and any sharing to flock(LOCK_SH) on Unix (non-blocking), and to sharing modes on Windows.
                return exclusive
                    ? new FileStream(path, FileMode.OpenOrCreate, FileAccess.ReadWrite, FileShare.None)
                    : new FileStream(path, FileMode.OpenOrCreate, FileAccess.Read, FileShare.ReadWrite);
            }
            catch (IOException e) when (IsHeld(e))
            {
                if (DateTime.UtcNow >= deadline)
                {
                    return null;
                }

                Thread.Sleep(pause);
                pause = Math.Min(pause * 2, 20);
            }
        }
    }

    /// <summary>A lock held by another: EWOULDBLOCK on Unix, a sharing or lock violation on Windows.</summary>
    private static bool IsHeld(IOException e) => OperatingSystem.IsWindows()
        ? (e.HResult & 0xFFFF) is 32 or 33
        : e.HResult == 11 || e.HResult == 35; // EWOULDBLOCK: 11 on Linux, 35 on macOS
}
