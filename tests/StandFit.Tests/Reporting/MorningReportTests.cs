using System.Collections.Immutable;
using System.Xml;
using System.Xml.Linq;
using StandFit.Core.Judging;
using StandFit.Core.Reporting;

namespace StandFit.Tests.Reporting;

/// <summary>The morning report's page as a pure function of its data: well-formed, self-contained, escaped, and counting what the tables count.</summary>
public sealed class MorningReportTests
{
    private const string NastySerial = "<script>alert(\"x\")</script>'&\"";
    private static readonly DateTime Night = new(2026, 11, 30, 22, 0, 0, DateTimeKind.Utc);

    [Fact]
    public void The_page_is_well_formed_and_carries_no_script_link_or_outside_reference()
    {
        var html = MorningReport.Render(Data(Units(40)));
        var page = Parse(html);

        Assert.StartsWith("<!DOCTYPE html>", html, StringComparison.Ordinal);
        Assert.DoesNotContain(page.Descendants(), e => e.Name.LocalName is "script" or "img" or "image" or "link" or "iframe" or "object" or "embed" or "use" or "foreignObject" or "a");
        Assert.DoesNotContain(page.Descendants().Attributes(), a => a.Name.LocalName is "href" or "src" || a.Name.LocalName.StartsWith("on", StringComparison.Ordinal));
        Assert.DoesNotContain("url(", html, StringComparison.Ordinal);
        Assert.DoesNotContain("@import", html, StringComparison.Ordinal);
        Assert.Contains(page.Descendants(), e => e.Name.LocalName == "svg");
    }

    [Fact]
    public void Text_from_the_data_is_escaped_everywhere_it_is_shown()
    {
        var units = Units(12).ToList();
        units[3] = units[3] with { Serial = NastySerial, Part = "KP<250>&\"'", Station = "EOL-'3A'", SourceFile = "a<b>.csv", Reasons = [NastySerial + " is a sentence"], ReasonCodes = ["gain.above_limit"], Ruling = Ruling.Fail };
        var html = MorningReport.Render(Data(units) with { Runs = [new ReportedRun(NastySerial, "run", "<w>", "finished", Night, Night, "v", "h", 1, 1, 0, 0, 0, 0)] });

        Assert.DoesNotContain("<script", html, StringComparison.OrdinalIgnoreCase);
        Assert.DoesNotContain("a<b>.csv", html, StringComparison.Ordinal);
        Assert.DoesNotContain("<250>", html, StringComparison.Ordinal);

        // Read back by an XML parser, the page shows the texts exactly as the data has them.
        var page = Parse(html);
        var texts = page.DescendantNodes().OfType<XText>().Select(t => t.Value).ToList();
        Assert.Contains(texts, t => t.Contains(NastySerial, StringComparison.Ordinal));
        Assert.Contains(texts, t => t.Contains("KP<250>&\"'", StringComparison.Ordinal));
        Assert.Contains(texts, t => t.Contains(NastySerial + " is a sentence", StringComparison.Ordinal));
        Assert.Contains(page.Descendants().Attributes("data-part"), a => a.Value == "KP<250>&\"'");
        Assert.DoesNotContain(page.Descendants(), e => e.Name.LocalName == "script");
    }

    [Fact]
    public void The_headline_and_the_tables_show_the_counts_of_the_yield_tables()
    {
        var units = Units(50);
        var html = MorningReport.Render(Data(units));
        var page = Parse(html);
        var total = YieldTable.Total(UnitSelection.LatestPerSerial(units));

        var headline = page.Descendants().Single(e => (string?)e.Attribute("id") == "yield-total");
        Assert.Equal(total.Units.ToString(System.Globalization.CultureInfo.InvariantCulture), Count(headline, "units"));
        Assert.Equal(total.Pass.ToString(System.Globalization.CultureInfo.InvariantCulture), Count(headline, "pass"));
        Assert.Equal(total.Fail.ToString(System.Globalization.CultureInfo.InvariantCulture), Count(headline, "fail"));

        var byPart = page.Descendants().Single(e => (string?)e.Attribute("id") == "yield-by-part");
        foreach (var row in YieldTable.By(UnitSelection.LatestPerSerial(units), u => u.Part))
        {
            var tr = byPart.Descendants().Single(e => e.Name.LocalName == "tr" && (string?)e.Attribute("data-key") == (row.Key ?? ""));
            Assert.Equal(row.Units.ToString(System.Globalization.CultureInfo.InvariantCulture), Count(tr, "units"));
            Assert.Equal(row.Rejected.ToString(System.Globalization.CultureInfo.InvariantCulture), Count(tr, "rejected"));
        }

        var failing = units.Count(u => u.Ruling is Ruling.Fail or Ruling.Retest);
        Assert.Equal(failing, page.Descendants().Count(e => e.Name.LocalName == "details" && (string?)e.Attribute("class") == "unit"));
    }

