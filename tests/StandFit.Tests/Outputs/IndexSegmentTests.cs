using StandFit.Edges.Outputs;
using StandFit.Tests.Support;

namespace StandFit.Tests.Outputs;

/// <summary>The on-disk key index: the file format, its search, its checks, merging and the merge policy.</summary>
public sealed class IndexSegmentTests
{
    private static UnitKeyBits RandomKey(Random random)
    {
        Span<byte> bytes = stackalloc byte[UnitKeyBits.Size];
        random.NextBytes(bytes);
        return UnitKeyBits.Read(bytes);
    }

    private static KeyRecord[] RandomKeys(int count, int seed)
    {
        var random = new Random(seed);
        var keys = Enumerable.Range(0, count).Select(i => new KeyRecord(RandomKey(random), 638_000_000_000_000_000L + i, (byte)(i % 4))).ToArray();
        Array.Sort(keys, KeyRecord.CompareKeys);
        return keys;
    }

    private static SerialRecord[] RandomSerials(int count, int seed)
    {
        var random = new Random(seed);
        var serials = Enumerable.Range(0, count).Select(i => new SerialRecord(new UInt128((ulong)random.NextInt64(), (ulong)random.NextInt64()), RandomKey(random), i)).ToArray();
        Array.Sort(serials, SerialRecord.CompareKeys);
        return serials;
    }

    [Fact]
    public void Every_key_and_serial_written_is_found_with_its_record_and_no_other_is()
    {
        using var root = new TempFolder();
        var path = Path.Combine(root.Path, "w.000001.idx");
        var keys = RandomKeys(20_000, 1);
        var serials = RandomSerials(5_000, 2);
        IndexSegment.Write(path, keys, serials);

        using var segment = IndexSegment.Open(path);

        Assert.Equal(20_000, segment.Keys.Count);
        Assert.Equal(5_000, segment.Serials.Count);
        Assert.Equal((20_000L * 73) + (5_000L * 88) + 64, new FileInfo(path).Length);
        foreach (var key in keys)
        {
            Assert.True(segment.TryFind(key.Key, out var found));
            Assert.Equal(key, found);
        }

        foreach (var serial in serials)
        {
            Assert.True(segment.TryFind(serial.Serial, out var found));
            Assert.Equal(serial, found);
        }

        var absent = new Random(3);
        for (var i = 0; i < 2_000; i++)
        {
            Assert.False(segment.TryFind(RandomKey(absent), out _));
            Assert.False(segment.TryFind(new UInt128((ulong)absent.NextInt64(), (ulong)absent.NextInt64()), out _));
        }

        Assert.False(segment.TryFind(default(UnitKeyBits), out _));
        Assert.False(segment.TryFind(new UnitKeyBits(UInt128.MaxValue, UInt128.MaxValue, UInt128.MaxValue, UInt128.MaxValue), out _));
    }

    [Fact]
    public void Keys_that_are_not_spread_evenly_are_still_found_by_halving()
    {
        // Every key shares its first 8 bytes but one cluster, so interpolation points nowhere useful.
        using var root = new TempFolder();
        var path = Path.Combine(root.Path, "w.000001.idx");
        var random = new Random(7);
        var keys = Enumerable.Range(0, 5_000).Select(i =>
        {
            var key = RandomKey(random);
            var s0 = i < 4_990 ? new UInt128(0x00000000_00000001UL, (ulong)random.NextInt64()) : key.S0;
            return new KeyRecord(key with { S0 = s0 }, i, 0);
        }).ToArray();
        Array.Sort(keys, KeyRecord.CompareKeys);
        IndexSegment.Write(path, keys, []);

        using var segment = IndexSegment.Open(path);

        Assert.All(keys, k => Assert.True(segment.TryFind(k.Key, out var found) && found == k));
        Assert.False(segment.TryFind(keys[2_500].Key with { R1 = keys[2_500].Key.R1 ^ 1 }, out _));
    }

