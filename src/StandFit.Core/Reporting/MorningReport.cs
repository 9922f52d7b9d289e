using System.Collections.Immutable;
using System.Globalization;
using System.Text;
using StandFit.Core.Judging;
using StandFit.Core.Problems;

namespace StandFit.Core.Reporting;

/// <summary>
/// The morning report: one self-contained HTML page (inline CSS and SVG; no script, no image file,
/// no link to anything outside the page, so it opens offline and can be mailed as it is). From the
/// top: the yield (overall, by part, by station, by hour of test), the Pareto of reasons, an
/// individuals chart of gain and of offset for each part with its flagged patterns, then each
/// failed or retest unit (its data with the fitted curve and confidence band, its residuals against
/// stimulus and in acquisition order, their histogram with the normal curve, and the ruling's
/// reasons with their numbers), the rejected inputs, and the runs. Units are counted once per part
/// and serial, by their latest row (<see cref="UnitSelection.LatestPerSerial"/>). A pure function
/// of <see cref="ReportData"/>: the same data give the same bytes. The page is well-formed XML as
/// well as HTML5, every text from the data escaped by <see cref="Html.Escape"/>.
/// </summary>
public static class MorningReport
{
    /// <summary>At most this many failed or retest units are drawn in detail; the rest are listed in a table.</summary>
    public const int MaxDetailedUnits = 200;

    /// <summary>At most this many rows in a list of units (the units beyond the detailed ones, the rejected inputs).</summary>
    public const int MaxListedUnits = 1000;

    /// <summary>At most this many flagged patterns are listed under a control chart (all are drawn).</summary>
    public const int MaxListedSignals = 25;

    /// <summary>Detailed units shown open; the rest are folded (a click opens them).</summary>
    public const int OpenDetails = 20;

    /// <summary>A control chart draws a marker at every point only up to this many points (beyond, the line alone).</summary>
    public const int MaxMarkedChartPoints = 400;

    /// <summary>Points whose |studentized residual| exceeds this are ringed in the residual charts.</summary>
    public const double StudentizedRing = 3.0;

    private const string Css = """
        :root { color-scheme: light; }
        body { font: 14px/1.45 system-ui, -apple-system, "Segoe UI", Roboto, "DejaVu Sans", sans-serif; margin: 0; color: #1d2329; background: #f4f5f7; }
        header { background: #233040; color: #fff; padding: 16px 24px; }
        header h1 { margin: 0 0 4px 0; font-size: 22px; }
        header p { margin: 0; color: #cfd8e3; }
        main { padding: 8px 24px 32px 24px; max-width: 1400px; }
        section { background: #fff; border: 1px solid #dde1e6; border-radius: 6px; margin: 16px 0; padding: 12px 16px; }
        h2 { font-size: 18px; margin: 4px 0 10px 0; }
        h3 { font-size: 15px; margin: 14px 0 6px 0; }
        table { border-collapse: collapse; margin: 6px 0 10px 0; }
        th, td { border-bottom: 1px solid #e3e6ea; padding: 3px 10px; text-align: right; vertical-align: top; }
        th { background: #f0f2f5; font-weight: 600; }
        td.text, th.text { text-align: left; }
        .headline { font-size: 17px; margin: 4px 0 10px 0; }
        .big { font-size: 26px; font-weight: 700; }
        .pass { color: #1b7a33; } .fail { color: #b3261e; } .retest { color: #a35a00; } .rejected { color: #5f6368; }
        .badge { display: inline-block; border-radius: 4px; padding: 0 6px; color: #fff; font-weight: 600; font-size: 12px; }
        .badge.pass { background: #1b7a33; color: #fff; } .badge.fail { background: #b3261e; color: #fff; } .badge.retest { background: #c77700; color: #fff; } .badge.rejected { background: #5f6368; color: #fff; }
        .tables { display: flex; flex-wrap: wrap; gap: 8px 32px; align-items: flex-start; }
        .wide svg { display: block; margin: 4px 0; }
        .charts { display: grid; grid-template-columns: repeat(auto-fill, minmax(460px, 1fr)); gap: 8px 16px; }
        svg { width: 100%; height: auto; background: #fff; }
        svg text { font-family: system-ui, "DejaVu Sans", sans-serif; fill: #333; }
        svg .title { font-size: 12px; font-weight: 600; }
        svg .tick { font-size: 10px; fill: #555; }
        svg .axis { font-size: 11px; fill: #333; }
        svg .label { font-size: 10px; fill: #333; }
        svg .mid { text-anchor: middle; } svg .end { text-anchor: end; }
        svg .grid { stroke: #e6e8eb; stroke-width: 1; fill: none; }
        svg .frame { stroke: #9aa0a6; fill: none; }
        svg .series { stroke: #3b6ea8; stroke-width: 1; fill: none; }
        svg .dots { fill: #3b6ea8; } svg .up { fill: #1f5fa8; } svg .down { fill: #e07b00; } svg .unknown { fill: #333; }
        svg .curve { stroke: #222; stroke-width: 1.4; fill: none; }
        svg .band { fill: #7da7d9; fill-opacity: 0.35; stroke: none; }
        svg .zero { stroke: #555; stroke-width: 1; }
        svg .centre { stroke: #1b7a33; stroke-width: 1.2; }
        svg .limit { stroke: #b3261e; stroke-width: 1.2; stroke-dasharray: 6 4; }
        svg .beyond { fill: #b3261e; stroke: #fff; stroke-width: 0.8; }
        svg .run { stroke: #c77700; stroke-width: 3; fill: none; stroke-opacity: 0.75; }
        svg .trend { stroke: #7b3fb0; stroke-width: 3; fill: none; stroke-opacity: 0.75; }
        svg .ring { fill: none; stroke: #b3261e; stroke-width: 1.4; }
        svg .bar { fill: #7da7d9; stroke: #3b6ea8; stroke-width: 0.6; }
        svg .bar-pass { fill: #6fbf73; } svg .bar-fail { fill: #e57373; } svg .bar-retest { fill: #ffb74d; } svg .bar-rejected { fill: #b0b4b8; }
        svg .cumulative { stroke: #233040; stroke-width: 1.5; fill: none; }
        svg .normal { stroke: #b3261e; stroke-width: 1.5; fill: none; }
        details { border-top: 1px solid #e3e6ea; padding: 6px 0; }
        summary { cursor: pointer; font-weight: 600; }
        .meta { color: #444; margin: 4px 0; }
        .signals { margin: 2px 0 12px 18px; padding: 0; }
        .note { color: #555; font-size: 13px; }
        code { font-size: 12px; background: #f0f2f5; padding: 0 3px; border-radius: 3px; }
        """;