    [Fact]
    public void Beyond_the_detail_limit_the_remaining_failed_units_are_listed_not_drawn()
    {
        var many = Enumerable.Range(0, MorningReport.MaxDetailedUnits + 30)
            .Select(i => ReportTablesTests.Unit("k" + i.ToString("D4", System.Globalization.CultureInfo.InvariantCulture), "S" + i.ToString(System.Globalization.CultureInfo.InvariantCulture), "KP-250", Ruling.Fail, Night.AddMinutes(i), codes: ["gain.above_limit"]) with { Gain = 0.2 + (i * 1e-6), Offset = 0.01 })
            .ToList();
        var page = Parse(MorningReport.Render(Data(many)));

        Assert.Equal(MorningReport.MaxDetailedUnits, page.Descendants().Count(e => e.Name.LocalName == "details" && (string?)e.Attribute("class") == "unit"));
        var more = page.Descendants().Single(e => (string?)e.Attribute("id") == "more-units");
        Assert.Equal(30, more.Descendants().Count(e => e.Name.LocalName == "tr" && e.Attribute("data-ruling") is not null));
        Assert.Equal(MorningReport.MaxDetailedUnits, MorningReport.Detailed(many).Length);
    }

    [Fact]
    public void A_detailed_unit_with_points_gets_its_four_charts_and_its_reasons_with_their_numbers()
    {
        var units = Units(10).ToList();
        var failed = units.First(u => u.Ruling == Ruling.Fail);
        var points = Enumerable.Range(1, 21).Select(i => new ReportedPoint(i, 6 + i, i <= 11 ? "up" : "down", i <= 11 ? (i - 1) * 25.0 : (21 - i) * 25.0, false, 0, 0, 0.001 * ((i % 3) - 1), -0.002, 0.002, (i % 3) - 1.0))
            .Select(p => p with { Response = (p.Stimulus * 0.2) + p.Residual, Fitted = p.Stimulus * 0.2, BandLow = (p.Stimulus * 0.2) - 0.002, BandHigh = (p.Stimulus * 0.2) + 0.002 })
            .ToImmutableArray();
        var data = Data(units) with { Points = ImmutableDictionary<string, ImmutableArray<ReportedPoint>>.Empty.Add(failed.UnitKey, points) };

        var page = Parse(MorningReport.Render(data));

        var detail = page.Descendants().Single(e => (string?)e.Attribute("data-unit-key") == failed.UnitKey);
        Assert.Equal(4, detail.Descendants().Count(e => e.Name.LocalName == "svg"));
        var reasons = detail.Descendants().Where(e => e.Name.LocalName == "tr" && e.Attribute("data-code") is not null).ToList();
        Assert.Equal(failed.ReasonCodes, reasons.Select(r => (string)r.Attribute("data-code")!));
        Assert.Contains(failed.Reasons[0], detail.Value, StringComparison.Ordinal);
    }

    [Fact]
    public void The_same_data_give_the_same_page()
    {
        var data = Data(Units(30));

        Assert.Equal(MorningReport.Render(data), MorningReport.Render(data));
    }

    [Fact]
    public void No_unit_at_all_still_gives_a_whole_page()
    {
        var page = Parse(MorningReport.Render(Data([])));

        Assert.Equal("0", Count(page.Descendants().Single(e => (string?)e.Attribute("id") == "yield-total"), "units"));
    }

    internal static XDocument Parse(string html)
    {
        using var reader = XmlReader.Create(new StringReader(html), new XmlReaderSettings { DtdProcessing = DtdProcessing.Ignore });
        return XDocument.Load(reader);
    }

    private static string Count(XElement scope, string what) =>
        scope.Descendants().First(e => (string?)e.Attribute("data-count") == what).Value;

    private static ReportData Data(IEnumerable<ReportedUnit> units) => new()
    {
        From = new DateOnly(2026, 11, 30),
        To = new DateOnly(2026, 12, 1),
        GeneratedAt = Night.AddHours(9),
        ToolVersion = "0.1.0-test",
        Rows = [.. units],
    };

    /// <summary>Units of two parts with every ruling: one in seven fails, one in eleven is a retest, one in thirteen is rejected.</summary>
    private static IEnumerable<ReportedUnit> Units(int count)
    {
        for (var i = 0; i < count; i++)
        {
            var ruling = i % 7 == 3 ? Ruling.Fail : i % 11 == 5 ? Ruling.Retest : i % 13 == 9 ? Ruling.Rejected : Ruling.Pass;
            var code = ruling switch { Ruling.Fail => "gain.above_limit", Ruling.Retest => "gain.straddles_limit", Ruling.Rejected => "input.bad_number", _ => "gain.within_limits" };
            var unit = ReportTablesTests.Unit("key" + i.ToString("D4", System.Globalization.CultureInfo.InvariantCulture), "S" + i.ToString("D4", System.Globalization.CultureInfo.InvariantCulture), i % 3 == 0 ? "LC-5K" : "KP-250", ruling, Night.AddMinutes(7 * i), station: i % 3 == 0 ? "EOL-3B" : "EOL-3A", codes: [code, "residuals.runs_ok"]);
            yield return ruling == Ruling.Rejected ? unit : unit with
            {
                Gain = 0.2 + (((i * 37) % 11) * 1e-5),
                GainUnit = "mV/kPa",
                Offset = ((i * 53) % 17) * 1e-3,
                OffsetUnit = "mV",
                ResidualSd = 0.003,
                Points = 21,
                Model = "straight-line",
                HistogramEdges = [-0.006, -0.003, 0, 0.003, 0.006],
                HistogramCounts = [3, 7, 8, 3],
            };
        }
    }
}