    [Fact]
    public void An_empty_index_file_finds_nothing()
    {
        using var root = new TempFolder();
        var path = Path.Combine(root.Path, "w.000001.idx");
        IndexSegment.Write(path, [], []);

        using var segment = IndexSegment.Open(path);

        Assert.Equal(IndexSegment.FooterSize, segment.Bytes);
        Assert.False(segment.TryFind(RandomKey(new Random(1)), out _));
        Assert.False(segment.TryFind(UInt128.One, out _));
    }

    [Theory]
    [InlineData("a flipped bit in a record")]
    [InlineData("a flipped bit in the checksum")]
    [InlineData("cut short")]
    [InlineData("a record too many")]
    [InlineData("not an index file")]
    public void A_damaged_index_file_is_refused_when_it_is_opened(string damage)
    {
        using var root = new TempFolder();
        var path = Path.Combine(root.Path, "w.000001.idx");
        IndexSegment.Write(path, RandomKeys(100, 1), RandomSerials(10, 2));
        var bytes = File.ReadAllBytes(path);
        switch (damage)
        {
            case "a flipped bit in a record":
                bytes[500] ^= 0x10;
                break;
            case "a flipped bit in the checksum":
                bytes[^1] ^= 0x01;
                break;
            case "cut short":
                bytes = bytes[..^100];
                break;
            case "a record too many":
                bytes = [.. bytes[..73], .. bytes];
                break;
            default:
                bytes = "{\"batch\":\"x\"}\n"u8.ToArray();
                break;
        }

        File.WriteAllBytes(path, bytes);

        Assert.Throws<InvalidDataException>(() => IndexSegment.Open(path));
    }

    [Fact]
    public void Records_out_of_order_are_a_bug_and_leave_no_file_behind()
    {
        using var root = new TempFolder();
        var path = Path.Combine(root.Path, "w.000001.idx");
        var keys = RandomKeys(10, 1);
        (keys[3], keys[4]) = (keys[4], keys[3]);

        Assert.Throws<InvalidOperationException>(() => IndexSegment.Write(path, keys, []));
        Assert.Empty(Directory.EnumerateFiles(root.Path));
    }

    [Fact]
    public void Merging_keeps_the_first_result_of_a_key_and_the_latest_key_of_a_serial()
    {
        var shared = RandomKey(new Random(5));
        var older = new[] { new KeyRecord(shared, AtTicks: 100, Ruling: 1) };
        var newer = new[] { new KeyRecord(shared, AtTicks: 200, Ruling: 0) };
        var serialOld = new[] { new SerialRecord(UInt128.One, shared, 100) };
        var newKey = shared with { R1 = shared.R1 + 1 };
        var serialNew = new[] { new SerialRecord(UInt128.One, newKey, 50) }; // a clock set back: order, not time, says which is newer

        var keys = SortedMerge.Merge<KeyRecord>([older, newer], keepNewest: false).ToList();
        var serials = SortedMerge.Merge<SerialRecord>([serialOld, serialNew], keepNewest: true).ToList();

        Assert.Equal(older[0], Assert.Single(keys));
        Assert.Equal(serialNew[0], Assert.Single(serials));
    }

    [Fact]
    public void Merging_many_runs_gives_one_ascending_run_with_every_key_once()
    {
        var runs = Enumerable.Range(0, 6).Select(r => RandomKeys(1_000 + (r * 100), r)).ToList();
        runs.Add([.. runs[0].Take(50)]); // keys repeated in a newer run

        var merged = SortedMerge.Merge<KeyRecord>([.. runs.Select(r => (IEnumerable<KeyRecord>)r)], keepNewest: false).ToList();

        var distinct = runs.SelectMany(r => r).Select(k => k.Key).Distinct().Count();
        Assert.Equal(distinct, merged.Count);
        Assert.True(merged.Zip(merged.Skip(1)).All(p => KeyRecord.CompareKeys(p.First, p.Second) < 0));
    }

