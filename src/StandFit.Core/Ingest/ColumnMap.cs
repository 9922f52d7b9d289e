using System.Collections.Immutable;

namespace StandFit.Core.Ingest;

/// <summary>
/// Which header columns hold the inputs (one stimulus column, or several for a model of several
/// inputs), the output, and optionally the leg, the acquisition order and each output reading's
/// standard uncertainty (for a weighted fit).
/// </summary>
public sealed record ColumnMap
{
    /// <summary>A map with one stimulus column.</summary>
    public ColumnMap(string stimulus, string output, string? leg = null, string? order = null, string? uncertainty = null)
        : this([stimulus], output, leg, order, uncertainty)
    {
    }

    /// <summary>A map with one or more input columns, in the order the model numbers them (x1, x2 ...).</summary>
    public ColumnMap(ImmutableArray<string> inputs, string output, string? leg = null, string? order = null, string? uncertainty = null)
    {
        if (inputs.IsDefaultOrEmpty)
        {
            throw new ArgumentException("A column map needs at least one input column.", nameof(inputs));
        }

        Inputs = inputs;
        Output = output;
        Leg = leg;
        Order = order;
        Uncertainty = uncertainty;
    }

    /// <summary>The input (stimulus) columns.</summary>
    public ImmutableArray<string> Inputs { get; }

    /// <summary>The first (or only) stimulus column.</summary>
    public string Stimulus => Inputs[0];

    public string Output { get; }

    public string? Leg { get; }

    public string? Order { get; }

    /// <summary>The column of standard uncertainties of the output readings, or null.</summary>
    public string? Uncertainty { get; }

    public bool Equals(ColumnMap? other) =>
        other is not null
        && Inputs.SequenceEqual(other.Inputs, StringComparer.Ordinal)
        && Output == other.Output && Leg == other.Leg && Order == other.Order && Uncertainty == other.Uncertainty;

    public override int GetHashCode() => HashCode.Combine(string.Join('\u001f', Inputs), Output, Leg, Order, Uncertainty);
}
