using System.Globalization;
using System.Text;
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

/// <summary>Why an input went to rejected/: the sidecar's code, place and message.</summary>
public sealed record RejectionNote(string Code, string Where, string Why);

/// <summary>
/// Puts each processed input in <c>archive/YYYY-MM-DD/</c> or <c>rejected/YYYY-MM-DD/</c> (processing
/// date, UTC); a rejected file gets a sidecar <c>NAME.rejected.txt</c> saying why. An input's bytes
/// are never modified; in move mode the input goes away only as a move (or, when the archive
/// already holds the same bytes under that name, as the second half of one). A name already taken
/// by other content gets the content hash appended. Paths are built from the input's own file name
/// (already a name in the inbox) and the date, never from metadata. The archive and rejected
/// folders themselves are never created here: when one is missing (an unmounted share) the move
/// fails and the input is held until the folder is back.
/// </summary>
public sealed class FileDisposer(string archive, string rejected, DispositionMode mode)
{
    private readonly HashSet<string> _created = new(StringComparer.Ordinal);

    public DispositionMode Mode { get; } = mode;

    public string Archive(InputFile input, string sha256, DateTime processedAtUtc)
    {
        var (destination, present) = Destination(input, sha256, Folder(archive, processedAtUtc));
        Transfer(input, destination, present);
        return destination;
    }

    /// <summary>Writes the sidecar first, then moves the input: a crash between the two leaves the input claimed, and the next pass writes the same sidecar again.</summary>
    public string Reject(InputFile input, string sha256, DateTime processedAtUtc, RejectionNote note)
    {
        var (destination, present) = Destination(input, sha256, Folder(rejected, processedAtUtc));
        var text = new StringBuilder()
            .Append("file: ").Append(SidecarValue(input.Name)).Append('\n')
            .Append("sha256: ").Append(sha256).Append('\n')
            .Append("rejected_at: ").Append(processedAtUtc.ToString("yyyy-MM-dd'T'HH:mm:ss.fff'Z'", CultureInfo.InvariantCulture)).Append('\n')
            .Append("code: ").Append(SidecarValue(note.Code)).Append('\n')
            .Append("where: ").Append(SidecarValue(note.Where)).Append('\n')
            .Append("why: ").Append(SidecarValue(note.Why)).Append('\n')
            .ToString();
        File.WriteAllText(destination + ".rejected.txt", text, new UTF8Encoding(false));
        Transfer(input, destination, present);
        return destination;
    }

    /// <summary>A sidecar value on one line: control characters, U+0085, U+2028 and U+2029 become <c>\uXXXX</c>.</summary>
    public static string SidecarValue(string value)
    {
        if (!value.Any(NeedsEscape))
        {
            return value;
        }

        var escaped = new StringBuilder(value.Length + 8);
        foreach (var c in value)
        {
            if (NeedsEscape(c))
            {
                escaped.Append(CultureInfo.InvariantCulture, $"\\u{(int)c:x4}");
            }
            else
            {
                escaped.Append(c);
            }
        }

        return escaped.ToString();
    }

    private static bool NeedsEscape(char c) => char.IsControl(c) || char.IsSurrogate(c) || c is '\u2028' or '\u2029' or '\u0085';

    private string Folder(string root, DateTime processedAtUtc)
    {
        if (!Directory.Exists(root))
        {
            throw new DirectoryNotFoundException($"The folder {root} does not exist (removed, or a share not mounted); inputs are held until it is back.");
        }

        var folder = Path.Combine(root, processedAtUtc.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture));
        lock (_created)
        {
            if (_created.Add(folder) || !Directory.Exists(folder))
            {
                Directory.CreateDirectory(folder);
            }
        }

        return folder;
    }

    /// <summary>Where the input goes, and whether the same bytes are already there (a rerun, or a crash after a copy).</summary>
    private static (string Destination, bool Present) Destination(InputFile input, string sha256, string folder)
    {
        var name = input.Name;
        var destination = Path.Combine(folder, name);
        if (!File.Exists(destination))
        {
            return (destination, false);
        }

        if (Hashing.Sha256OfFile(destination) == sha256)
        {
            return (destination, true);
        }

        return (Path.Combine(folder, $"{Path.GetFileNameWithoutExtension(name)}~{sha256[..12]}{Path.GetExtension(name)}"), false);
    }

    private void Transfer(InputFile input, string destination, bool present)
    {
        if (present)
        {
            // The same content is already there: in move mode the input's move is completed by removing it.
            if (Mode == DispositionMode.Move)
            {
                File.Delete(input.Path);
            }
        }
        else if (Mode == DispositionMode.Move)
        {
            File.Move(input.Path, destination, overwrite: true);
        }
        else
        {
            File.Copy(input.Path, destination, overwrite: true);
        }
    }
}
