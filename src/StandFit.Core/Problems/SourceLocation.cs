using System.Globalization;

namespace StandFit.Core.Problems;

/// <summary>
/// Where in a user's file a problem sits. Line and column are 1-based; 0 means "not known"
/// (for example a problem with the file as a whole).
/// </summary>
public readonly record struct SourceLocation(string File, int Line, int Column)
{
    public static SourceLocation WholeFile(string file) => new(file, 0, 0);

    public static SourceLocation At(string file, int line, int column = 0) => new(file, line, column);

    /// <summary><c>file:line:column</c>, the form editors and CI logs turn into links.</summary>
    public override string ToString() =>
        Line <= 0 ? File
        : Column <= 0 ? string.Create(CultureInfo.InvariantCulture, $"{File}:{Line}")
        : string.Create(CultureInfo.InvariantCulture, $"{File}:{Line}:{Column}");
}
