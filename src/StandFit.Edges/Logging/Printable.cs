using StandFit.Edges.Folders;

namespace StandFit.Edges.Logging;

/// <summary>Text from an input (a file name, a serial) made safe for one log line: control and line-separator characters become <c>\uXXXX</c>.</summary>
public static class Printable
{
    public static string Of(string? text) => text is null ? "-" : FileDisposer.SidecarValue(text);
}
