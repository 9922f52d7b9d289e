using System.Collections.Immutable;
using System.Globalization;
using StandFit.Core.Judging;

namespace StandFit.Core.Reporting;

/// <summary>One row of a yield table: the units of one group by ruling, and the yield pass / units.</summary>
public sealed record YieldRow(string? Key, int Units, int Pass, int Fail, int Retest, int Rejected)
{
    /// <summary>100 · pass / units (rejected inputs count as units, as in the yield query of docs/outputs.md); null for no unit.</summary>
    public double? YieldPercent => Units == 0 ? null : 100.0 * Pass / Units;
}

/// <summary>Yield tables: units counted by ruling, grouped by part, station, hour or anything else.</summary>
public static class YieldTable
{
    /// <summary>One row per key (ordinal order, the units without a key last).</summary>
    public static ImmutableArray<YieldRow> By(IEnumerable<ReportedUnit> units, Func<ReportedUnit, string?> key) =>
        [.. units
            .GroupBy(key)
            .OrderBy(g => g.Key is null ? 1 : 0)
            .ThenBy(g => g.Key, StringComparer.Ordinal)
            .Select(g => Count(g.Key, g))];

    /// <summary>Every unit in one row.</summary>
    public static YieldRow Total(IEnumerable<ReportedUnit> units) => Count(null, units);

    /// <summary>The UTC hour a unit was tested in, as <c>YYYY-MM-DD HH:00Z</c> (its test start, or its processing time).</summary>
    public static string HourOf(ReportedUnit unit) =>
        unit.TestOrderTime.ToUniversalTime().ToString("yyyy-MM-dd HH':00Z'", CultureInfo.InvariantCulture);

    private static YieldRow Count(string? key, IEnumerable<ReportedUnit> units)
    {
        int pass = 0, fail = 0, retest = 0, rejected = 0;
        foreach (var u in units)
        {
            switch (u.Ruling)
            {
                case Ruling.Pass: pass++; break;
                case Ruling.Fail: fail++; break;
                case Ruling.Retest: retest++; break;
                default: rejected++; break;
            }
        }

        return new YieldRow(key, pass + fail + retest + rejected, pass, fail, retest, rejected);
    }
}
