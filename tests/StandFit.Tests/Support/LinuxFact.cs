namespace StandFit.Tests.Support;

/// <summary>A fact about Linux behaviour (the folder swap of <c>standfit compact</c>: renameat2, hard links): skipped, saying why, elsewhere.</summary>
public sealed class LinuxFactAttribute : FactAttribute
{
    public LinuxFactAttribute()
    {
        if (!OperatingSystem.IsLinux())
        {
            Skip = "Linux only: the folder swap uses renameat2(RENAME_EXCHANGE) and hard links, and the concurrent readers need files that can be deleted while open; the file protocol is tested on its own.";
        }
    }
}

/// <summary>A theory about Linux behaviour, skipped elsewhere (see <see cref="LinuxFactAttribute"/>).</summary>
public sealed class LinuxTheoryAttribute : TheoryAttribute
{
    public LinuxTheoryAttribute()
    {
        if (!OperatingSystem.IsLinux())
        {
            Skip = "Linux only: the folder swap uses renameat2(RENAME_EXCHANGE) and hard links, and the concurrent readers need files that can be deleted while open; the file protocol is tested on its own.";
        }
    }
}
