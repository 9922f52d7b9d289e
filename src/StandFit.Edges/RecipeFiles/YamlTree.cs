using System.Collections.Immutable;
using StandFit.Core.Problems;
using YamlDotNet.Core;
using YamlDotNet.Core.Events;

namespace StandFit.Edges.RecipeFiles;

/// <summary>A YAML node with the 1-based line and column where it starts.</summary>
public abstract record YamlNode(int Line, int Column)
{
    /// <summary>The file the node was read from (a recipe's inherited keys come from its family's file).</summary>
    public string? File { get; init; }
}

/// <summary>A scalar exactly as written: its text and whether it was quoted (plain scalars carry YAML 1.1 traps).</summary>
public sealed record YamlScalar(string Text, bool Plain, int Line, int Column) : YamlNode(Line, Column);

public sealed record YamlEntry(YamlScalar Key, YamlNode Value);

public sealed record YamlMap(ImmutableArray<YamlEntry> Entries, int Line, int Column) : YamlNode(Line, Column);

public sealed record YamlList(ImmutableArray<YamlNode> Items, int Line, int Column) : YamlNode(Line, Column);

/// <summary>
/// Builds a <see cref="YamlNode"/> tree from YamlDotNet's event parser, keeping every position and
/// every scalar's raw text, so that the binder, not YAML 1.1, decides what a value means. Anchors,
/// aliases, tags and multiple documents are refused: a recipe is plain data.
/// </summary>
public static class YamlTree
{
    public static Result<YamlNode?> Parse(string file, string text)
    {
        var last = new Mark[] { Mark.Empty };
        try
        {
            var parser = new Parser(new StringReader(text));
            parser.Consume<StreamStart>();
            if (parser.Accept<StreamEnd>(out _))
            {
                return Result<YamlNode?>.Success(null);
            }

            parser.Consume<DocumentStart>();
            var root = ReadNode(parser, file, text, last);
            parser.Consume<DocumentEnd>();
            if (!parser.Accept<StreamEnd>(out _))
            {
                var next = parser.Current!;
                return Problem(file, next.Start, Messages.RecipeMultipleDocuments());
            }

            return Result<YamlNode?>.Success(root);
        }
        catch (RefusedYamlException e)
        {
            return Problem(file, e.Mark, e.Message);
        }
        catch (YamlException e)
        {
            return Problem(file, e.Start, Messages.RecipeYamlSyntax(e.InnerException?.Message ?? e.Message));
        }
        catch (InvalidOperationException e)
        {
            // YamlDotNet's scanner throws this on some malformed input (an unclosed flow mapping
            // followed by more lines): still a syntax problem of the user's file, near the last node read.
            return Problem(file, last[0], Messages.RecipeYamlSyntax(e.Message));
        }
    }

    private static YamlNode ReadNode(IParser parser, string file, string text, Mark[] last)
    {
        var current = parser.Current ?? throw new RefusedYamlException(last[0], Messages.RecipeYamlSyntax("unexpected end of input"));
        last[0] = current.Start;
        switch (current)
        {
            case AnchorAlias alias:
                throw new RefusedYamlException(alias.Start, Messages.RecipeAliasRefused());
            case NodeEvent { Anchor.IsEmpty: false } anchored:
                throw new RefusedYamlException(anchored.Start, Messages.RecipeAliasRefused());
            case NodeEvent { Tag.IsEmpty: false } tagged when tagged is not Scalar { Tag.Value: "!" }:
                throw new RefusedYamlException(tagged.Start, Messages.RecipeTagRefused(WrittenTag(text, tagged.Start, tagged.Tag.Value)));
        }

        if (parser.TryConsume<Scalar>(out var scalar))
        {
            return new YamlScalar(scalar.Value, scalar.Style == ScalarStyle.Plain, (int)scalar.Start.Line, (int)scalar.Start.Column) { File = file };
        }

        if (parser.TryConsume<SequenceStart>(out var sequenceStart))
        {
            var items = ImmutableArray.CreateBuilder<YamlNode>();
            while (!parser.TryConsume<SequenceEnd>(out _))
            {
                items.Add(ReadNode(parser, file, text, last));
            }

            return new YamlList(items.ToImmutable(), (int)sequenceStart.Start.Line, (int)sequenceStart.Start.Column) { File = file };
        }

        if (parser.TryConsume<MappingStart>(out var mappingStart))
        {
            var entries = ImmutableArray.CreateBuilder<YamlEntry>();
            while (!parser.TryConsume<MappingEnd>(out _))
            {
                var key = ReadNode(parser, file, text, last);
                if (key is not YamlScalar keyScalar)
                {
                    throw new RefusedYamlException(new Mark(0, key.Line, key.Column), Messages.RecipeComplexKey());
                }

                entries.Add(new YamlEntry(keyScalar, ReadNode(parser, file, text, last)));
            }

            return new YamlMap(entries.ToImmutable(), (int)mappingStart.Start.Line, (int)mappingStart.Start.Column) { File = file };
        }

        throw new RefusedYamlException(current.Start, Messages.RecipeYamlSyntax("unexpected " + current.GetType().Name));
    }

    /// <summary>
    /// The tag as the author wrote it ('!!float'), read from the text where the node starts; the
    /// parser only has its expanded name ('tag:yaml.org,2002:float').
    /// </summary>
    private static string WrittenTag(string text, Mark start, string expanded)
    {
        var at = (int)Math.Clamp(start.Index, 0, text.Length);
        if (at < text.Length && text[at] == '!')
        {
            var end = at;
            while (end < text.Length && !char.IsWhiteSpace(text[end]) && text[end] is not (',' or '[' or ']' or '{' or '}'))
            {
                end++;
            }

            return text[at..end];
        }

        const string Core = "tag:yaml.org,2002:";
        return expanded.StartsWith(Core, StringComparison.Ordinal) ? "!!" + expanded[Core.Length..] : expanded;
    }

    private static Result<YamlNode?> Problem(string file, Mark mark, string message) =>
        Result<YamlNode?>.Failure(new Problem(RecipeCodes.Syntax, message, SourceLocation.At(file, (int)mark.Line, (int)mark.Column)));

    private sealed class RefusedYamlException(Mark mark, string message) : Exception(message)
    {
        public Mark Mark { get; } = mark;
    }
}
