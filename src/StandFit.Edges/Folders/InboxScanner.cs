namespace StandFit.Edges.Folders;

/// <summary>
/// Which inbox files may be taken now. A file must be ready by name (<see cref="DropFolder.IsReady"/>)
/// and, for producers that write in place instead of renaming, its size and modification time must
/// have stayed the same for the stability window, measured on the monotonic clock (a wall-clock jump
/// neither shortens nor lengthens it). With a zero window every ready file is taken at once.
/// </summary>
public sealed class InboxScanner(string inbox, TimeSpan stableFor, TimeProvider clock)
{
    private Dictionary<string, Sample> _seen = new(StringComparer.Ordinal);

    /// <summary>Ready files whose size and time have not changed for the window, in ordinal name order.</summary>
    public IReadOnlyList<string> Scan()
    {
        if (!Directory.Exists(inbox))
        {
            throw new DirectoryNotFoundException($"The inbox {inbox} does not exist.");
        }

        var ready = DropFolder.ListReady(inbox);
        if (stableFor <= TimeSpan.Zero)
        {
            return ready;
        }

        var now = clock.GetTimestamp();
        var next = new Dictionary<string, Sample>(ready.Count, StringComparer.Ordinal);
        var stable = new List<string>(ready.Count);
        foreach (var path in ready)
        {
            var info = new FileInfo(path);
            if (!info.Exists)
            {
                continue;
            }

            var sample = new Sample(info.Length, info.LastWriteTimeUtc.Ticks, now);
            if (_seen.TryGetValue(path, out var earlier) && earlier.Length == sample.Length && earlier.WriteTicks == sample.WriteTicks)
            {
                sample = earlier; // unchanged since it was first seen so
                if (clock.GetElapsedTime(earlier.Since, now) >= stableFor)
                {
                    stable.Add(path);
                }
            }

            next[path] = sample;
        }

        _seen = next;
        return stable;
    }

    private readonly record struct Sample(long Length, long WriteTicks, long Since);
}
