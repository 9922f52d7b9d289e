using System.Diagnostics;
using System.Text;
using Microsoft.Extensions.Logging.Abstractions;
using StandFit.Core.Judging;
using StandFit.Core.Problems;
using StandFit.Edges.Processing;
using StandFit.Edges.Readers;
using StandFit.Edges.RecipeFiles;
using StandFit.Tests.Support;
using Xunit.Abstractions;

namespace StandFit.Tests.Ingest;

/// <summary>
/// 10,000 seeded mutations of the demo's sweep files (byte flips, truncations, insertions,
/// deletions, repeated and swapped lines, separators, NULs, other encodings) through the reader and
/// the evaluator in-process: nothing throws, nothing hangs, no internal error, and every file is
/// either judged (with registered reasons) or rejected with exactly one registered reject reason.
/// </summary>
public sealed class FuzzTests(ITestOutputHelper output)
{
    private const int Mutations = 10_000;
    private const ulong Seed = 0x5EED_2026;

    [Fact]
    public async Task Ten_thousand_mutated_sweeps_are_each_judged_or_rejected_with_a_reason_and_nothing_crashes()
    {
        var catalog = RecipeCatalog.Load(DemoSet.Recipes);
        Assert.True(catalog.IsValid);
        var processor = new UnitProcessor(new SweepFileReader(4 * 1024 * 1024), () => catalog, NullLogger.Instance);
        var seeds = Directory.EnumerateFiles(DemoSet.Folder).Order(StringComparer.Ordinal).Select(File.ReadAllBytes).ToArray();
        var byCode = new Dictionary<string, int>(StringComparer.Ordinal);
        var judged = 0;
        var clock = Stopwatch.StartNew();

        await Task.Run(() =>
        {
            var random = new Random(unchecked((int)Seed));
            for (var i = 0; i < Mutations; i++)
            {
                var bytes = Mutate(seeds[random.Next(seeds.Length)], random);
                var file = SweepFileReader.Parse("fuzz.csv", bytes, catalog.FormatFor);
                var unit = processor.Evaluate(file);
                var codes = unit.Verdict.Reasons.Select(r => r.Code).ToList();
                Assert.DoesNotContain(ReasonCodes.InternalError.Code, codes);
                Assert.All(codes, c => Assert.NotNull(ReasonCodes.Find(c)));
                if (unit.Ruling == Ruling.Rejected)
                {
                    var code = Assert.Single(codes);
                    Assert.Equal(ReasonKind.Reject, ReasonCodes.Find(code)!.Kind);
                    Assert.False(string.IsNullOrWhiteSpace(unit.Verdict.Reasons[0].Sentence));
                    byCode[code] = byCode.GetValueOrDefault(code) + 1;
                }
                else
                {
                    Assert.All(codes, c => Assert.NotEqual(ReasonKind.Reject, ReasonCodes.Find(c)!.Kind));
                    judged++;
                }
            }
        }).WaitAsync(TimeSpan.FromMinutes(3)); // an upper bound only: a hang fails here

        output.WriteLine($"{Mutations} mutations in {clock.Elapsed.TotalSeconds:F1} s: {judged} judged, {Mutations - judged} rejected");
        foreach (var (code, count) in byCode.OrderByDescending(kv => kv.Value))
        {
            output.WriteLine($"  {code}: {count}");
        }

        Assert.True(judged > 0 && byCode.Count >= 8, "the mutations should reach both judging and many kinds of rejection");
    }

    private static byte[] Mutate(byte[] original, Random random)
    {
        var bytes = new List<byte>(original);
        var steps = 1 + random.Next(3);
        for (var s = 0; s < steps && bytes.Count > 0; s++)
        {
            switch (random.Next(12))
            {
                case 0: // flip a byte
                    var at = random.Next(bytes.Count);
                    bytes[at] ^= (byte)(1 << random.Next(8));
                    break;
                case 1: // truncate
                    var cut = random.Next(bytes.Count);
                    bytes.RemoveRange(cut, bytes.Count - cut);
                    break;
                case 2: // insert random bytes
                    var junk = new byte[1 + random.Next(8)];
                    random.NextBytes(junk);
                    bytes.InsertRange(random.Next(bytes.Count + 1), junk);
                    break;
                case 3: // delete a range
                    var from = random.Next(bytes.Count);
                    bytes.RemoveRange(from, Math.Min(bytes.Count - from, 1 + random.Next(20)));
                    break;
                case 4: // insert a separator, a sign, a point or a quote
                    bytes.Insert(random.Next(bytes.Count + 1), ",;.-\"e#:"u8[random.Next(8)]);
                    break;
                case 5: // repeat a line
                case 6: // swap two lines
                    var lines = Encoding.UTF8.GetString([.. bytes]).Split('\n').ToList();
                    var a = random.Next(lines.Count);
                    var b = random.Next(lines.Count);
                    if (random.Next(2) == 0)
                    {
                        lines.Insert(b, lines[a]);
                    }
                    else
                    {
                        (lines[a], lines[b]) = (lines[b], lines[a]);
                    }

                    bytes = [.. Encoding.UTF8.GetBytes(string.Join('\n', lines))];
                    break;
                case 7: // a NUL
                    bytes.Insert(random.Next(bytes.Count + 1), 0);
                    break;
                case 8: // another encoding
                    var text = Encoding.UTF8.GetString([.. bytes]) + "# note: Müller °C\n";
                    bytes = random.Next(3) switch
                    {
                        0 => [.. Encoding.Unicode.GetPreamble(), .. Encoding.Unicode.GetBytes(text)],
                        1 => [.. new UnicodeEncoding(true, false).GetBytes(text)],
                        _ => [.. Encoding.Latin1.GetBytes(text)],
                    };
                    break;
                case 9: // a digit becomes a letter, or a number becomes NaN
                    var digit = bytes.FindIndex(random.Next(bytes.Count), c => c is >= (byte)'0' and <= (byte)'9');
                    if (digit >= 0)
                    {
                        if (random.Next(2) == 0)
                        {
                            bytes[digit] = (byte)('a' + random.Next(26));
                        }
                        else
                        {
                            bytes.InsertRange(digit, "NaN,"u8.ToArray());
                        }
                    }

                    break;
                case 10: // a very long line
                    bytes.InsertRange(random.Next(bytes.Count + 1), Enumerable.Repeat((byte)'7', 17_000));
                    break;
                default: // CRLF, or a byte-order mark
                    if (random.Next(2) == 0)
                    {
                        bytes = [.. Encoding.UTF8.GetBytes(Encoding.UTF8.GetString([.. bytes]).Replace("\n", "\r\n", StringComparison.Ordinal))];
                    }
                    else
                    {
                        bytes.InsertRange(0, [0xEF, 0xBB, 0xBF]);
                    }

                    break;
            }
        }

        return [.. bytes];
    }
}
