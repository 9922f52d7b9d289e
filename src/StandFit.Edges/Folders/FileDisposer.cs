using System.Globalization;
using System.Text;
using StandFit.Core.Problems;
using StandFit.Edges.Readers;

namespace StandFit.Edges.Folders;

/// <summary>Whether inputs leave the inbox (<see cref="Move"/>) or are read in place and copied (<see cref="Copy"/>).</summary>
public enum DispositionMode
{
    /// <summary>The inbox: the file is moved to archive/ or rejected/ (a rename within one volume).</summary>
    Move,

    /// <summary>A folder read in place (the demo, an archive being re-judged): the file is copied and never changed.</summary>
    Copy,
}

/// <summary>
/// Puts each processed input in <c>archive/YYYY-MM-DD/</c> or <c>rejected/YYYY-MM-DD/</c> (processing
/// date, UTC); a rejected file gets a sidecar <c>NAME.rejected.txt</c> saying why. An input's bytes
/// are never modified; in move mode the inbox entry goes away only as a move (or, when the archive
/// already holds the same bytes under that name, as the second half of one). A name already taken
/// by other content gets the content hash appended.
/// </summary>
public sealed class FileDisposer(string archive, string rejected, DispositionMode mode)
{
    private readonly HashSet<string> _created = new(StringComparer.Ordinal);

    public DispositionMode Mode { get; } = mode;

    public string Archive(string input, string sha256, DateTime processedAtUtc) => Place(input, sha256, Folder(archive, processedAtUtc));

    public string Reject(string input, string sha256, DateTime processedAtUtc, Problem problem)
    {
        var destination = Place(input, sha256, Folder(rejected, processedAtUtc));
        var note = new StringBuilder()
            .Append("file: ").Append(Path.GetFileName(input)).Append('\n')
            .Append("sha256: ").Append(sha256).Append('\n')
            .Append("rejected_at: ").Append(processedAtUtc.ToString("yyyy-MM-dd'T'HH:mm:ss.fff'Z'", CultureInfo.InvariantCulture)).Append('\n')
            .Append("code: ").Append(problem.Code).Append('\n')
            .Append("where: ").Append(problem.Location.ToString()).Append('\n')
            .Append("why: ").Append(problem.Message).Append('\n')
            .ToString();
        File.WriteAllText(destination + ".rejected.txt", note, new UTF8Encoding(false));
        return destination;
    }

    private string Folder(string root, DateTime processedAtUtc)
    {
        var folder = Path.Combine(root, processedAtUtc.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture));
        lock (_created)
        {
            if (_created.Add(folder))
            {
                Directory.CreateDirectory(folder);
            }
        }

        return folder;
    }

    private string Place(string input, string sha256, string folder)
    {
        var name = Path.GetFileName(input);
        var destination = Path.Combine(folder, name);
        if (File.Exists(destination))
        {
            if (Hashing.Sha256OfFile(destination) == sha256)
            {
                // The same content is already there (a rerun, or a crash after the copy).
                if (Mode == DispositionMode.Move)
                {
                    File.Delete(input);
                }

                return destination;
            }

            destination = Path.Combine(folder, $"{Path.GetFileNameWithoutExtension(name)}~{sha256[..12]}{Path.GetExtension(name)}");
        }

        try
        {
            Transfer(input, destination);
        }
        catch (DirectoryNotFoundException)
        {
            // The dated folder was removed while the worker ran: make it again.
            Directory.CreateDirectory(folder);
            Transfer(input, destination);
        }

        return destination;
    }

    private void Transfer(string input, string destination)
    {
        if (Mode == DispositionMode.Move)
        {
            File.Move(input, destination, overwrite: true);
        }
        else
        {
            File.Copy(input, destination, overwrite: true);
        }
    }
}