    /// <summary>The units the report counts: the latest row of each part and serial, in test order.</summary>
    public static ImmutableArray<ReportedUnit> Counted(IEnumerable<ReportedUnit> rows) => UnitSelection.InTestOrder(UnitSelection.LatestPerSerial(rows));

    /// <summary>The counted units ruled fail or retest, in test order (the first <see cref="MaxDetailedUnits"/> are drawn in detail).</summary>
    public static ImmutableArray<ReportedUnit> FailedOrRetest(ImmutableArray<ReportedUnit> counted) => [.. counted.Where(u => u.Ruling is Ruling.Fail or Ruling.Retest)];

    /// <summary>The units drawn in detail, whose points the report needs.</summary>
    public static ImmutableArray<ReportedUnit> Detailed(IEnumerable<ReportedUnit> rows) => [.. FailedOrRetest(Counted(rows)).Take(MaxDetailedUnits)];

    public static string Render(ReportData data)
    {
        var units = Counted(data.Rows);
        var html = new StringBuilder(256 * 1024);
        var range = RangeText(data.From, data.To);
        html.Append("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\"/>\n<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\"/>\n")
            .Append("<title>").Append(Html.Escape("StandFit morning report, " + range)).Append("</title>\n<style>\n").Append(Css).Append("\n</style>\n</head>\n<body>\n");
        html.Append("<header><h1>Morning report</h1><p>Units tested ").Append(Html.Escape(range))
            .Append(" · made ").Append(Html.Escape(Time(data.GeneratedAt))).Append(" · StandFit ").Append(Html.Escape(data.ToolVersion)).Append("</p></header>\n<main>\n");

        if (!data.Unreadable.IsEmpty)
        {
            html.Append("<section id=\"unreadable\"><h2>Files that could not be read</h2><p class=\"note\">These files are left out of every figure below.</p><ul>");
            foreach (var why in data.Unreadable)
            {
                html.Append("<li>").Append(Html.Escape(why)).Append("</li>");
            }

            html.Append("</ul></section>\n");
        }

        Yield(html, units, data.Rows.Length);
        ParetoSection(html, units);
        ControlCharts(html, units);
        Details(html, units, data.Points);
        Rejected(html, units);
        Runs(html, data.Runs);
        Notes(html);
        html.Append("</main>\n</body>\n</html>\n");
        return html.ToString();
    }

    private static void Yield(StringBuilder html, ImmutableArray<ReportedUnit> units, int rows)
    {
        var total = YieldTable.Total(units);
        html.Append("<section id=\"yield\"><h2>Yield</h2>\n<p class=\"headline\" id=\"yield-total\">")
            .Append("<span class=\"big\" data-count=\"units\">").Append(Int(total.Units)).Append("</span> units: ")
            .Append("<span class=\"pass\" data-count=\"pass\">").Append(Int(total.Pass)).Append("</span> pass, ")
            .Append("<span class=\"fail\" data-count=\"fail\">").Append(Int(total.Fail)).Append("</span> fail, ")
            .Append("<span class=\"retest\" data-count=\"retest\">").Append(Int(total.Retest)).Append("</span> retest, ")
            .Append("<span class=\"rejected\" data-count=\"rejected\">").Append(Int(total.Rejected)).Append("</span> rejected; yield ")
            .Append("<span class=\"big\" data-count=\"yield\">").Append(Percent(total.YieldPercent)).Append("</span></p>\n");
        if (rows != units.Length)
        {
            html.Append("<p class=\"note\">").Append(Int(rows)).Append(" summary rows; a retested serial counts once, with its latest result.</p>\n");
        }

        html.Append("<div class=\"tables\">");
        YieldTableHtml(html, "yield-by-part", "Part", YieldTable.By(units, u => u.Part), "(no part)");
        YieldTableHtml(html, "yield-by-station", "Station", YieldTable.By(units, u => u.Station), "(no station)");
        html.Append("</div>\n");

        var hours = YieldTable.By(units, YieldTable.HourOf);
        html.Append("<h3>By hour of test (UTC)</h3>\n<div class=\"charts\">").Append(HourChart(hours)).Append("</div>\n");
        html.Append("<details><summary>Yield by hour, as a table</summary>");
        YieldTableHtml(html, "yield-by-hour", "Hour (UTC)", hours, "");
        html.Append("</details></section>\n");
    }

    private static void YieldTableHtml(StringBuilder html, string id, string keyTitle, ImmutableArray<YieldRow> rows, string missing)
    {
        html.Append("<table id=\"").Append(id).Append("\"><thead><tr><th class=\"text\">").Append(Html.Escape(keyTitle))
            .Append("</th><th>units</th><th>pass</th><th>fail</th><th>retest</th><th>rejected</th><th>yield</th></tr></thead><tbody>");
        foreach (var r in rows)
        {
            html.Append("<tr data-key=\"").Append(Html.Escape(r.Key ?? "")).Append("\"><td class=\"text\">").Append(Html.Escape(r.Key ?? missing)).Append("</td>")
                .Append("<td data-count=\"units\">").Append(Int(r.Units)).Append("</td>")
                .Append("<td data-count=\"pass\">").Append(Int(r.Pass)).Append("</td>")
                .Append("<td data-count=\"fail\">").Append(Int(r.Fail)).Append("</td>")
                .Append("<td data-count=\"retest\">").Append(Int(r.Retest)).Append("</td>")
                .Append("<td data-count=\"rejected\">").Append(Int(r.Rejected)).Append("</td>")
                .Append("<td data-count=\"yield\">").Append(Percent(r.YieldPercent)).Append("</td></tr>");
        }

        html.Append("</tbody></table>");
    }