    [Fact]
    public void The_merge_policy_keeps_each_index_file_at_least_twice_the_next_newer_and_few_files_in_all()
    {
        // 1,000 compactions of 1,000 records each, as a worker would run them for a million units.
        var files = new List<long>();
        long rewritten = 0;
        for (var compaction = 1; compaction <= 1_000; compaction++)
        {
            var take = JournalCompactor.ChooseMerge(files, 1_000);
            var merged = files.Skip(files.Count - take).Sum() + 1_000;
            rewritten += merged;
            files.RemoveRange(files.Count - take, take);
            files.Add(merged);

            Assert.True(files.Zip(files.Skip(1)).All(p => p.First >= 2 * p.Second), $"after compaction {compaction}: {string.Join(", ", files)}");
            Assert.True(files.Count <= Math.Log2(compaction) + 1, $"after compaction {compaction}: {files.Count} files");
        }

        Assert.Equal(1_000_000, files.Sum());
        Assert.True(rewritten <= 11 * 1_000_000L, $"each record was rewritten {rewritten / 1e6:F1} times on average");
    }

    [Theory]
    [InlineData("a.000001.idx", "a", true)]
    [InlineData("a.0000012.idx", "a", true)]
    [InlineData("a.000001.000002.idx", "a", false)]
    [InlineData("a.000001.000002.idx", "a.000001", true)]
    [InlineData("a.00001.idx", "a", false)]
    [InlineData("ab.000001.idx", "a", false)]
    [InlineData("a.000001.idx.tmp", "a", false)]
    [InlineData("a.jsonl", "a", false)]
    public void An_index_file_belongs_to_exactly_one_worker_even_when_worker_ids_hold_dots(string name, string worker, bool belongs)
    {
        Assert.Equal(belongs, IndexFiles.IsSegmentOf(name, worker));
    }

    [Fact]
    public void Leftovers_are_removed_only_for_the_worker_that_asks()
    {
        using var root = new TempFolder();
        string[] names = ["a.jsonl", "a.000001.idx", "a.000002.idx", ".a.000003.idx.tmp", ".a.jsonl.tmp", "a.lock",
            "a.000001.jsonl", "a.000001.000002.idx", ".a.000001.jsonl.tmp", ".a.000001.000003.idx.tmp"];
        foreach (var name in names)
        {
            File.WriteAllText(Path.Combine(root.Path, name), "x");
        }

        var removed = IndexFiles.RemoveLeftovers(root.Path, "a", new HashSet<string>(["a.000002.idx"], StringComparer.Ordinal));

        Assert.Equal(3, removed);
        var left = Directory.EnumerateFiles(root.Path).Select(Path.GetFileName).Order(StringComparer.Ordinal).ToList();
        Assert.Equal([".a.000001.000003.idx.tmp", ".a.000001.jsonl.tmp", "a.000001.000002.idx", "a.000001.jsonl", "a.000002.idx", "a.jsonl", "a.lock"], left);
    }

    [Fact]
    public void A_unit_key_reads_back_from_its_bytes_and_sorts_as_its_bytes()
    {
        var random = new Random(11);
        var keys = Enumerable.Range(0, 200).Select(_ => RandomKey(random)).ToList();
        Span<byte> a = stackalloc byte[64];
        Span<byte> b = stackalloc byte[64];
        for (var i = 1; i < keys.Count; i++)
        {
            keys[i - 1].Write(a);
            keys[i].Write(b);
            Assert.Equal(Math.Sign(a.SequenceCompareTo(b)), Math.Sign(UnitKeyBits.Compare(keys[i - 1], keys[i])));
            Assert.True(UnitKeyBits.TryParse(keys[i].ToString(), out var parsed));
            Assert.Equal(keys[i], parsed);
        }

        Assert.True(UnitKeyBits.TryParse(new string('a', 64) + ":none", out var none));
        Assert.Equal(new string('a', 64) + ":none", none.ToString());
    }
}
