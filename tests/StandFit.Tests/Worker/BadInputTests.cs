using System.Collections;
using System.Globalization;
using System.Text;
using Microsoft.Extensions.Logging.Abstractions;
using StandFit.Edges.Configuration;
using StandFit.Edges.Folders;
using StandFit.Edges.Processing;
using StandFit.Tests.Support;

namespace StandFit.Tests.Worker;

/// <summary>
/// Every kind of bad input, dropped into a real inbox and taken by the worker's path (claim, read,
/// judge, publish, move): each ends in rejected/ with a sidecar and its own reason code, has its
/// summary row, and the worker goes on with the rest.
/// </summary>
public sealed class BadInputTests
{
    private const int Seed = 77;

    private static string Valid(int i = 1) => SweepFiles.Text(i, Seed);

    private static string Replace(string text, string from, string to) => text.Replace(from, to, StringComparison.Ordinal);

    private static string DataLine(string text, int n) => text.Split('\n').Where(l => l.Length > 0 && char.IsAsciiDigit(l[0])).ElementAt(n);

    /// <summary>The cases: file name, bytes, expected reason code.</summary>
    public static IEnumerable<(string Name, byte[] Bytes, string Code)> Cases()
    {
        byte[] U(string s) => Encoding.UTF8.GetBytes(s);
        var v = Valid();
        var header = v.Split('\n').First(l => l.StartsWith("step,", StringComparison.Ordinal));
        var metadataAndHeader = v[..(v.IndexOf(header, StringComparison.Ordinal) + header.Length + 1)];
        yield return ("empty.csv", [], "input.empty");
        yield return ("blank-lines.csv", U("\n \r\n\t\n"), "input.empty");
        yield return ("header-only.csv", U(metadataAndHeader), "input.no_rows");
        yield return ("truncated-last-row.csv", U(v[..^4]), "input.truncated");
        yield return ("short-row.csv", U(Replace(v, DataLine(v, 4), string.Join(',', DataLine(v, 4).Split(',')[..3]))), "input.wrong_column_count");
        yield return ("long-row.csv", U(Replace(v, DataLine(v, 4), DataLine(v, 4) + ",7")), "input.wrong_column_count");
        yield return ("missing-column.csv", U(Replace(v, ",output_mV\n", ",temperature_C\n")), "input.missing_column");
        yield return ("renamed-columns.csv", U(Replace(v, header, "n,direction,p_ref,u_out")), "input.missing_column");
        yield return ("text-number.csv", U(Replace(v, DataLine(v, 3), string.Join(',', DataLine(v, 3).Split(',')[..3]) + ",n/a")), "input.bad_number");
        yield return ("nan.csv", U(Replace(v, DataLine(v, 3), string.Join(',', DataLine(v, 3).Split(',')[..3]) + ",NaN")), "input.non_finite");
        yield return ("infinity.csv", U(Replace(v, DataLine(v, 3), string.Join(',', DataLine(v, 3).Split(',')[..3]) + ",-Infinity")), "input.non_finite");
        yield return ("duplicate-column.csv", U(Replace(v, header, "step,leg,pressure_kPa,PRESSURE_kPa")), "input.duplicate_column");
        var junk = new byte[3000];
        new Random(Seed).NextBytes(junk);
        junk[100] = 0;
        yield return ("binary-junk.csv", junk, "input.binary");
        yield return ("utf16-bom.csv", Encoding.Unicode.GetPreamble().Concat(Encoding.Unicode.GetBytes(v)).ToArray(), "input.encoding");
        yield return ("utf16-no-bom.csv", new UnicodeEncoding(bigEndian: false, byteOrderMark: false).GetBytes(v), "input.encoding");
        yield return ("utf16be-no-bom.csv", new UnicodeEncoding(bigEndian: true, byteOrderMark: false).GetBytes(v), "input.encoding");
        yield return ("cp1252.csv", Encoding.Latin1.GetBytes(Replace(v, "# operator: night shift B", "# operator: Jürgen Müller, 25 °C")), "input.encoding");
        yield return ("decimal-comma-undeclared.csv", U(DecimalComma(v, "KP-250")), "input.wrong_separator");
        yield return ("very-long-line.csv", U("# note: " + new string('x', 20_000) + "\n" + v), "input.line_too_long");
        yield return ("too-large.csv", U(v + string.Concat(Enumerable.Repeat("# padding line of a stand that wrote far too much\n", 2000))), "input.too_large");
        yield return ("zero-spread.csv", U(ZeroSpread(v)), "fit.zero_stimulus_spread");
        yield return ("too-few-points.csv", U(metadataAndHeader + DataLine(v, 0) + "\n" + DataLine(v, 1) + "\n"), "fit.too_few_points");
        yield return ("repeated-metadata.csv", U(Replace(v, "# part: KP-250\n", "# part: KP-250\n# serial: KP250-SOMEONE-ELSE\n")), "input.duplicate_metadata");
        yield return ("serial-path.csv", U(Replace(v, "# serial: KP250-SYN-000001", "# serial: ../../etc/passwd")), "input.bad_serial");
        yield return ("serial-backslash.csv", U(Replace(v, "# serial: KP250-SYN-000001", "# serial: C:\\Windows\\x")), "input.bad_serial");
        yield return ("serial-tab.csv", U(Replace(v, "# serial: KP250-SYN-000001", "# serial: KP250\tX")), "input.bad_serial");
        yield return ("serial-next-line.csv", U(Replace(v, "# serial: KP250-SYN-000001", "# serial: KP250\u0085X")), "input.bad_serial");
        yield return ("control-byte.csv", U(Replace(v, "# serial: KP250-SYN-000001", "# serial: KP250\u0001X")), "input.binary");
        yield return ("no-recipe.csv", U(Replace(v, "# part: KP-250", "# part: XYZ-9")), "input.no_recipe");
        yield return ("bad-leg.csv", U(Replace(v, ",up,", ",sideways,")), "input.bad_leg");
        yield return ("name\nwith a line break.csv", U("\n\n"), "input.empty");
    }

