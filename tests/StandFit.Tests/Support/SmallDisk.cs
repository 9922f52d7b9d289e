using System.Diagnostics;
using System.Globalization;

namespace StandFit.Tests.Support;

/// <summary>
/// A tiny tmpfs mounted over a folder, or a read-only bind mount of a folder over itself (Linux, root
/// or CAP_SYS_ADMIN): a real file system that fills up, or that refuses writes. Tests run as root, where chmod does not stop writes, so this
/// is the honest way to make a folder full or read-only.
/// </summary>
public sealed class SmallDisk : IDisposable
{
    private readonly string _path;
    private bool _disposed;

    private SmallDisk(string path) => _path = path;

    /// <summary>Mounts a tmpfs of <paramref name="kilobytes"/> over an existing empty folder; null when mounting is not allowed here.</summary>
    public static SmallDisk? TryMount(string path, int kilobytes)
    {
        if (!OperatingSystem.IsLinux())
        {
            return null;
        }

        return Run("mount", "-t", "tmpfs", "-o", string.Create(CultureInfo.InvariantCulture, $"size={kilobytes}k"), "tmpfs", path) ? new SmallDisk(path) : null;
    }

    /// <summary>
    /// Makes a folder read-only by a read-only bind mount over itself (files already open for writing,
    /// such as the worker's lock, stay open; every new write through the path fails with EROFS). Null
    /// when mounting is not allowed here. Disposing removes the bind mount: the folder is writable again.
    /// </summary>
    public static SmallDisk? TryReadOnly(string path) =>
        OperatingSystem.IsLinux() && Run("mount", "--bind", path, path)
            ? (Run("mount", "-o", "remount,bind,ro", path) ? new SmallDisk(path) : Unmounted(path))
            : null;

    private static SmallDisk? Unmounted(string path)
    {
        Run("umount", path);
        return null;
    }

    /// <summary>Fills the file system with one file until it is full; returns the file.</summary>
    public string Fill()
    {
        var filler = Path.Combine(_path, "filler.bin");
        var block = new byte[4096];
        using var stream = new FileStream(filler, FileMode.Create, FileAccess.Write, FileShare.None, bufferSize: 1);
        try
        {
            while (true)
            {
                stream.Write(block);
                stream.Flush(flushToDisk: true);
            }
        }
        catch (IOException)
        {
            // Full.
        }

        return filler;
    }

    public void Dispose()
    {
        if (!_disposed)
        {
            _disposed = true;
            Run("umount", "-l", _path);
        }
    }

    private static bool Run(string command, params string[] args)
    {
        try
        {
            using var process = Process.Start(new ProcessStartInfo(command, args) { RedirectStandardError = true, RedirectStandardOutput = true, UseShellExecute = false });
            if (process is null)
            {
                return false;
            }

            process.WaitForExit();
            return process.ExitCode == 0;
        }
        catch (System.ComponentModel.Win32Exception)
        {
            return false;
        }
    }
}
