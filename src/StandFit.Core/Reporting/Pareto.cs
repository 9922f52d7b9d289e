using System.Collections.Immutable;
using StandFit.Core.Judging;
using StandFit.Core.Problems;

namespace StandFit.Core.Reporting;

/// <summary>One bar of a Pareto chart: a reason code, how many units carry it, its share and the cumulative share.</summary>
public sealed record ParetoBar(string Code, int Units, double Percent, double CumulativePercent);

/// <summary>
/// The Pareto of reason codes: every code carried by a unit not ruled pass, except the codes of
/// kind pass (checks that passed, such as <c>gain.within_limits</c> or <c>residuals.runs_ok</c>,
/// found by <see cref="ReasonCodes.Find"/>; a code the registry does not know is kept). Each code
/// counts once per unit. Bars by count, most first, ties by code; percentages of all the codes
/// counted.
/// </summary>
public static class Pareto
{
    public static ImmutableArray<ParetoBar> Of(IEnumerable<ReportedUnit> units)
    {
        var counts = new Dictionary<string, int>(StringComparer.Ordinal);
        foreach (var unit in units.Where(u => u.Ruling != Ruling.Pass))
        {
            foreach (var code in unit.ReasonCodes.Distinct(StringComparer.Ordinal))
            {
                if (ReasonCodes.Find(code)?.Kind == ReasonKind.Pass)
                {
                    continue;
                }

                counts[code] = counts.GetValueOrDefault(code) + 1;
            }
        }

        var total = counts.Values.Sum();
        var bars = ImmutableArray.CreateBuilder<ParetoBar>(counts.Count);
        var running = 0;
        foreach (var (code, n) in counts.OrderByDescending(c => c.Value).ThenBy(c => c.Key, StringComparer.Ordinal))
        {
            running += n;
            bars.Add(new ParetoBar(code, n, 100.0 * n / total, 100.0 * running / total));
        }

        return bars.MoveToImmutable();
    }
}
