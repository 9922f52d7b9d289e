using System.Globalization;
using System.Text;

namespace StandFit.Edges.Folders;

/// <summary>
/// One of <see cref="Count"/> disjoint parts of a folder of sweep files, for spreading one job (a
/// year of archived sweeps re-judged under a changed recipe) over several processes or machines.
/// Written <c>I/N</c> with 0 &lt;= I &lt; N &lt;= 10000 (0-based, as a Kubernetes Indexed Job numbers
/// its pods). A file belongs to shard FNV-1a-64(UTF-8 of its file name) mod N: a fixed function of
/// the name alone, so every process agrees without talking to the others, every file is in exactly
/// one shard, and the split does not change with the order or the number of files.
/// </summary>
public readonly record struct Shard
{
    public const int MaxCount = 10_000;

    private Shard(int index, int count)
    {
        Index = index;
        Count = count;
    }

    /// <summary>The whole folder (shard 0 of 1).</summary>
    public static Shard All { get; } = new(0, 1);

    /// <summary>0-based index of this shard, below <see cref="Count"/>.</summary>
    public int Index { get; }

    /// <summary>Number of shards, 1 to <see cref="MaxCount"/>.</summary>
    public int Count { get; }

    /// <summary>Reads <c>I/N</c>; false when the text is not one (the caller reports <c>Messages.BadShard</c>).</summary>
    public static bool TryParse(string text, out Shard shard)
    {
        var slash = text.IndexOf('/', StringComparison.Ordinal);
        if (slash > 0
            && int.TryParse(text.AsSpan(0, slash), NumberStyles.None, CultureInfo.InvariantCulture, out var index)
            && int.TryParse(text.AsSpan(slash + 1), NumberStyles.None, CultureInfo.InvariantCulture, out var count)
            && count is >= 1 and <= MaxCount
            && index < count)
        {
            shard = new Shard(index, count);
            return true;
        }

        shard = All;
        return false;
    }

    /// <summary>True when the file named by <paramref name="path"/> (its name, without folder) is in this shard.</summary>
    public bool Owns(string path) => Count == 1 || (int)(Fnv1a64(Path.GetFileName(path)) % (ulong)Count) == Index;

    /// <summary>The worker identity of this shard: each shard keeps its own claims, journal and files.</summary>
    public string WorkerIdOf(string workerId) =>
        Count == 1 ? workerId : string.Create(CultureInfo.InvariantCulture, $"{workerId[..Math.Min(workerId.Length, WorkerIdentity.MaxLength - 24)]}-shard-{Index}-of-{Count}");

    public override string ToString() => string.Create(CultureInfo.InvariantCulture, $"{Index}/{Count}");

    /// <summary>FNV-1a, 64 bits (Fowler, Noll and Vo; offset basis 14695981039346656037, prime 1099511628211).</summary>
    internal static ulong Fnv1a64(string name)
    {
        var hash = 14695981039346656037UL;
        foreach (var b in Encoding.UTF8.GetBytes(name))
        {
            hash ^= b;
            hash *= 1099511628211UL;
        }

        return hash;
    }
}
