namespace StandFit.Tests.Support;

/// <summary>Finds the repository and the shared reference folder from the test's working directory.</summary>
public static class RepoPaths
{
    private static readonly Lazy<string> RootPath = new(() =>
    {
        var dir = new DirectoryInfo(AppContext.BaseDirectory);
        while (dir is not null && !File.Exists(Path.Combine(dir.FullName, "StandFit.sln")))
        {
            dir = dir.Parent;
        }

        return dir?.FullName ?? throw new InvalidOperationException("StandFit.sln not found above the test folder.");
    });

    /// <summary>The repository root (the folder holding StandFit.sln).</summary>
    public static string Root => RootPath.Value;

    /// <summary>The NIST StRD files, in the shared folder beside the repository.</summary>
    public static string NistStrd => Path.GetFullPath(Path.Combine(Root, "..", "shared", "reference", "nist-strd"));

    public static string InRepo(params string[] parts) => Path.Combine([Root, .. parts]);
}
