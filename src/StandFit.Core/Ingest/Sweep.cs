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
/// A unit's sweep, ready to fit: one stimulus and one output value per point, in acquisition order
/// (the recipe's order column, or file order). Units are the recipe's (see <c>units:</c>).
/// </summary>
public sealed class Sweep
{
    public Sweep(UnitIdentity identity, ImmutableArray<double> stimulus, ImmutableArray<double> output, ImmutableArray<Leg> legs, ImmutableArray<int> sourceLines, ImmutableArray<MetadataEntry> metadata)
    {
        if (stimulus.Length != output.Length || legs.Length != output.Length || sourceLines.Length != output.Length)
        {
            throw new ArgumentException("Every point needs a stimulus, an output, a leg and a source line.");
        }

        Identity = identity;
        Stimulus = stimulus;
        Output = output;
        Legs = legs;
        SourceLines = sourceLines;
        Metadata = metadata;
    }

    public UnitIdentity Identity { get; }

    public int Count => Stimulus.Length;

    public ImmutableArray<double> Stimulus { get; }

    public ImmutableArray<double> Output { get; }

    public ImmutableArray<Leg> Legs { get; }

    /// <summary>The 1-based line of the sweep file each point came from.</summary>
    public ImmutableArray<int> SourceLines { get; }

    public ImmutableArray<MetadataEntry> Metadata { get; }
}
