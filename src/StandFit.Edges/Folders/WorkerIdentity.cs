using System.Text;

namespace StandFit.Edges.Folders;

/// <summary>
/// The worker's identity: it names the worker's claim folder, its journal, its Parquet files and its
/// status file. 1 to 64 characters of <c>A-Z a-z 0-9 . _ -</c>, not starting with a dot; by default
/// the host name with every other character made <c>_</c>.
/// </summary>
public static class WorkerIdentity
{
    public const int MaxLength = 64;

    public static bool IsValid(string id) =>
        id.Length is > 0 and <= MaxLength && id[0] != '.' && id.All(IsAllowed);

    /// <summary>The host name, made safe for a file name.</summary>
    public static string Default()
    {
        var host = Environment.MachineName;
        var safe = new StringBuilder(Math.Min(host.Length, MaxLength));
        foreach (var c in host.Take(MaxLength))
        {
            safe.Append(IsAllowed(c) ? c : '_');
        }

        var id = safe.ToString().TrimStart('.');
        return id.Length == 0 ? "worker" : id;
    }

    private static bool IsAllowed(char c) => char.IsAsciiLetterOrDigit(c) || c is '.' or '_' or '-';
}