    private static string DecimalComma(string text, string part)
    {
        var lines = text.Split('\n').Select(l =>
            l.StartsWith("# part:", StringComparison.Ordinal) ? "# part: " + part
            : l.StartsWith('#') || l.Length == 0 ? l
            : l.Replace(",", ";", StringComparison.Ordinal).Replace(".", ",", StringComparison.Ordinal));
        return string.Join('\n', lines);
    }

    private static string ZeroSpread(string text) => string.Join('\n', text.Split('\n').Select(l =>
    {
        if (l.Length == 0 || !char.IsAsciiDigit(l[0]))
        {
            return l;
        }

        var c = l.Split(',');
        c[2] = "100.0000";
        return string.Join(',', c);
    }));

    [Fact]
    public async Task Each_bad_file_ends_in_rejected_with_a_sidecar_and_its_own_reason_while_good_files_go_on()
    {
        using var root = new TempFolder();
        var recipes = root.Sub("recipes");
        foreach (var file in Directory.EnumerateFiles(DemoSet.Recipes))
        {
            File.Copy(file, Path.Combine(recipes, Path.GetFileName(file)));
        }

        // A part whose stand exports decimal commas, declared in its recipe.
        var eu = File.ReadAllText(Path.Combine(recipes, "kp-250.yaml"))
            .Replace("parts: [KP-250]", "parts: [KP-250-EU]", StringComparison.Ordinal)
            .Replace("recipe: KP-250 pressure transducer", "recipe: KP-250 pressure transducer (decimal comma)\ndecimal_separator: comma", StringComparison.Ordinal);
        File.WriteAllText(Path.Combine(recipes, "kp-250-eu.yaml"), eu);

        var options = ConfigLoader.Load(WorkerConfig.Write(root, flushUnits: 8, recipes: recipes, maxFileBytes: 64 * 1024)).Value;
        Assert.Empty(ConfigLoader.PrepareFolders(options, needInbox: true));
        var cases = Cases().ToList();
        foreach (var (name, bytes, _) in cases)
        {
            SweepFiles.Drop(options.Inbox, name, bytes);
        }

        SweepFiles.Drop(options.Inbox, "good-first.csv", Valid(2));
        SweepFiles.Drop(options.Inbox, "decimal-comma-declared.csv", DecimalComma(Valid(3), "KP-250-EU"));
        SweepFiles.Drop(options.Inbox, "zz-good-last.csv", Valid(4));

        using (var pipeline = Pipeline.Build(options, NullLoggerFactory.Instance, DispositionMode.Move, TimeProvider.System))
        {
            var counts = await pipeline.Runner.ProcessAsync(DropFolder.ListReady(options.Inbox), CancellationToken.None);
            Assert.Equal(cases.Count + 3, counts.Processed);
            Assert.Equal(cases.Count, counts.Rejected);
        }

        Assert.Empty(Directory.EnumerateFiles(options.Inbox));
        var rows = Duck.Query($"SELECT source_file, ruling, reason_codes, gain_estimate FROM read_parquet({Duck.Literal(Path.Combine(options.Output, "summaries", "**", "*.parquet"))})")
            .ToDictionary(r => (string)r["source_file"]!, StringComparer.Ordinal);
        foreach (var (name, bytes, code) in cases)
        {
            var placed = Assert.Single(Directory.EnumerateFiles(options.Rejected, "*", SearchOption.AllDirectories), f => Path.GetFileName(f) == name);
            Assert.Equal(bytes, File.ReadAllBytes(placed));
            var sidecar = File.ReadAllText(placed + ".rejected.txt");
            Assert.True(sidecar.Contains("\ncode: " + code + "\n", StringComparison.Ordinal), $"{Printable(name)}: expected {code}, sidecar says\n{sidecar}");
            Assert.Equal(6, sidecar.Split('\n', StringSplitOptions.RemoveEmptyEntries).Length);
            var row = rows[name];
            Assert.Equal("rejected", row["ruling"]);
            Assert.Equal(code, ((IEnumerable)row["reason_codes"]!).Cast<string>().Single());
        }

        // The name with a line break is escaped in its sidecar, which keeps its six lines.
        Assert.Contains(Directory.EnumerateFiles(options.Rejected, "*.rejected.txt", SearchOption.AllDirectories), f => File.ReadAllText(f).StartsWith("file: name\\u000awith a line break.csv\n", StringComparison.Ordinal));

        // The good files around them, and the declared decimal comma, were judged and archived.
        foreach (var good in new[] { "good-first.csv", "decimal-comma-declared.csv", "zz-good-last.csv" })
        {
            Assert.Single(Directory.EnumerateFiles(options.Archive, good, SearchOption.AllDirectories));
            Assert.NotEqual("rejected", rows[good]["ruling"]);
        }

        var gainComma = Convert.ToDouble(rows["decimal-comma-declared.csv"]["gain_estimate"], CultureInfo.InvariantCulture);
        Assert.InRange(gainComma, 0.19, 0.21);
    }

    private static string Printable(string s) => s.Replace("\n", "\\n", StringComparison.Ordinal);
}
