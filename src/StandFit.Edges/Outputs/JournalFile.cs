using System.Text;
using System.Text.Json;
using System.Text.Json.Serialization;
using StandFit.Core.Problems;

namespace StandFit.Edges.Outputs;

/// <summary>
/// A worker's own journal file, <c>journal/WORKER.jsonl</c>: one JSON object a line. Appended one
/// line at a time, each streamed (a large batch makes no large string) and flushed to disk before
/// the call returns; a torn last line (a crash in mid-append) is cut off when the file is opened,
/// and a failed append is cut off before the next. Replaced whole by a compaction: the new
/// content under a hidden temporary name, flushed to disk, then renamed over the old file, so the
/// file is always either the old one or the new one.
/// </summary>
internal sealed class JournalFile
{
    public static readonly JsonSerializerOptions Json = new() { DefaultIgnoreCondition = JsonIgnoreCondition.WhenWritingNull };

    private JournalFile(string path, long length)
    {
        Path = path;
        Length = length;
    }

    public string Path { get; }

    /// <summary>The length up to and including the last whole line written.</summary>
    public long Length { get; private set; }

    /// <summary>Opens the file (which may not exist yet), cutting off a torn last line.</summary>
    public static JournalFile Open(string path) => new(path, CutTornTail(path));

    public bool Exists => File.Exists(Path);

    /// <summary>The lines with their numbers (1-based), empty lines left out.</summary>
    public IEnumerable<(int Number, string Text)> ReadLines()
    {
        if (!File.Exists(Path))
        {
            yield break;
        }

        var number = 0;
        foreach (var line in File.ReadLines(Path, Encoding.UTF8))
        {
            number++;
            if (line.Length > 0)
            {
                yield return (number, line);
            }
        }
    }

    /// <summary>Appends one line, flushed to disk.</summary>
    public void Append(JournalLine line)
    {
        var folder = System.IO.Path.GetDirectoryName(Path)!;
        var output = System.IO.Path.GetDirectoryName(folder)!;
        if (!Directory.Exists(output))
        {
            throw new DirectoryNotFoundException(Messages.OutputFolderMissing(output));
        }

        Directory.CreateDirectory(folder);
        using var stream = new FileStream(Path, FileMode.OpenOrCreate, FileAccess.ReadWrite, FileShare.Read, 16 * 1024);
        if (stream.Length != Length)
        {
            // A failed append left a partial line, or the file was replaced: continue after its last whole line.
            Length = stream.Length > Length ? Length : LastLineEnd(stream);
            stream.SetLength(Length);
        }

        stream.Position = Length;
        try
        {
            JsonSerializer.Serialize(stream, line, Json);
            stream.WriteByte((byte)'\n');
            stream.Flush(flushToDisk: true);
        }
        catch
        {
            TryCut(stream, Length);
            throw;
        }

        Length = stream.Position;
    }

    /// <summary>Replaces the whole file with one line (a compaction's new header): temporary name, flush to disk, rename.</summary>
    public void Replace(JournalLine line)
    {
        var temporary = IndexFiles.TemporaryOf(Path);
        long length;
        try
        {
            using (var stream = new FileStream(temporary, FileMode.Create, FileAccess.Write, FileShare.None, 4096))
            {
                JsonSerializer.Serialize(stream, line, Json);
                stream.WriteByte((byte)'\n');
                stream.Flush(flushToDisk: true);
                length = stream.Position;
            }

            File.Move(temporary, Path, overwrite: true);
        }
        catch
        {
            IndexFiles.TryDelete(temporary);
            throw;
        }

        Length = length;
    }

    /// <summary>The length up to and including the last newline.</summary>
    public static long LastLineEnd(FileStream stream)
    {
        var buffer = new byte[4096];
        var position = stream.Length;
        while (position > 0)
        {
            var take = (int)Math.Min(buffer.Length, position);
            position -= take;
            stream.Position = position;
            stream.ReadExactly(buffer, 0, take);
            var index = Array.LastIndexOf(buffer, (byte)'\n', take - 1, take);
            if (index >= 0)
            {
                return position + index + 1;
            }
        }

        return 0;
    }

    private static long CutTornTail(string path)
    {
        if (!File.Exists(path))
        {
            return 0;
        }

        using var stream = new FileStream(path, FileMode.Open, FileAccess.ReadWrite, FileShare.Read);
        var end = LastLineEnd(stream);
        if (end != stream.Length)
        {
            stream.SetLength(end);
            stream.Flush(flushToDisk: true);
        }

        return end;
    }

    private static void TryCut(FileStream stream, long length)
    {
        try
        {
            stream.SetLength(length);
        }
        catch (IOException)
        {
            // The next append cuts the partial line before it writes.
        }
    }
}
