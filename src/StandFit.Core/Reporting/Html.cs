using System.Text;

namespace StandFit.Core.Reporting;

/// <summary>
/// Escaping for the report's HTML and its inline SVG. Every text that comes from the data (serials,
/// parts, stations, file names, recipe names, reason sentences, run ids) goes through
/// <see cref="Escape"/>, in element text and in attribute values alike: <c>&amp; &lt; &gt; " '</c> become
/// entities, and characters that XML forbids (control characters other than tab, line feed and
/// carriage return, lone surrogates, U+FFFE and U+FFFF) become U+FFFD, so the page stays well-formed
/// XML as well as HTML.
/// </summary>
public static class Html
{
    public static string Escape(string? text)
    {
        if (string.IsNullOrEmpty(text))
        {
            return "";
        }

        StringBuilder? escaped = null;
        for (var i = 0; i < text.Length; i++)
        {
            var c = text[i];
            string? replacement = c switch
            {
                '&' => "&amp;",
                '<' => "&lt;",
                '>' => "&gt;",
                '"' => "&quot;",
                '\'' => "&#39;",
                _ => null,
            };
            if (replacement is null)
            {
                if (char.IsHighSurrogate(c) && i + 1 < text.Length && char.IsLowSurrogate(text[i + 1]))
                {
                    escaped?.Append(c).Append(text[i + 1]);
                    i++;
                    continue;
                }

                if ((c < 0x20 && c is not '\t' and not '\n' and not '\r') || char.IsSurrogate(c) || c is '\uFFFE' or '\uFFFF')
                {
                    replacement = "\uFFFD";
                }
            }

            if (replacement is null)
            {
                escaped?.Append(c);
                continue;
            }

            escaped ??= new StringBuilder(text.Length + 16).Append(text, 0, i);
            escaped.Append(replacement);
        }

        return escaped?.ToString() ?? text;
    }
}
