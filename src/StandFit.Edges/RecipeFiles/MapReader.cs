using System.Collections.Immutable;
using System.Globalization;
using System.Text.RegularExpressions;
using StandFit.Core.Problems;

namespace StandFit.Edges.RecipeFiles;

/// <summary>
/// Reads the keys of one YAML mapping against the list of keys allowed there. Unknown keys
/// (with a suggestion) and duplicate keys are reported when the reader is made; each typed read
/// reports a missing, empty or mistyped value and YAML 1.1 traps. Nothing is ever defaulted here:
/// a missing optional key is null, and the caller says what that means.
/// </summary>
public sealed partial class MapReader
{
    private readonly Dictionary<string, YamlEntry> _entries = new(StringComparer.Ordinal);
    private readonly IReadOnlyCollection<string>? _knownKeys;

    public MapReader(YamlMap map, string where, ProblemSink sink, IReadOnlyCollection<string>? knownKeys)
    {
        Mapping = map;
        _knownKeys = knownKeys;
        Where = where;
        Sink = sink;
        foreach (var entry in map.Entries)
        {
            var key = entry.Key.Text;
            if (_entries.TryGetValue(key, out var first))
            {
                sink.Add(RecipeCodes.DuplicateKey, Messages.DuplicateKey(key, first.Key.Line), entry.Key);
                continue;
            }

            if (knownKeys is not null && !knownKeys.Contains(key))
            {
                sink.Add(RecipeCodes.UnknownKey, Messages.UnknownKey(key, where, Suggestions.Closest(key, knownKeys), knownKeys), entry.Key);
                continue;
            }

            _entries.Add(key, entry);
        }
    }

    public YamlMap Mapping { get; }

    public string Where { get; }

    public ProblemSink Sink { get; }

    /// <summary>The entries that passed the duplicate and unknown-key checks, in file order.</summary>
    public IEnumerable<YamlEntry> Entries => Mapping.Entries.Where(e => _entries.TryGetValue(e.Key.Text, out var kept) && ReferenceEquals(kept, e));

    public bool Has(string key) => _entries.ContainsKey(key);

    public YamlNode? Node(string key) => _entries.TryGetValue(key, out var e) ? e.Value : null;

    public YamlScalar? KeyNode(string key) => _entries.TryGetValue(key, out var e) ? e.Key : null;

    public string Path(string key) => Where == "the file" ? $"'{key}'" : $"'{Where.Trim('\'')}.{key}'";

    public MapReader? Map(string key, IReadOnlyCollection<string>? knownKeys, bool required)
    {
        var node = Require(key, required);
        if (node is null)
        {
            return null;
        }

        if (node is YamlMap map)
        {
            return new MapReader(map, Path(key), Sink, knownKeys);
        }

        Sink.Add(RecipeCodes.BadValue, Messages.ExpectedMap(Path(key)), node);
        return null;
    }

    public string? Text(string key, bool required)
    {
        var node = Require(key, required);
        return node is null ? null : ReadText(node, Path(key), Sink);
    }

    public double? Number(string key, bool required)
    {
        var node = Require(key, required);
        return node is null ? null : ReadNumber(node, Path(key), Sink);
    }

    public int? Integer(string key, bool required)
    {
        var node = Require(key, required);
        if (node is null)
        {
            return null;
        }

        var value = ReadNumber(node, Path(key), Sink);
        if (value is null)
        {
            return null;
        }

        if (value.Value != Math.Floor(value.Value) || Math.Abs(value.Value) > int.MaxValue)
        {
            Sink.Add(RecipeCodes.BadValue, Messages.NotAnInteger(Path(key), ((YamlScalar)node).Text), node);
            return null;
        }

        return (int)value.Value;
    }

    /// <summary>A plain <c>true</c> or <c>false</c>; yes/no/on/off and anything else are refused.</summary>
    public bool? Boolean(string key, bool required)
    {
        var node = Require(key, required);
        if (node is null)
        {
            return null;
        }

        if (node is YamlScalar { Plain: true } scalar && scalar.Text is "true" or "false")
        {
            return scalar.Text == "true";
        }

        Sink.Add(RecipeCodes.BadValue, Messages.NotABoolean(Path(key), node is YamlScalar s ? s.Text : "(not a value)"), node);
        return null;
    }

