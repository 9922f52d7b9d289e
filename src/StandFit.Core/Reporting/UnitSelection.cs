using System.Collections.Immutable;

namespace StandFit.Core.Reporting;

/// <summary>Which summary rows a report counts, and in what order it draws them.</summary>
public static class UnitSelection
{
    /// <summary>
    /// The latest row of each part and serial (a unit with no serial stands for itself, by its
    /// unit key): a retested unit counts once, with its last result. "Latest" is the latest
    /// <c>processed_at</c>, ties broken by the smaller unit key, exactly as the yield query of
    /// docs/outputs.md picks it.
    /// </summary>
    public static ImmutableArray<ReportedUnit> LatestPerSerial(IEnumerable<ReportedUnit> rows) =>
        [.. rows
            .GroupBy(r => (r.Part, Serial: r.Serial ?? r.UnitKey))
            .Select(g => g.OrderByDescending(r => r.ProcessedAt).ThenBy(r => r.UnitKey, StringComparer.Ordinal).First())];

    /// <summary>Units in test order: by test start (or processing time), then serial, then unit key.</summary>
    public static ImmutableArray<ReportedUnit> InTestOrder(IEnumerable<ReportedUnit> units) =>
        [.. units
            .OrderBy(u => u.TestOrderTime)
            .ThenBy(u => u.Serial, StringComparer.Ordinal)
            .ThenBy(u => u.UnitKey, StringComparer.Ordinal)];
}
