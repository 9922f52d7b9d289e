using System.Collections.Immutable;

namespace StandFit.Core.Fitting.Expressions;

/// <summary>
/// The fixed vocabulary and limits of the model expression language (docs/expressions.md): the
/// functions, the constant <c>pi</c>, and the bounds on length, nesting and the number of names.
/// The language can express arithmetic only: no loops, no calls outside the function table, no
/// access to anything but the numbers it is given.
/// </summary>
public static class ExpressionLanguage
{
    /// <summary>Longest expression text accepted, in characters.</summary>
    public const int MaxLength = 2000;

    /// <summary>Deepest nesting accepted: parentheses, function calls, signs and powers each add one level.</summary>
    public const int MaxDepth = 64;

    /// <summary>Most parameters one expression may have.</summary>
    public const int MaxParameters = 32;

    /// <summary>Most variables (stimulus columns) one expression may have.</summary>
    public const int MaxVariables = 16;

    /// <summary>The name of the constant pi (3.14159...).</summary>
    public const string Pi = "pi";

    /// <summary>The default stimulus variable.</summary>
    public const string DefaultVariable = "x";

    // Declared before Functions: static initialisers run in the order they are written.
    internal static ImmutableDictionary<string, Operation> FunctionTable { get; } = new Dictionary<string, Operation>(StringComparer.Ordinal)
    {
        ["exp"] = Operation.Exp,
        ["ln"] = Operation.Ln,
        ["log"] = Operation.Ln,
        ["log10"] = Operation.Log10,
        ["sqrt"] = Operation.Sqrt,
        ["sin"] = Operation.Sin,
        ["cos"] = Operation.Cos,
        ["tan"] = Operation.Tan,
        ["atan"] = Operation.Atan,
        ["arctan"] = Operation.Atan,
    }.ToImmutableDictionary(StringComparer.Ordinal);

    /// <summary>The function names, each taking one argument in parentheses.</summary>
    public static ImmutableArray<string> Functions { get; } = [.. FunctionTable.Keys.Order(StringComparer.Ordinal)];

    /// <summary>True for a name the language keeps for itself (a function or <c>pi</c>).</summary>
    public static bool IsReserved(string name) => name == Pi || FunctionTable.ContainsKey(name);

    /// <summary>
    /// True for a valid variable or parameter name: an ASCII letter or underscore, then ASCII
    /// letters, digits or underscores, at most 64 characters, and not reserved.
    /// </summary>
    public static bool IsValidName(string name)
    {
        if (name.Length is 0 or > 64 || !IsNameStart(name[0]))
        {
            return false;
        }

        foreach (var c in name)
        {
            if (!IsNamePart(c))
            {
                return false;
            }
        }

        return !IsReserved(name);
    }

    internal static bool IsNameStart(char c) => c is (>= 'a' and <= 'z') or (>= 'A' and <= 'Z') or '_';

    internal static bool IsNamePart(char c) => IsNameStart(c) || c is >= '0' and <= '9';
}