    private static string HourChart(ImmutableArray<YieldRow> hours)
    {
        if (hours.IsEmpty)
        {
            return "<p class=\"note\">No units.</p>";
        }

        var width = Math.Clamp(160 + (hours.Length * 16), 560, 1360);
        var span = HourLabel(hours[0].Key) + " to " + HourLabel(hours[^1].Key);
        var chart = new SvgChart(width, 250, SvgScale.Of(-0.5, hours.Length - 0.5, 0, 1), SvgScale.Of(0, Math.Max(1, hours.Max(h => h.Units)) * 1.08, 0, 1), "Units by hour and ruling", "hour of test start (UTC), " + span + "; hours without units left out", "units")
        {
            XTickTarget = Math.Clamp((int)((width - 90) / 44), 1, hours.Length),
            XLabel = t => IsWhole(t) && t >= 0 && t < hours.Length ? HourOnly(hours[(int)t].Key) : null,
        };
        var slot = chart.X.Map(1) - chart.X.Map(0);
        var barWidth = Math.Max(1, slot * 0.7);
        var byRuling = new (string Css, Func<YieldRow, int> Count)[] { ("bar-pass", r => r.Pass), ("bar-fail", r => r.Fail), ("bar-retest", r => r.Retest), ("bar-rejected", r => r.Rejected) };
        var below = new double[hours.Length];
        foreach (var (css, count) in byRuling)
        {
            var bars = new List<(double, double, double, double)>();
            for (var i = 0; i < hours.Length; i++)
            {
                var n = count(hours[i]);
                if (n == 0)
                {
                    continue;
                }

                var top = chart.Y.Map(below[i] + n);
                bars.Add((chart.X.Map(i) - (barWidth / 2), top, barWidth, chart.Y.Map(below[i]) - top));
                below[i] += n;
            }

            chart.Path(SvgPath.Rectangles(bars), css);
        }

        Legend(chart, [("bar-pass", "pass"), ("bar-fail", "fail"), ("bar-retest", "retest"), ("bar-rejected", "rejected")]);
        return chart.ToSvg();
    }

    private static void Legend(SvgChart chart, IReadOnlyList<(string Css, string Label)> entries)
    {
        var x = chart.PlotRight - (entries.Count * 66);
        foreach (var (css, label) in entries)
        {
            chart.Raw("<rect class=\"" + css + "\" x=\"" + SvgPath.Number(x) + "\" y=\"22\" width=\"10\" height=\"10\"/>");
            chart.Text(x + 14, 31, label, "label");
            x += 66;
        }
    }

    private static void ParetoSection(StringBuilder html, ImmutableArray<ReportedUnit> units)
    {
        var bars = Pareto.Of(units);
        html.Append("<section id=\"pareto\"><h2>Reasons behind every ruling except pass (Pareto)</h2>\n");
        if (bars.IsEmpty)
        {
            html.Append("<p>No unit was ruled fail, retest or rejected.</p></section>\n");
            return;
        }

        var width = Math.Clamp(120 + (bars.Length * 40), 560, 1360);
        var longest = bars.Max(b => b.Code.Length);
        var bottom = 24 + (longest * 6.2 * 0.574);
        var chart = new SvgChart(width, 230 + bottom, SvgScale.Of(-0.5, bars.Length - 0.5, 0, 1), SvgScale.Of(0, bars.Max(b => b.Units) * 1.1, 0, 1), "Units by reason code, most first; line: cumulative share (right end 100 %)", "", "units", bottom: bottom)
        {
            XTickTarget = Math.Min(bars.Length, 30),
            XLabel = _ => null,
        };
        var slot = chart.X.Map(1) - chart.X.Map(0);
        var barWidth = Math.Max(2, slot * 0.7);
        chart.Path(SvgPath.Rectangles(bars.Select((b, i) => (chart.X.Map(i) - (barWidth / 2), chart.Y.Map(b.Units), barWidth, chart.Y.Map(0) - chart.Y.Map(b.Units)))), "bar");
        var cumulative = SvgScale.Of(0, 100, chart.PlotBottom, chart.PlotTop);
        chart.Path(SvgPath.Polyline(bars.Select((b, i) => (chart.X.Map(i), cumulative.Map(b.CumulativePercent)))), "cumulative");
        for (var i = 0; i < bars.Length; i++)
        {
            chart.Text(chart.X.Map(i), chart.Y.Map(bars[i].Units) - 3, Int(bars[i].Units), "label mid");
            chart.Text(chart.X.Map(i) + 3, chart.PlotBottom + 10, bars[i].Code, "tick end", -35);
        }

        html.Append("<div class=\"pareto-chart\">").Append(chart.ToSvg()).Append("</div>\n");
        html.Append("<table id=\"pareto-table\"><thead><tr><th class=\"text\">reason code</th><th>units</th><th>share</th><th>cumulative</th></tr></thead><tbody>");
        foreach (var b in bars)
        {
            html.Append("<tr data-code=\"").Append(Html.Escape(b.Code)).Append("\"><td class=\"text\"><code>").Append(Html.Escape(b.Code)).Append("</code></td><td data-count=\"units\">")
                .Append(Int(b.Units)).Append("</td><td>").Append(Percent(b.Percent)).Append("</td><td>").Append(Percent(b.CumulativePercent)).Append("</td></tr>");
        }

        html.Append("</tbody></table></section>\n");
    }

