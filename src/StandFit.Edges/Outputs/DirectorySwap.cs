using System.Runtime.InteropServices;

namespace StandFit.Edges.Outputs;

/// <summary>
/// The three Linux calls the atomic folder swap of <see cref="PartitionCompactor"/> needs and .NET
/// does not offer: <c>renameat2(..., RENAME_EXCHANGE)</c> (swaps two directories in one step: at
/// every instant each name holds one whole directory), <c>link</c> (a second name for a file, so a
/// staged folder can hold the files published meanwhile without moving them out of the live one) and
/// <c>fsync</c> of a directory (makes a rename durable). Linux only (glibc 2.28 or later); on
/// other systems, and on file systems that refuse a call (NFS, SMB, FAT: <c>EINVAL</c>,
/// <c>EPERM</c>, <c>EOPNOTSUPP</c>, or <c>EXDEV</c> across mounts), the compactor uses its file
/// protocol instead.
/// </summary>
internal static partial class DirectorySwap
{
    private const int AtCurrentDirectory = -100;
    private const uint RenameExchange = 2;

    // errno values: the same on every Linux architecture .NET runs on (asm-generic/errno-base.h, errno.h).
    private const int EPERM = 1;
    private const int EXDEV = 18;
    private const int EINVAL = 22;
    private const int EMLINK = 31;
    private const int ENOSYS = 38;
    private const int EOPNOTSUPP = 95;

    /// <summary>Whether the system can be asked at all (Linux); a file system may still refuse.</summary>
    public static bool IsAvailable => OperatingSystem.IsLinux();

    /// <summary>True when an errno means "this file system (or kernel) cannot do it", not a fault: fall back.</summary>
    public static bool IsUnsupported(int errno) => errno is EPERM or EXDEV or EINVAL or EMLINK or ENOSYS or EOPNOTSUPP;

    /// <summary>Swaps two existing directories of one file system in one step; 0, or the errno.</summary>
    public static int Exchange(string first, string second)
    {
        try
        {
            return renameat2(AtCurrentDirectory, first, AtCurrentDirectory, second, RenameExchange) == 0 ? 0 : Marshal.GetLastPInvokeError();
        }
        catch (Exception e) when (e is EntryPointNotFoundException or DllNotFoundException)
        {
            return ENOSYS;
        }
    }

    /// <summary>Gives an existing file a second name (a hard link); 0, or the errno.</summary>
    public static int Link(string existing, string newName)
    {
        try
        {
            return link(existing, newName) == 0 ? 0 : Marshal.GetLastPInvokeError();
        }
        catch (Exception e) when (e is EntryPointNotFoundException or DllNotFoundException)
        {
            return ENOSYS;
        }
    }

    /// <summary>Flushes a directory's entries to disk. A file system that cannot sync a directory (<c>EINVAL</c>) is left as it is.</summary>
    public static void Sync(string directory)
    {
        var fd = open(directory, 0);
        if (fd < 0)
        {
            throw new IOException($"{directory} cannot be opened to flush it (errno {Marshal.GetLastPInvokeError()}).");
        }

        try
        {
            if (fsync(fd) != 0 && Marshal.GetLastPInvokeError() is var errno && errno != EINVAL)
            {
                throw new IOException($"{directory} cannot be flushed to disk (errno {errno}).");
            }
        }
        finally
        {
            _ = close(fd);
        }
    }

    [LibraryImport("libc", SetLastError = true, StringMarshalling = StringMarshalling.Utf8)]
    private static partial int renameat2(int oldDirectory, string oldPath, int newDirectory, string newPath, uint flags);

    [LibraryImport("libc", SetLastError = true, StringMarshalling = StringMarshalling.Utf8)]
    private static partial int link(string oldPath, string newPath);

    [LibraryImport("libc", SetLastError = true, StringMarshalling = StringMarshalling.Utf8)]
    private static partial int open(string path, int flags);

    [LibraryImport("libc", SetLastError = true)]
    private static partial int fsync(int fd);

    [LibraryImport("libc", SetLastError = true)]
    private static partial int close(int fd);
}
