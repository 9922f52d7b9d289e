namespace StandFit.Core.Problems;

/// <summary>
/// Bad user input (a sweep file, a recipe, a configuration), as a value. A bug throws; a problem
/// is returned. <see cref="Message"/> says what is wrong and how to fix it; <see cref="Location"/>
/// names the file, line and column.
/// </summary>
public sealed record Problem(string Code, string Message, SourceLocation Location)
{
    public override string ToString() => $"{Location}: {Message} [{Code}]";
}