    private static void ControlCharts(StringBuilder html, ImmutableArray<ReportedUnit> units)
    {
        html.Append("<section id=\"control\"><h2>Individuals charts of gain and offset, by part</h2>\n")
            .Append("<p class=\"note\">Every fitted unit of the part in test order. Centre line: the mean; control limits: mean ± 2.66 × the mean moving range (ISO 7870-2). ")
            .Append("Flagged: <span class=\"fail\">points beyond a limit</span>, <span class=\"retest\">runs of ")
            .Append(Int(IndividualsChart.RunLength)).Append(" or more on one side of the centre line</span>, and trends of ")
            .Append(Int(IndividualsChart.TrendLength)).Append(" or more points steadily rising or falling.</p>\n");
        var parts = units.Where(u => u.Gain is not null || u.Offset is not null).GroupBy(u => u.Part).OrderBy(g => g.Key is null ? 1 : 0).ThenBy(g => g.Key, StringComparer.Ordinal).ToList();
        if (parts.Count == 0)
        {
            html.Append("<p>No fitted unit.</p></section>\n");
            return;
        }

        foreach (var part in parts)
        {
            var name = part.Key ?? "(no part)";
            html.Append("<h3 data-part=\"").Append(Html.Escape(part.Key ?? "")).Append("\">").Append(Html.Escape(name)).Append("</h3>\n<div class=\"wide\">");
            var listing = new StringBuilder();
            foreach (var (figure, value, unit) in new (string, Func<ReportedUnit, double?>, Func<ReportedUnit, string>)[] { ("gain", u => u.Gain, u => u.GainUnit), ("offset", u => u.Offset, u => u.OffsetUnit) })
            {
                var chosen = part.Where(u => value(u) is { } v && double.IsFinite(v)).ToList();
                var values = chosen.Select(u => value(u)!.Value).ToArray();
                var chart = IndividualsChart.Compute(values);
                var unitText = chosen.Select(unit).FirstOrDefault(t => t.Length > 0) ?? "";
                html.Append(ControlChartSvg(name, figure, unitText, chosen, chart));
                ListSignals(listing, name, figure, chosen, chart);
            }

            html.Append("</div>\n").Append(listing);
        }

        html.Append("</section>\n");
    }

    private static string ControlChartSvg(string part, string figure, string unit, List<ReportedUnit> units, IndividualsChart? chart)
    {
        var title = part + ": " + figure + (unit.Length > 0 ? " (" + unit + ")" : "") + ", " + Int(units.Count) + " units";
        if (chart is null)
        {
            return "<p class=\"note\" data-chart=\"" + Html.Escape(figure) + "\">" + Html.Escape(title) + ": fewer than two values, no chart.</p>";
        }

        var n = chart.Values.Length;
        var y = SvgScale.Fitting(chart.Values.Append(chart.Lower).Append(chart.Upper), 0, 1, 0.08);
        var svg = new SvgChart(900, 260, SvgScale.Of(0.5, n + 0.5, 0, 1), y, title, "unit in test order", figure + (unit.Length > 0 ? " / " + unit : ""), "chart control");
        svg.HorizontalLine(chart.Upper, "limit", "UCL " + Numbers.Format(chart.Upper, 6))
            .HorizontalLine(chart.Centre, "centre", "centre " + Numbers.Format(chart.Centre, 6))
            .HorizontalLine(chart.Lower, "limit", "LCL " + Numbers.Format(chart.Lower, 6));
        var points = chart.Values.Select((v, i) => svg.At(i + 1, v)).ToList();
        svg.Path(SvgPath.Polyline(points), "series");
        if (n <= MaxMarkedChartPoints)
        {
            svg.Path(SvgPath.Squares(points, 3), "dots");
        }

        foreach (var s in chart.Signals.Where(s => s.Rule != ChartRule.BeyondLimits))
        {
            svg.Path(SvgPath.Polyline(points.Skip(s.First).Take(s.Length)), s.Rule == ChartRule.Trend ? "trend" : "run", Describe(s, units, chart.Values));
        }

        foreach (var s in chart.Signals.Where(s => s.Rule == ChartRule.BeyondLimits))
        {
            svg.Circle(s.First + 1, chart.Values[s.First], 3.5, "beyond", Describe(s, units, chart.Values));
        }

        return "<div data-chart=\"" + Html.Escape(figure) + "\" data-part=\"" + Html.Escape(part) + "\" data-signals=\"" + Int(chart.Signals.Length) + "\">" + svg.ToSvg() + "</div>";
    }

    private static void ListSignals(StringBuilder html, string part, string figure, List<ReportedUnit> units, IndividualsChart? chart)
    {
        if (chart is null)
        {
            return;
        }

        html.Append("<p class=\"meta\"><b>").Append(Html.Escape(part)).Append(' ').Append(Html.Escape(figure)).Append("</b>: centre ")
            .Append(Numbers.Format(chart.Centre, 6)).Append(", mean moving range ").Append(Numbers.Format(chart.MeanMovingRange, 4))
            .Append(", limits ").Append(Numbers.Format(chart.Lower, 6)).Append(" to ").Append(Numbers.Format(chart.Upper, 6)).Append("; ");
        if (chart.Signals.IsEmpty)
        {
            html.Append("no pattern flagged.</p>\n");
            return;
        }

        var counts = Enum.GetValues<ChartRule>().Select(r => (Rule: r, Count: chart.Signals.Count(s => s.Rule == r))).Where(c => c.Count > 0)
            .Select(c => Int(c.Count) + " " + RuleName(c.Rule, c.Count != 1));
        html.Append("flagged: ").Append(Html.Escape(string.Join(", ", counts))).Append(".</p>\n<ul class=\"signals\">");
        foreach (var s in chart.Signals.Take(MaxListedSignals))
        {
            html.Append("<li data-rule=\"").Append(RuleId(s.Rule)).Append("\">").Append(Html.Escape(Describe(s, units, chart.Values))).Append("</li>");
        }

        if (chart.Signals.Length > MaxListedSignals)
        {
            html.Append("<li>and ").Append(Int(chart.Signals.Length - MaxListedSignals)).Append(" more (all are drawn on the chart)</li>");
        }

        html.Append("</ul>\n");
    }

