using System.Collections.Immutable;
using System.Globalization;

namespace StandFit.Core.Fitting;

/// <summary>Why a term's text could not be read.</summary>
public enum TermErrorKind
{
    /// <summary>The text does not follow the grammar; <see cref="TermError.Expected"/> says what was expected.</summary>
    Syntax,

    /// <summary>A function other than ln and sqrt.</summary>
    UnknownFunction,

    /// <summary>An input symbol the model does not have (x for one input, x1 ... xk for several).</summary>
    UnknownInput,

    /// <summary>A power out of range (0, beyond +/-10, or a negative power of a logarithm).</summary>
    BadPower,
}

/// <summary>A term that could not be read: what, the offending token and its 1-based character position in the term.</summary>
public sealed record TermError(TermErrorKind Kind, string Token, int Position, string Expected);

/// <summary>
/// Reads the text of a basis term. Grammar (spaces allowed between tokens):
/// <code>
/// term    = "1" | factor { "*" factor }
/// factor  = "1/" primary [ "^" int ] | primary [ "^" int ]
/// primary = input | "ln(" input ")" | "sqrt(" input ")"
/// input   = "x" (one input) | "x1" ... "x9" (several)
/// int     = [ "-" ] digits            (|int| from 1 to 10; a logarithm's power from 1 to 10)
/// </code>
/// Repeated factors multiply: <c>x*x</c> is <c>x^2</c>, <c>sqrt(x)*sqrt(x)</c> is <c>x</c>.
/// </summary>
public static class BasisTermParser
{
    public static readonly ImmutableArray<string> Functions = ["ln", "sqrt"];

    /// <summary>Reads <paramref name="text"/> as a term over <paramref name="inputCount"/> inputs.</summary>
    public static (BasisTerm? Term, TermError? Error) Parse(string text, int inputCount)
    {
        var reader = new Reader(text, BasisTerm.InputSymbols(inputCount));
        return reader.ReadTerm();
    }

    private sealed class Reader(string text, ImmutableArray<string> symbols)
    {
        private int _at;

        public (BasisTerm?, TermError?) ReadTerm()
        {
            var half = new int[symbols.Length];
            var logs = new int[symbols.Length];
            SkipSpaces();
            if (_at < text.Length && text[_at] == '1' && IsEndOfTermAfter(_at + 1))
            {
                _at++;
                SkipSpaces();
                return _at == text.Length
                    ? (BasisTerm.Of(half, logs), null)
                    : (null, Error(TermErrorKind.Syntax, "end of the term"));
            }

            while (true)
            {
                if (ReadFactor(half, logs) is { } error)
                {
                    return (null, error);
                }

                SkipSpaces();
                if (_at == text.Length)
                {
                    break;
                }

                if (text[_at] != '*')
                {
                    return (null, Error(TermErrorKind.Syntax, "'*' or the end of the term"));
                }

                _at++;
            }

            for (var k = 0; k < symbols.Length; k++)
            {
                if (Math.Abs(half[k]) > 2 * BasisTerm.MaxPower || logs[k] > BasisTerm.MaxPower)
                {
                    return (null, new TermError(TermErrorKind.BadPower, text.Trim(), 1, "powers from -10 to 10 in all"));
                }
            }

            if (half.All(h => h == 0) && logs.All(l => l == 0))
            {
                return (null, new TermError(TermErrorKind.BadPower, text.Trim(), 1, "a term that is not 1 in disguise (write the constant as 1)"));
            }

            return (BasisTerm.Of(half, logs), null);
        }

        private TermError? ReadFactor(int[] half, int[] logs)
        {
            SkipSpaces();
            var reciprocal = false;
            if (_at < text.Length && text[_at] == '1')
            {
                var start = _at;
                _at++;
                SkipSpaces();
                if (_at >= text.Length || text[_at] != '/')
                {
                    _at = start;
                    return Error(TermErrorKind.Syntax, "an input, ln(...), sqrt(...) or 1/...");
                }

                _at++;
                reciprocal = true;
                SkipSpaces();
            }

            var nameStart = _at;
            var name = ReadWord();
            if (name.Length == 0)
            {
                return Error(TermErrorKind.Syntax, "an input, ln(...), sqrt(...) or 1/...");
            }

            int input;
            var kind = 0; // 0: power of x, 1: ln, 2: sqrt
            SkipSpaces();
            if (_at < text.Length && text[_at] == '(')
            {
                if (!Functions.Contains(name))
                {
                    return new TermError(TermErrorKind.UnknownFunction, name, nameStart + 1, "");
                }

                kind = name == "ln" ? 1 : 2;
                _at++;
                SkipSpaces();
                var innerStart = _at;
                var inner = ReadWord();
                if (inner.Length == 0)
                {
                    return Error(TermErrorKind.Syntax, "an input inside the parentheses");
                }

                input = symbols.IndexOf(inner);
                if (input < 0)
                {
                    return new TermError(TermErrorKind.UnknownInput, inner, innerStart + 1, "");
                }

                SkipSpaces();
                if (_at >= text.Length || text[_at] != ')')
                {
                    return Error(TermErrorKind.Syntax, "')'");
                }

                _at++;
            }
            else
            {
                input = symbols.IndexOf(name);
                if (input < 0)
                {
                    return Functions.Contains(name)
                        ? Error(TermErrorKind.Syntax, "'(' after " + name)
                        : new TermError(TermErrorKind.UnknownInput, name, nameStart + 1, "");
                }
            }

            var power = 1;
            SkipSpaces();
            if (_at < text.Length && text[_at] == '^')
            {
                _at++;
                SkipSpaces();
                var powerStart = _at;
                if (_at < text.Length && text[_at] == '-')
                {
                    _at++;
                }

                while (_at < text.Length && char.IsAsciiDigit(text[_at]))
                {
                    _at++;
                }

                var digits = text[powerStart.._at];
                if (!int.TryParse(digits, NumberStyles.AllowLeadingSign, CultureInfo.InvariantCulture, out power))
                {
                    _at = powerStart;
                    return Error(TermErrorKind.Syntax, "a whole number after '^'");
                }

                if (power == 0 || Math.Abs(power) > BasisTerm.MaxPower || (kind == 1 && (power < 0 || reciprocal)))
                {
                    return new TermError(TermErrorKind.BadPower, digits, powerStart + 1, kind == 1 ? "a power of ln from 1 to 10" : "a power from -10 to 10, not 0");
                }
            }
            else if (kind == 1 && reciprocal)
            {
                return new TermError(TermErrorKind.BadPower, "1/ln", nameStart + 1, "a power of ln from 1 to 10");
            }

            var signed = reciprocal ? -power : power;
            switch (kind)
            {
                case 1:
                    logs[input] += signed;
                    break;
                case 2:
                    half[input] += signed;
                    break;
                default:
                    half[input] += 2 * signed;
                    break;
            }

            return null;
        }

        private string ReadWord()
        {
            var start = _at;
            while (_at < text.Length && (char.IsAsciiLetterOrDigit(text[_at]) || text[_at] == '_'))
            {
                _at++;
            }

            return text[start.._at];
        }

        private bool IsEndOfTermAfter(int index)
        {
            while (index < text.Length && text[index] == ' ')
            {
                index++;
            }

            return index == text.Length;
        }

        private void SkipSpaces()
        {
            while (_at < text.Length && text[_at] == ' ')
            {
                _at++;
            }
        }

        private TermError Error(TermErrorKind kind, string expected)
        {
            var token = _at < text.Length ? text[_at].ToString() : "end of the term";
            return new TermError(kind, token, Math.Min(_at, text.Length) + 1, expected);
        }
    }
}
