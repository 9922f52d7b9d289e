namespace StandFit.Core.Ingest;

/// <summary>Which header columns hold the stimulus, the output, and optionally the leg and the acquisition order.</summary>
public sealed record ColumnMap(string Stimulus, string Output, string? Leg = null, string? Order = null);