    private static string Describe(ChartSignal s, List<ReportedUnit> units, ImmutableArray<double> values)
    {
        var first = units[s.First];
        var last = units[s.Last];
        return s.Rule switch
        {
            ChartRule.BeyondLimits => "Beyond a control limit: unit " + Int(s.First + 1) + " (" + (first.Serial ?? first.SourceFile) + ", " + Time(first.TestOrderTime) + ")",
            ChartRule.RunOnOneSide => "Run of " + Int(s.Length) + " on one side of the centre line: units " + Int(s.First + 1) + " to " + Int(s.Last + 1) + " (" + (first.Serial ?? first.SourceFile) + " to " + (last.Serial ?? last.SourceFile) + ")",
            _ => "Trend of " + Int(s.Length) + " points steadily " + (values[s.Last] > values[s.First] ? "rising" : "falling") + ": units " + Int(s.First + 1) + " to " + Int(s.Last + 1) + " (" + (first.Serial ?? first.SourceFile) + " to " + (last.Serial ?? last.SourceFile) + ")",
        };
    }

    private static string RuleName(ChartRule rule, bool plural) => rule switch
    {
        ChartRule.BeyondLimits => plural ? "points beyond the limits" : "point beyond the limits",
        ChartRule.RunOnOneSide => plural ? "runs on one side" : "run on one side",
        _ => plural ? "trends" : "trend",
    };

    private static string RuleId(ChartRule rule) => rule switch
    {
        ChartRule.BeyondLimits => "beyond-limits",
        ChartRule.RunOnOneSide => "run",
        _ => "trend",
    };

    private static void Details(StringBuilder html, ImmutableArray<ReportedUnit> units, ImmutableDictionary<string, ImmutableArray<ReportedPoint>> points)
    {
        var chosen = FailedOrRetest(units);
        html.Append("<section id=\"units\"><h2>Failed and retest units (").Append(Int(chosen.Length)).Append(")</h2>\n");
        if (chosen.IsEmpty)
        {
            html.Append("<p>No unit was ruled fail or retest.</p></section>\n");
            return;
        }

        html.Append("<p class=\"note\">In test order. For each: its sweep with the fitted curve and the curve's confidence band, the residuals against stimulus (with the band about the curve) and in acquisition order (points with |studentized residual| above ")
            .Append(Numbers.Format(StudentizedRing, 3)).Append(" ringed), the residual histogram with the normal curve, and the reasons for the ruling with their numbers.</p>\n");
        var index = 0;
        foreach (var unit in chosen.Take(MaxDetailedUnits))
        {
            UnitDetail(html, unit, points.GetValueOrDefault(unit.UnitKey), index++ < OpenDetails);
        }

        if (chosen.Length > MaxDetailedUnits)
        {
            html.Append("<h3>").Append(Int(chosen.Length - MaxDetailedUnits)).Append(" more failed and retest units, not drawn</h3>\n");
            UnitList(html, "more-units", [.. chosen.Skip(MaxDetailedUnits)]);
        }

        html.Append("</section>\n");
    }

    private static void UnitDetail(StringBuilder html, ReportedUnit unit, ImmutableArray<ReportedPoint> points, bool open)
    {
        var ruling = RulingText(unit.Ruling);
        html.Append("<details class=\"unit\" data-unit-key=\"").Append(Html.Escape(unit.UnitKey)).Append("\" data-ruling=\"").Append(ruling).Append('"').Append(open ? " open=\"open\"" : "").Append("><summary>")
            .Append("<span class=\"badge ").Append(ruling).Append("\">").Append(ruling.ToUpperInvariant()).Append("</span> ")
            .Append("<span class=\"serial\">").Append(Html.Escape(unit.Serial ?? unit.SourceFile)).Append("</span> · ").Append(Html.Escape(unit.Part ?? "(no part)"))
            .Append(" · ").Append(Html.Escape(unit.Station ?? "(no station)")).Append(" · ").Append(Html.Escape(Time(unit.TestOrderTime)));
        var first = FirstNonPassCode(unit);
        if (first is not null)
        {
            html.Append(" · <code>").Append(Html.Escape(first)).Append("</code>");
        }

        html.Append("</summary>\n<p class=\"meta\">File <code>").Append(Html.Escape(unit.SourceFile)).Append("</code>, recipe ")
            .Append(Html.Escape(unit.RecipeName ?? "-")).Append(" version ").Append(Html.Escape(unit.RecipeVersion ?? "-")).Append(", model ")
            .Append(Html.Escape(unit.Model ?? "-")).Append(", ").Append(unit.Points is { } n ? Int(n) : "-").Append(" points");
        if (unit.Gain is { } gain)
        {
            html.Append("; gain ").Append(Numbers.Format(gain, 7)).Append(Interval(unit.GainCiLow, unit.GainCiHigh)).Append(' ').Append(Html.Escape(unit.GainUnit));
        }

        if (unit.Offset is { } offset)
        {
            html.Append("; offset ").Append(Numbers.Format(offset, 5)).Append(Interval(unit.OffsetCiLow, unit.OffsetCiHigh)).Append(' ').Append(Html.Escape(unit.OffsetUnit));
        }

        if (unit.ResidualSd is { } sd)
        {
            html.Append("; residual SD ").Append(Numbers.Format(sd, 4));
        }

        if (unit.RetestOf is not null)
        {
            html.Append("; a retest of <code>").Append(Html.Escape(Short(unit.RetestOf))).Append("</code>");
        }

        html.Append(".</p>\n");
        if (points.IsDefaultOrEmpty)
        {
            html.Append("<p class=\"note\">Not fitted (the sweep failed a data-quality gate, or its points are not in the per-point table): no curve to draw.</p>\n");
        }
        else
        {
            html.Append("<div class=\"charts\">").Append(CurveChart(unit, points)).Append(ResidualByStimulus(unit, points)).Append(ResidualByOrder(unit, points)).Append(HistogramChart(unit)).Append("</div>\n");
        }

        html.Append("<table class=\"reasons\"><thead><tr><th class=\"text\">reason</th><th class=\"text\">with the unit's numbers</th></tr></thead><tbody>");
        for (var i = 0; i < unit.ReasonCodes.Length; i++)
        {
            var code = unit.ReasonCodes[i];
            html.Append("<tr data-code=\"").Append(Html.Escape(code)).Append("\"><td class=\"text\"><code>").Append(Html.Escape(code)).Append("</code></td><td class=\"text\">")
                .Append(Html.Escape(i < unit.Reasons.Length ? unit.Reasons[i] : "")).Append("</td></tr>");
        }

        html.Append("</tbody></table>\n");
        if (!unit.Limits.IsEmpty)
        {
            html.Append("<table class=\"limits\"><thead><tr><th class=\"text\">figure</th><th>value</th><th>interval judged</th><th>min</th><th>max</th><th class=\"text\">zone</th><th class=\"text\">rule</th></tr></thead><tbody>");
            foreach (var l in unit.Limits)
            {
                html.Append("<tr><td class=\"text\">").Append(Html.Escape(l.Figure)).Append("</td><td>").Append(Numbers.Format(l.Value, 7)).Append("</td><td>[")
                    .Append(Numbers.Format(l.Low, 7)).Append(", ").Append(Numbers.Format(l.High, 7)).Append("]</td><td>").Append(l.Min is { } mn ? Numbers.Format(mn, 7) : "-")
                    .Append("</td><td>").Append(l.Max is { } mx ? Numbers.Format(mx, 7) : "-").Append("</td><td class=\"text\">").Append(Html.Escape(l.Zone))
                    .Append("</td><td class=\"text\">").Append(Html.Escape(l.Rule + ", " + l.Interval)).Append("</td></tr>");
            }

            html.Append("</tbody></table>\n");
        }

        html.Append("</details>\n");
    }

