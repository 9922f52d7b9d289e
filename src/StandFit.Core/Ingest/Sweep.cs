using System.Collections.Immutable;

namespace StandFit.Core.Ingest;

/// <summary>The direction in which the stand approached a set point.</summary>
public enum Leg
{
    /// <summary>The file has no leg column.</summary>
    Unknown = 0,
    Up = 1,
    Down = 2,
}

/// <summary>Who the unit is: the fields every output row carries.</summary>
public sealed record UnitIdentity(string Serial, string? Part, string? Station, DateTime? TestStartUtc);

/// <summary>
/// A unit's sweep, ready to fit: one value of each input (stimulus) and one output value per
/// point, optionally each output reading's standard uncertainty, in acquisition order (the
/// recipe's order column, or file order). Units are the recipe's (see <c>units:</c>).
/// </summary>
public sealed class Sweep
{
    public Sweep(UnitIdentity identity, ImmutableArray<double> stimulus, ImmutableArray<double> output, ImmutableArray<Leg> legs, ImmutableArray<int> sourceLines, ImmutableArray<MetadataEntry> metadata)
        : this(identity, [stimulus], output, legs, sourceLines, metadata, default)
    {
    }

    public Sweep(
        UnitIdentity identity,
        ImmutableArray<ImmutableArray<double>> inputs,
        ImmutableArray<double> output,
        ImmutableArray<Leg> legs,
        ImmutableArray<int> sourceLines,
        ImmutableArray<MetadataEntry> metadata,
        ImmutableArray<double> uncertainties)
    {
        if (inputs.IsDefaultOrEmpty || inputs.Any(c => c.Length != output.Length) || legs.Length != output.Length || sourceLines.Length != output.Length
            || (!uncertainties.IsDefaultOrEmpty && uncertainties.Length != output.Length))
        {
            throw new ArgumentException("Every point needs its inputs, an output, a leg and a source line (and an uncertainty when there are any).");
        }

        Identity = identity;
        Inputs = inputs;
        Output = output;
        Legs = legs;
        SourceLines = sourceLines;
        Metadata = metadata;
        Uncertainties = uncertainties;
    }

    public UnitIdentity Identity { get; }

    public int Count => Output.Length;

    /// <summary>One column of values per input, in the recipe's order.</summary>
    public ImmutableArray<ImmutableArray<double>> Inputs { get; }

    /// <summary>The first (or only) input.</summary>
    public ImmutableArray<double> Stimulus => Inputs[0];

    /// <summary>Each output reading's standard uncertainty (from the recipe's uncertainty column), or default when there is none.</summary>
    public ImmutableArray<double> Uncertainties { get; }

    public ImmutableArray<double> Output { get; }

    public ImmutableArray<Leg> Legs { get; }

    /// <summary>The 1-based line of the sweep file each point came from.</summary>
    public ImmutableArray<int> SourceLines { get; }

    public ImmutableArray<MetadataEntry> Metadata { get; }
}
