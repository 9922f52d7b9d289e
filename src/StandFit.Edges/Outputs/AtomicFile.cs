namespace StandFit.Edges.Outputs;

/// <summary>
/// Publishes a file so that no reader ever sees it half-written: write under a hidden temporary
/// name in the destination folder, flush to disk, then rename (atomic within one volume).
/// </summary>
public static class AtomicFile
{
    public static async Task PublishAsync(string finalPath, Func<Stream, Task> write, CancellationToken cancellationToken)
    {
        var folder = Path.GetDirectoryName(finalPath)!;
        Directory.CreateDirectory(folder);
        var temporary = Path.Combine(folder, "." + Path.GetFileName(finalPath) + ".tmp");
        try
        {
            await using (var stream = new FileStream(temporary, FileMode.Create, FileAccess.Write, FileShare.None, 64 * 1024, FileOptions.Asynchronous))
            {
                await write(stream).ConfigureAwait(false);
                await stream.FlushAsync(cancellationToken).ConfigureAwait(false);
                stream.Flush(flushToDisk: true);
            }

            File.Move(temporary, finalPath, overwrite: false);
        }
        catch
        {
            TryDelete(temporary);
            throw;
        }
    }

    /// <summary>Replaces a small text file atomically (temporary name in the same folder, then a rename over the old one).</summary>
    public static void Replace(string path, string text)
    {
        var temporary = Path.Combine(Path.GetDirectoryName(path)!, "." + Path.GetFileName(path) + ".tmp");
        try
        {
            File.WriteAllText(temporary, text, new System.Text.UTF8Encoding(false));
            File.Move(temporary, path, overwrite: true);
        }
        catch
        {
            TryDelete(temporary);
            throw;
        }
    }

    private static void TryDelete(string path)
    {
        try
        {
            File.Delete(path);
        }
        catch (IOException)
        {
            // The temporary name is hidden and never read; a later run may overwrite it.
        }
        catch (UnauthorizedAccessException)
        {
            // As above.
        }
    }
}
