namespace StandFit.Cli;

/// <summary>The process exit codes (documented in the README).</summary>
public static class ExitCodes
{
    /// <summary>The command did its work (whatever the units' rulings).</summary>
    public const int Ok = 0;

    /// <summary><c>recipes check</c> found problems; <c>inspect</c> could not read its file; <c>report</c> found no output folder.</summary>
    public const int Invalid = 1;

    /// <summary>The command line is wrong.</summary>
    public const int Usage = 2;

    /// <summary>The configuration or the recipes in force are invalid; nothing was processed.</summary>
    public const int Configuration = 3;

    /// <summary>An output (summary Parquet, archive, rejected folder) could not be written; inputs stay where they were.</summary>
    public const int OutputFault = 4;

    /// <summary>The pass/fail log could not be written, or another fatal error stopped the worker.</summary>
    public const int Fatal = 5;
}