    private static string CurveChart(ReportedUnit unit, ImmutableArray<ReportedPoint> points)
    {
        var x = SvgScale.Fitting(points.Select(p => p.Stimulus), 0, 1);
        var y = SvgScale.Fitting(points.Select(p => p.Response).Concat(points.Select(p => p.BandLow)).Concat(points.Select(p => p.BandHigh)), 0, 1);
        var chart = new SvgChart(460, 280, x, y, "Sweep and fitted curve, with its confidence band", StimulusTitle(unit), "response" + UnitSuffix(unit.OffsetUnit));
        if (!points[0].HasFurtherInputs)
        {
            var sorted = points.OrderBy(p => p.Stimulus).ThenBy(p => p.Point).ToList();
            chart.Path(SvgPath.Band([.. sorted.Select(p => (chart.X.Map(p.Stimulus), chart.Y.Map(p.BandLow), chart.Y.Map(p.BandHigh)))]), "band");
            chart.Path(SvgPath.Polyline(sorted.Select(p => chart.At(p.Stimulus, p.Fitted))), "curve");
        }
        else
        {
            chart.Path(SvgPath.Squares(points.Select(p => chart.At(p.Stimulus, p.Fitted)), 5), "band");
        }

        LegMarkers(chart, points, p => p.Response);
        if (unit.Model is not null)
        {
            chart.Text(chart.PlotLeft + 6, chart.PlotTop + 12, unit.Model, "label");
        }

        return chart.ToSvg();
    }

    private static string ResidualByStimulus(ReportedUnit unit, ImmutableArray<ReportedPoint> points)
    {
        var x = SvgScale.Fitting(points.Select(p => p.Stimulus), 0, 1);
        var y = SvgScale.Fitting(points.Select(p => p.Residual).Concat(points.Select(p => p.BandLow - p.Fitted)).Concat(points.Select(p => p.BandHigh - p.Fitted)).Append(0), 0, 1);
        var chart = new SvgChart(460, 280, x, y, "Residuals against stimulus, with the curve's band", StimulusTitle(unit), "residual" + UnitSuffix(unit.OffsetUnit));
        if (!points[0].HasFurtherInputs)
        {
            var sorted = points.OrderBy(p => p.Stimulus).ThenBy(p => p.Point).ToList();
            chart.Path(SvgPath.Band([.. sorted.Select(p => (chart.X.Map(p.Stimulus), chart.Y.Map(p.BandLow - p.Fitted), chart.Y.Map(p.BandHigh - p.Fitted)))]), "band");
        }

        chart.HorizontalLine(0, "zero");
        LegMarkers(chart, points, p => p.Residual);
        Rings(chart, points, p => p.Stimulus);
        return chart.ToSvg();
    }

    private static string ResidualByOrder(ReportedUnit unit, ImmutableArray<ReportedPoint> points)
    {
        var ordered = points.OrderBy(p => p.Point).ToList();
        var x = SvgScale.Of(0.5, ordered.Count + 0.5, 0, 1);
        var y = SvgScale.Fitting(ordered.Select(p => p.Residual).Append(0), 0, 1);
        var chart = new SvgChart(460, 280, x, y, "Residuals in acquisition order", "point, in the order taken", "residual" + UnitSuffix(unit.OffsetUnit));
        chart.HorizontalLine(0, "zero");
        chart.Path(SvgPath.Polyline(ordered.Select(p => chart.At(p.Point, p.Residual))), "series");
        LegMarkers(chart, points, p => p.Residual, p => p.Point);
        Rings(chart, points, p => p.Point);
        return chart.ToSvg();
    }

    private static void LegMarkers(SvgChart chart, ImmutableArray<ReportedPoint> points, Func<ReportedPoint, double> value, Func<ReportedPoint, double>? xOf = null)
    {
        xOf ??= p => p.Stimulus;
        foreach (var leg in new[] { "up", "down", null })
        {
            var some = points.Where(p => p.Leg == leg || (leg is null && p.Leg is not "up" and not "down")).Select(p => chart.At(xOf(p), value(p))).ToList();
            chart.Path(SvgPath.Squares(some, 4), leg ?? "unknown");
        }

        if (points.Any(p => p.Leg is "up" or "down"))
        {
            var lx = chart.PlotRight - 110;
            chart.Raw("<rect class=\"up\" x=\"" + SvgPath.Number(lx) + "\" y=\"23\" width=\"8\" height=\"8\"/>").Text(lx + 11, 31, "up leg", "label");
            chart.Raw("<rect class=\"down\" x=\"" + SvgPath.Number(lx + 52) + "\" y=\"23\" width=\"8\" height=\"8\"/>").Text(lx + 63, 31, "down leg", "label");
        }
    }

