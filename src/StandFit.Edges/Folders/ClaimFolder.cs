using System.Globalization;
using System.Security.Cryptography;

namespace StandFit.Edges.Folders;

/// <summary>
/// The claim protocol. A ready file is claimed by renaming it, inside the inbox's own volume, to
/// <c>INBOX/.claimed/WORKER/CLAIM~NAME</c>: the folder names the worker, <c>CLAIM</c> (a random
/// instance id and a sequence number) makes every claim name unique for all time, <c>NAME</c> is the
/// name the file was dropped under. A rename of one source succeeds for exactly one worker, so
/// several workers on one share never process the same file; the loser sees the file gone and
/// skips it. Only the process that holds the worker identity's lock (<see cref="WorkerLock"/>) works
/// in the folder; a crashed worker's claims are picked up by the next process of the same identity.
/// </summary>
public sealed class ClaimFolder : IInputIntake
{
    public const string FolderName = ".claimed";
    private readonly string _inbox;
    private readonly string _instance = Convert.ToHexStringLower(RandomNumberGenerator.GetBytes(4));
    private long _sequence;

    public ClaimFolder(string inbox, string workerId)
    {
        _inbox = inbox;
        WorkerId = workerId;
        Folder = Path.Combine(inbox, FolderName, workerId);
    }

    public string WorkerId { get; }

    /// <summary>This worker's claim folder.</summary>
    public string Folder { get; }

    public DispositionMode Mode => DispositionMode.Move;

    public IReadOnlyList<InputFile> Leftovers()
    {
        if (!Directory.Exists(Folder))
        {
            return [];
        }

        var list = new List<InputFile>();
        foreach (var path in Directory.EnumerateFiles(Folder).Order(StringComparer.Ordinal))
        {
            var claim = Path.GetFileName(path);
            var tilde = claim.IndexOf('~', StringComparison.Ordinal);
            if (claim.StartsWith('.') || tilde <= 0 || tilde == claim.Length - 1)
            {
                continue; // the lock, or nothing this protocol made
            }

            list.Add(new InputFile(path, claim[(tilde + 1)..], claim));
        }

        return list;
    }

    public IReadOnlyList<InputFile> Take(IReadOnlyList<string> paths)
    {
        var taken = new List<InputFile>(paths.Count);
        foreach (var path in paths)
        {
            if (TryClaim(path) is { } input)
            {
                taken.Add(input);
            }
        }

        return taken;
    }

    /// <summary>Claims one ready file; null when it is gone (another worker claimed it, or the producer took it back).</summary>
    public InputFile? TryClaim(string path)
    {
        var name = Path.GetFileName(path);
        var claim = string.Create(CultureInfo.InvariantCulture, $"{_instance}-{Interlocked.Increment(ref _sequence):D8}~{name}");
        var destination = Path.Combine(Folder, claim);
        try
        {
            // rename(2): atomic, and of two workers renaming the same source only one succeeds.
            // (Without overwrite, .NET on Unix links then unlinks, which two workers can both do.)
            // The destination name is unique to this process, so nothing is overwritten.
            File.Move(path, destination, overwrite: true);
        }
        catch (FileNotFoundException)
        {
            return null;
        }
        catch (DirectoryNotFoundException) when (!File.Exists(path))
        {
            return null;
        }
        catch (DirectoryNotFoundException)
        {
            // The claim folder was removed under the worker: make it again.
            Directory.CreateDirectory(Folder);
            File.Move(path, destination, overwrite: true);
        }

        return new InputFile(destination, name, claim);
    }

    public void Release(InputFile input)
    {
        var back = Path.Combine(_inbox, input.Name);
        if (input.Claim is null || File.Exists(back))
        {
            return; // a new file of that name has landed: keep ours claimed, it is picked up as a leftover
        }

        try
        {
            File.Move(input.Path, back, overwrite: false);
        }
        catch (IOException)
        {
            // It stays claimed and is processed as a leftover on the next pass or start.
        }
    }
}