    public ImmutableArray<(string Text, YamlNode Node)> TextList(string key, bool required)
    {
        var node = Require(key, required);
        if (node is null)
        {
            return [];
        }

        if (node is not YamlList list)
        {
            Sink.Add(RecipeCodes.BadValue, Messages.ExpectedList(Path(key)), node);
            return [];
        }

        if (list.Items.Length == 0)
        {
            Sink.Add(RecipeCodes.BadValue, Messages.EmptyList(Path(key)), node);
        }

        var builder = ImmutableArray.CreateBuilder<(string, YamlNode)>();
        foreach (var item in list.Items)
        {
            if (ReadText(item, Path(key), Sink) is { } text)
            {
                builder.Add((text, item));
            }
        }

        return builder.ToImmutable();
    }

    /// <summary>A scalar read as text; plain yes/no/on/off/true/false and empty values are refused.</summary>
    public static string? ReadText(YamlNode node, string where, ProblemSink sink)
    {
        if (node is not YamlScalar scalar)
        {
            sink.Add(RecipeCodes.BadValue, Messages.ExpectedScalar(where), node);
            return null;
        }

        if (scalar.Text.Trim().Length == 0 || (scalar.Plain && (scalar.Text == "~" || scalar.Text.Equals("null", StringComparison.OrdinalIgnoreCase))))
        {
            sink.Add(RecipeCodes.BadValue, Messages.EmptyValue(where, "a text"), node);
            return null;
        }

        if (scalar.Plain && IsYaml11Boolean(scalar.Text))
        {
            sink.Add(RecipeCodes.YamlTrap, Messages.BooleanTrap(where, scalar.Text, "text"), node);
            return null;
        }

        return scalar.Text;
    }

    /// <summary>
    /// A scalar read as a number: plain decimal notation in invariant culture. Refused with their own
    /// messages: empty values, quoted numbers, YAML 1.1 booleans, leading-zero octals, base-60, NaN and infinities.
    /// </summary>
    public static double? ReadNumber(YamlNode node, string where, ProblemSink sink)
    {
        if (node is not YamlScalar scalar)
        {
            sink.Add(RecipeCodes.BadValue, Messages.ExpectedScalar(where), node);
            return null;
        }

        var text = scalar.Text;
        if (scalar.Plain && (text.Length == 0 || text == "~" || text.Equals("null", StringComparison.OrdinalIgnoreCase)))
        {
            sink.Add(RecipeCodes.BadValue, Messages.EmptyValue(where, "a number"), node);
            return null;
        }

        if (scalar.Plain && IsYaml11Boolean(text))
        {
            sink.Add(RecipeCodes.YamlTrap, Messages.BooleanTrap(where, text, "a number"), node);
            return null;
        }

        if (Base60().IsMatch(text))
        {
            sink.Add(RecipeCodes.YamlTrap, Messages.Base60Trap(where, text), node);
            return null;
        }

        if (LeadingZero().IsMatch(text))
        {
            sink.Add(RecipeCodes.YamlTrap, Messages.OctalTrap(where, text), node);
            return null;
        }

        if (!DecimalNumber().IsMatch(text) || !double.TryParse(text, NumberStyles.Float, CultureInfo.InvariantCulture, out var value) || !double.IsFinite(value))
        {
            sink.Add(RecipeCodes.BadValue, Messages.NotANumber(where, text), node);
            return null;
        }

        if (!scalar.Plain)
        {
            sink.Add(RecipeCodes.BadValue, Messages.QuotedNumber(where, text), node);
            return null;
        }

        return value;
    }

    private YamlNode? Require(string key, bool required)
    {
        if (_knownKeys is not null && !_knownKeys.Contains(key))
        {
            // A bug, not bad input: the code reads a key the language (RecipeSchema) does not declare.
            throw new InvalidOperationException($"The code reads key '{key}' in {Where}, which the schema does not declare.");
        }

        var node = Node(key);
        if (node is null && required && !Mapping.Entries.Any(e => e.Key.Text == key))
        {
            Sink.Add(RecipeCodes.MissingKey, Messages.MissingKey(key, Where), Mapping);
        }

        return node;
    }

    private static bool IsYaml11Boolean(string text) =>
        text.ToUpperInvariant() is "Y" or "N" or "YES" or "NO" or "ON" or "OFF" or "TRUE" or "FALSE";

    [GeneratedRegex(@"^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$", RegexOptions.CultureInvariant)]
    private static partial Regex DecimalNumber();

    [GeneratedRegex(@"^[+-]?0\d", RegexOptions.CultureInvariant)]
    private static partial Regex LeadingZero();

    [GeneratedRegex(@"^[+-]?\d+(:[0-5]?\d)+(\.\d*)?$", RegexOptions.CultureInvariant)]
    private static partial Regex Base60();
}