    private static void Rings(SvgChart chart, ImmutableArray<ReportedPoint> points, Func<ReportedPoint, double> xOf)
    {
        foreach (var p in points.Where(p => p.Studentized is { } t && Math.Abs(t) > StudentizedRing))
        {
            chart.Circle(xOf(p), p.Residual, 5, "ring", "point " + Int(p.Point) + ", line " + Int(p.SourceLine) + ": studentized residual " + Numbers.Format(p.Studentized!.Value, 3));
        }
    }

    private static string HistogramChart(ReportedUnit unit)
    {
        var edges = unit.HistogramEdges;
        var counts = unit.HistogramCounts;
        if (edges.Length < 2 || counts.Length != edges.Length - 1)
        {
            return "<p class=\"note\">No residual histogram.</p>";
        }

        var n = counts.Sum();
        var width = edges[^1] - edges[0];
        var binWidth = width / counts.Length;
        var sd = unit.ResidualSd ?? double.NaN;
        var from = Math.Min(edges[0], double.IsFinite(sd) ? -3 * sd : edges[0]);
        var to = Math.Max(edges[^1], double.IsFinite(sd) ? 3 * sd : edges[^1]);
        var curve = binWidth > 0 ? NormalCurve.Curve(from, to, 61, n, binWidth, 0, sd) : [];
        var top = Math.Max(counts.Max(), curve.IsEmpty ? 0 : curve.Max(p => p.Y)) * 1.1;
        var chart = new SvgChart(460, 280, SvgScale.Of(from, to, 0, 1), SvgScale.Of(0, Math.Max(top, 1), 0, 1), "Residual histogram, normal curve N(0, residual SD²)", "residual" + UnitSuffix(unit.OffsetUnit), "points");
        var bars = new List<(double, double, double, double)>();
        for (var k = 0; k < counts.Length; k++)
        {
            var x0 = chart.X.Map(edges[k]);
            var x1 = chart.X.Map(edges[k + 1]);
            var y0 = chart.Y.Map(counts[k]);
            bars.Add((x0, y0, Math.Max(x1 - x0, 0.5), chart.Y.Map(0) - y0));
        }

        chart.Path(SvgPath.Rectangles(bars), "bar");
        chart.Path(SvgPath.Polyline(curve.Select(p => chart.At(p.X, p.Y))), "normal");
        return chart.ToSvg();
    }

    private static void UnitList(StringBuilder html, string id, List<ReportedUnit> units)
    {
        html.Append("<table id=\"").Append(id).Append("\"><thead><tr><th class=\"text\">ruling</th><th class=\"text\">serial</th><th class=\"text\">part</th><th class=\"text\">station</th><th class=\"text\">test start</th><th class=\"text\">reason</th></tr></thead><tbody>");
        foreach (var u in units.Take(MaxListedUnits))
        {
            var ruling = RulingText(u.Ruling);
            var code = FirstNonPassCode(u);
            html.Append("<tr data-ruling=\"").Append(ruling).Append("\"><td class=\"text ").Append(ruling).Append("\">").Append(ruling).Append("</td><td class=\"text\">")
                .Append(Html.Escape(u.Serial ?? u.SourceFile)).Append("</td><td class=\"text\">").Append(Html.Escape(u.Part ?? "-")).Append("</td><td class=\"text\">")
                .Append(Html.Escape(u.Station ?? "-")).Append("</td><td class=\"text\">").Append(Html.Escape(Time(u.TestOrderTime))).Append("</td><td class=\"text\">")
                .Append(code is null ? "" : "<code>" + Html.Escape(code) + "</code> " + Html.Escape(SentenceOf(u, code))).Append("</td></tr>");
        }

        html.Append("</tbody></table>");
        if (units.Count > MaxListedUnits)
        {
            html.Append("<p class=\"note\">and ").Append(Int(units.Count - MaxListedUnits)).Append(" more; query the summary table for all of them (docs/outputs.md).</p>");
        }

        html.Append('\n');
    }

    private static void Rejected(StringBuilder html, ImmutableArray<ReportedUnit> units)
    {
        var rejected = units.Where(u => u.Ruling == Ruling.Rejected).ToList();
        html.Append("<section id=\"rejected\"><h2>Rejected inputs (").Append(Int(rejected.Count)).Append(")</h2>\n");
        if (rejected.Count == 0)
        {
            html.Append("<p>No input was rejected.</p></section>\n");
            return;
        }

        html.Append("<table id=\"rejected-table\"><thead><tr><th class=\"text\">file</th><th class=\"text\">serial</th><th class=\"text\">part</th><th class=\"text\">code</th><th class=\"text\">where and why</th></tr></thead><tbody>");
        foreach (var u in rejected.Take(MaxListedUnits))
        {
            var code = u.ReasonCodes.IsEmpty ? "" : u.ReasonCodes[0];
            html.Append("<tr data-code=\"").Append(Html.Escape(code)).Append("\"><td class=\"text\"><code>").Append(Html.Escape(u.SourceFile)).Append("</code></td><td class=\"text\">")
                .Append(Html.Escape(u.Serial ?? "-")).Append("</td><td class=\"text\">").Append(Html.Escape(u.Part ?? "-")).Append("</td><td class=\"text\"><code>")
                .Append(Html.Escape(code)).Append("</code></td><td class=\"text\">").Append(Html.Escape(u.Reasons.IsEmpty ? "" : u.Reasons[0])).Append("</td></tr>");
        }

        html.Append("</tbody></table>");
        if (rejected.Count > MaxListedUnits)
        {
            html.Append("<p class=\"note\">and ").Append(Int(rejected.Count - MaxListedUnits)).Append(" more.</p>");
        }

        html.Append("</section>\n");
    }

