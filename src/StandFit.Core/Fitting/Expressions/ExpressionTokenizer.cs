using System.Globalization;
using StandFit.Core.Problems;

namespace StandFit.Core.Fitting.Expressions;

internal enum TokenKind
{
    Number,
    Name,
    Plus,
    Minus,
    Star,
    Slash,

    /// <summary><c>^</c> or <c>**</c>.</summary>
    Power,
    Open,
    Close,
    End,
}

/// <summary>
/// One token: its kind, its 1-based column and length in the text, the number it spells
/// (for <see cref="TokenKind.Number"/>), and the bracket character for Open and Close
/// ('(' or '[', ')' or ']').
/// </summary>
internal readonly record struct Token(TokenKind Kind, int Column, int Length, double Number, char Bracket);

/// <summary>
/// Splits an expression into tokens. Numbers are decimal with an optional exponent
/// (<c>2</c>, <c>0.5</c>, <c>.5</c>, <c>1.5E-3</c>); names are ASCII letters, digits and
/// underscores starting with a letter or underscore; whitespace separates tokens and is
/// otherwise ignored.
/// </summary>
internal static class ExpressionTokenizer
{
    public static ExpressionError? Tokenize(string text, List<Token> tokens)
    {
        var i = 0;
        while (i < text.Length)
        {
            var c = text[i];
            var column = i + 1;
            if (c is ' ' or '\t' or '\r' or '\n')
            {
                i++;
                continue;
            }

            if (c is (>= '0' and <= '9') or '.')
            {
                var error = ScanNumber(text, ref i, tokens);
                if (error is not null)
                {
                    return error;
                }

                continue;
            }

            if (ExpressionLanguage.IsNameStart(c))
            {
                var start = i;
                while (i < text.Length && ExpressionLanguage.IsNamePart(text[i]))
                {
                    i++;
                }

                tokens.Add(new Token(TokenKind.Name, start + 1, i - start, 0, '\0'));
                continue;
            }

            switch (c)
            {
                case '+':
                    tokens.Add(new Token(TokenKind.Plus, column, 1, 0, '\0'));
                    break;
                case '-':
                    tokens.Add(new Token(TokenKind.Minus, column, 1, 0, '\0'));
                    break;
                case '*' when i + 1 < text.Length && text[i + 1] == '*':
                    tokens.Add(new Token(TokenKind.Power, column, 2, 0, '\0'));
                    i++;
                    break;
                case '*':
                    tokens.Add(new Token(TokenKind.Star, column, 1, 0, '\0'));
                    break;
                case '/':
                    tokens.Add(new Token(TokenKind.Slash, column, 1, 0, '\0'));
                    break;
                case '^':
                    tokens.Add(new Token(TokenKind.Power, column, 1, 0, '\0'));
                    break;
                case '(' or '[':
                    tokens.Add(new Token(TokenKind.Open, column, 1, 0, c));
                    break;
                case ')' or ']':
                    tokens.Add(new Token(TokenKind.Close, column, 1, 0, c));
                    break;
                default:
                    return new ExpressionError(Messages.ExpressionUnexpectedCharacter(Shown(c)), column);
            }

            i++;
        }

        tokens.Add(new Token(TokenKind.End, text.Length + 1, 0, 0, '\0'));
        return null;
    }

    private static ExpressionError? ScanNumber(string text, ref int i, List<Token> tokens)
    {
        var start = i;
        var digits = 0;
        while (i < text.Length && char.IsAsciiDigit(text[i]))
        {
            i++;
            digits++;
        }

        if (i < text.Length && text[i] == '.')
        {
            i++;
            while (i < text.Length && char.IsAsciiDigit(text[i]))
            {
                i++;
                digits++;
            }
        }

        if (digits == 0)
        {
            return new ExpressionError(Messages.ExpressionBadNumber(text[start..i]), start + 1);
        }

        // An exponent only when 'e' is followed by digits (or a sign and digits); otherwise the
        // 'e' starts a name, and the parser reports the missing operator.
        if (i < text.Length && text[i] is 'e' or 'E')
        {
            var j = i + 1;
            if (j < text.Length && text[j] is '+' or '-')
            {
                j++;
            }

            if (j < text.Length && char.IsAsciiDigit(text[j]))
            {
                i = j;
                while (i < text.Length && char.IsAsciiDigit(text[i]))
                {
                    i++;
                }
            }
        }

        var spelled = text.AsSpan(start, i - start);
        var value = double.Parse(spelled, NumberStyles.AllowDecimalPoint | NumberStyles.AllowExponent, CultureInfo.InvariantCulture);
        if (!double.IsFinite(value))
        {
            return new ExpressionError(Messages.ExpressionNumberNotFinite(spelled.ToString()), start + 1);
        }

        tokens.Add(new Token(TokenKind.Number, start + 1, i - start, value, '\0'));
        return null;
    }

    /// <summary>A character as a message shows it: printable ASCII as itself, anything else as U+XXXX.</summary>
    private static string Shown(char c) =>
        c is >= ' ' and <= '~'
            ? "'" + c + "'"
            : "U+" + ((int)c).ToString("X4", CultureInfo.InvariantCulture);
}
