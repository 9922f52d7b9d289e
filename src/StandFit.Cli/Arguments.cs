namespace StandFit.Cli;

/// <summary>
/// A minimal command-line reader: positional words, <c>--flag</c>, and <c>--option VALUE</c>
/// (or <c>--option=VALUE</c>). Unknown options are errors, reported with the command's usage.
/// </summary>
public sealed class Arguments
{
    private readonly Dictionary<string, string?> _options = new(StringComparer.Ordinal);

    private Arguments(List<string> positional) => Positional = positional;

    public IReadOnlyList<string> Positional { get; }

    public bool Has(string name) => _options.ContainsKey(name);

    public string? Value(string name) => _options.TryGetValue(name, out var v) ? v : null;

    /// <summary>Parses <paramref name="args"/>; <paramref name="valued"/> take a value, <paramref name="flags"/> do not.</summary>
    public static (Arguments? Parsed, string? Error) Parse(IEnumerable<string> args, IReadOnlyCollection<string> valued, IReadOnlyCollection<string> flags)
    {
        var positional = new List<string>();
        var result = new Arguments(positional);
        using var e = args.GetEnumerator();
        while (e.MoveNext())
        {
            var arg = e.Current;
            if (!arg.StartsWith("--", StringComparison.Ordinal) || arg == "--")
            {
                positional.Add(arg);
                continue;
            }

            var name = arg;
            string? inline = null;
            var eq = arg.IndexOf('=', StringComparison.Ordinal);
            if (eq > 0)
            {
                name = arg[..eq];
                inline = arg[(eq + 1)..];
            }

            if (flags.Contains(name) && inline is null)
            {
                result._options[name] = null;
            }
            else if (valued.Contains(name))
            {
                if (inline is null)
                {
                    if (!e.MoveNext())
                    {
                        return (null, $"option {name} needs a value");
                    }

                    inline = e.Current;
                }

                result._options[name] = inline;
            }
            else
            {
                return (null, $"unknown option {name}");
            }
        }

        return (result, null);
    }
}