    private static void Runs(StringBuilder html, ImmutableArray<ReportedRun> runs)
    {
        html.Append("<section id=\"runs\"><h2>Runs (").Append(Int(runs.Length)).Append(")</h2>\n");
        if (runs.IsEmpty)
        {
            html.Append("<p>No run started in the period.</p></section>\n");
            return;
        }

        html.Append("<table id=\"runs-table\"><thead><tr><th class=\"text\">run</th><th class=\"text\">command</th><th class=\"text\">worker</th><th class=\"text\">state</th><th class=\"text\">started</th><th class=\"text\">ended</th><th>processed</th><th>pass</th><th>fail</th><th>retest</th><th>rejected</th><th>duplicate</th><th class=\"text\">version</th></tr></thead><tbody>");
        foreach (var r in runs.OrderBy(r => r.StartedAt).ThenBy(r => r.RunId, StringComparer.Ordinal))
        {
            html.Append("<tr><td class=\"text\"><code>").Append(Html.Escape(r.RunId)).Append("</code></td><td class=\"text\">").Append(Html.Escape(r.Command)).Append("</td><td class=\"text\">")
                .Append(Html.Escape(r.WorkerId)).Append("</td><td class=\"text\">").Append(Html.Escape(r.State)).Append("</td><td class=\"text\">").Append(Html.Escape(Time(r.StartedAt)))
                .Append("</td><td class=\"text\">").Append(Html.Escape(Time(r.EndedAt))).Append("</td><td>").Append(Int(r.Processed)).Append("</td><td>").Append(Int(r.Pass))
                .Append("</td><td>").Append(Int(r.Fail)).Append("</td><td>").Append(Int(r.Retest)).Append("</td><td>").Append(Int(r.Rejected)).Append("</td><td>")
                .Append(Int(r.Duplicate)).Append("</td><td class=\"text\">").Append(Html.Escape(r.ToolVersion)).Append("</td></tr>");
        }

        html.Append("</tbody></table></section>\n");
    }

    private static void Notes(StringBuilder html) =>
        html.Append("<section id=\"notes\"><h2>How to read this report</h2><ul class=\"note\">")
            .Append("<li>Units are counted once per part and serial, by their latest row: a retested unit counts with its last result. Yield = pass / units, rejected inputs included.</li>")
            .Append("<li>The Pareto counts each reason code once per unit, over the units not ruled pass, leaving out the codes of checks that passed.</li>")
            .Append("<li>Individuals charts (ISO 7870-2): centre line at the mean of the units shown, control limits at mean ± 2.66 × mean moving range. Rule 1: a point beyond a limit. Rule 2: ")
            .Append(Int(IndividualsChart.RunLength)).Append(" or more points in a row on one side of the centre line. Rule 3: ")
            .Append(Int(IndividualsChart.TrendLength)).Append(" or more points in a row, each higher (or each lower) than the one before. A flag asks for a look at the process; it does not change any unit's ruling.</li>")
            .Append("<li>Rulings support, and never replace, the plant's quality procedures and qualified sign-off.</li>")
            .Append("</ul></section>\n");

    /// <summary>The stimulus axis title, with the stimulus unit when the gain's unit is the output's unit per it (<c>mV/kPa</c> over <c>mV</c>: <c>kPa</c>).</summary>
    private static string StimulusTitle(ReportedUnit unit) =>
        unit.OffsetUnit.Length > 0 && unit.GainUnit.StartsWith(unit.OffsetUnit + "/", StringComparison.Ordinal) && unit.GainUnit.Length > unit.OffsetUnit.Length + 1
            ? "stimulus (" + unit.GainUnit[(unit.OffsetUnit.Length + 1)..] + ")"
            : "stimulus";

    private static string UnitSuffix(string unit) => unit.Length > 0 ? " (" + unit + ")" : "";

    private static string? FirstNonPassCode(ReportedUnit unit) =>
        unit.ReasonCodes.FirstOrDefault(c => ReasonCodes.Find(c)?.Kind != ReasonKind.Pass) ?? (unit.ReasonCodes.IsEmpty ? null : unit.ReasonCodes[0]);

    private static string SentenceOf(ReportedUnit unit, string code)
    {
        var i = unit.ReasonCodes.IndexOf(code);
        return i >= 0 && i < unit.Reasons.Length ? unit.Reasons[i] : "";
    }

    private static string RulingText(Ruling ruling) => ruling switch
    {
        Ruling.Pass => "pass",
        Ruling.Fail => "fail",
        Ruling.Retest => "retest",
        _ => "rejected",
    };

    private static string Interval(double? low, double? high) =>
        low is { } l && high is { } h ? " [" + Numbers.Format(l, 7) + ", " + Numbers.Format(h, 7) + "]" : "";

    private static string Short(string key) => key.Length > 20 ? key[..12] + "…" + key[^6..] : key;

    private static string RangeText(DateOnly? from, DateOnly? to) => (from, to) switch
    {
        (null, null) => "on every date",
        ({ } f, null) => "from " + Date(f),
        (null, { } t) => "up to " + Date(t),
        ({ } f, { } t) when f == t => "on " + Date(f),
        ({ } f, { } t) => Date(f) + " to " + Date(t),
    };

    private static string Date(DateOnly date) => date.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture);

    private static string Time(DateTime utc) => utc.ToUniversalTime().ToString("yyyy-MM-dd HH:mm'Z'", CultureInfo.InvariantCulture);

    private static string HourLabel(string? hour) => hour is { Length: >= 16 } h ? h[5..10] + " " + h[11..16] : hour ?? "";

    private static string HourOnly(string? hour) => hour is { Length: >= 16 } h ? h[11..16] : hour ?? "";

    private static string Int(int value) => value.ToString(CultureInfo.InvariantCulture);

    private static string Percent(double? value) => value is { } v ? v.ToString("F1", CultureInfo.InvariantCulture) + " %" : "-";

    private static bool IsWhole(double value) => Math.Abs(value - Math.Round(value)) < 1e-9;
}
