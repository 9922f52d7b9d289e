using System.Globalization;
using System.Text;

namespace StandFit.Edges.RecipeFiles;

/// <summary>Writes a <see cref="YamlNode"/> tree back as YAML, each value followed by a comment naming the file and line it came from.</summary>
public static class YamlWriter
{
    public static string Write(YamlMap map)
    {
        var text = new StringBuilder();
        WriteMap(text, map, 0);
        return text.ToString();
    }

    private static void WriteMap(StringBuilder text, YamlMap map, int indent)
    {
        foreach (var entry in map.Entries)
        {
            text.Append(' ', indent).Append(Scalar(entry.Key.Text, plain: true)).Append(':');
            switch (entry.Value)
            {
                case YamlMap inner:
                    text.Append('\n');
                    WriteMap(text, inner, indent + 2);
                    break;
                case YamlList list:
                    text.Append(" [").Append(string.Join(", ", list.Items.Select(i => i is YamlScalar s ? Scalar(s.Text, s.Plain) : "..."))).Append(']');
                    Origin(text, list);
                    break;
                case YamlScalar scalar:
                    text.Append(' ').Append(Scalar(scalar.Text, scalar.Plain));
                    Origin(text, scalar);
                    break;
            }
        }
    }

    private static void Origin(StringBuilder text, YamlNode node) =>
        text.Append("    # ").Append(node.File).Append(':').Append(node.Line.ToString(CultureInfo.InvariantCulture)).Append('\n');

    private static string Scalar(string value, bool plain) =>
        plain && value.Length > 0 && value.All(c => char.IsAsciiLetterOrDigit(c) || c is '.' or '_' or '-' or '+')
            ? value
            : "\"" + value.Replace("\\", "\\\\", StringComparison.Ordinal).Replace("\"", "\\\"", StringComparison.Ordinal) + "\"";
}
