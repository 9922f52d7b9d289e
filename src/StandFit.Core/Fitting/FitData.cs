using System.Collections.Immutable;

namespace StandFit.Core.Fitting;

/// <summary>
/// The points of one fit: one column per input (stimulus), the output column, and optionally each
/// output reading's standard uncertainty (the fit is then weighted, w = 1/u^2), the source file's
/// name, each point's line in it and the input columns' names (for messages).
/// </summary>
public sealed class FitData
{
    public FitData(ImmutableArray<ImmutableArray<double>> inputs, ImmutableArray<double> output)
    {
        if (inputs.IsDefaultOrEmpty || inputs.Any(c => c.IsDefault || c.Length != output.Length))
        {
            throw new ArgumentException("Every input column needs one value per output value.", nameof(inputs));
        }

        Inputs = inputs;
        Output = output;
    }

    /// <summary>The points of a single-input fit.</summary>
    public FitData(ImmutableArray<double> stimulus, ImmutableArray<double> output)
        : this([stimulus], output)
    {
    }

    public ImmutableArray<ImmutableArray<double>> Inputs { get; }

    public ImmutableArray<double> Output { get; }

    public int Count => Output.Length;

    public int InputCount => Inputs.Length;

    /// <summary>Standard uncertainty of each output reading, or default (empty) for an unweighted fit.</summary>
    public ImmutableArray<double> Uncertainties { get; init; }

    public bool IsWeighted => !Uncertainties.IsDefaultOrEmpty;

    /// <summary>The file name used in messages.</summary>
    public string SourceName { get; init; } = "";

    /// <summary>The 1-based line of each point in the source file, or default (messages then count points).</summary>
    public ImmutableArray<int> SourceLines { get; init; }

    /// <summary>The name of each input column, or default (messages then use x, x1, x2 ...).</summary>
    public ImmutableArray<string> InputNames { get; init; }

    /// <summary>What messages call input k: its column name, or its symbol.</summary>
    public string InputName(int input) =>
        !InputNames.IsDefaultOrEmpty && input < InputNames.Length ? InputNames[input] : BasisTerm.InputSymbols(InputCount)[input];

    /// <summary>The line of point i, or 0 when unknown.</summary>
    public int LineOf(int point) => !SourceLines.IsDefaultOrEmpty && point < SourceLines.Length ? SourceLines[point] : 0;
}
