namespace StandFit.Edges.Folders;

/// <summary>
/// The inbox. Lists the files ready to process, in ordinal name order: producers' temporary
/// names (<c>*.tmp</c>, <c>*.part</c>, <c>*.partial</c>, <c>~*</c>) and hidden files are left alone.
/// </summary>
public static class DropFolder
{
    public static IReadOnlyList<string> ListReady(string folder)
    {
        if (!Directory.Exists(folder))
        {
            return [];
        }

        return [.. Directory.EnumerateFiles(folder).Where(IsReady).Order(StringComparer.Ordinal)];
    }

    public static bool IsReady(string path)
    {
        var name = Path.GetFileName(path);
        return name.Length > 0
            && name[0] is not '.' and not '~'
            && !name.EndsWith(".tmp", StringComparison.OrdinalIgnoreCase)
            && !name.EndsWith(".part", StringComparison.OrdinalIgnoreCase)
            && !name.EndsWith(".partial", StringComparison.OrdinalIgnoreCase)
            && !name.EndsWith(".rejected.txt", StringComparison.OrdinalIgnoreCase);
    }
}
