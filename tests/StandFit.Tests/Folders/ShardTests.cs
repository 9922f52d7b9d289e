using StandFit.Edges.Folders;

namespace StandFit.Tests.Folders;

public sealed class ShardTests
{
    [Theory]
    [InlineData("0/1", 0, 1)]
    [InlineData("3/4", 3, 4)]
    [InlineData("9999/10000", 9999, 10000)]
    public void A_shard_is_written_index_slash_count_with_a_zero_based_index(string text, int index, int count)
    {
        Assert.True(Shard.TryParse(text, out var shard));
        Assert.Equal(index, shard.Index);
        Assert.Equal(count, shard.Count);
        Assert.Equal(text, shard.ToString());
    }

    [Theory]
    [InlineData("")]
    [InlineData("1")]
    [InlineData("4/4")]
    [InlineData("-1/4")]
    [InlineData("1/0")]
    [InlineData("0/10001")]
    [InlineData(" 1/4")]
    [InlineData("1/4/2")]
    [InlineData("a/b")]
    public void Anything_else_is_not_a_shard(string text) => Assert.False(Shard.TryParse(text, out _));

    [Fact]
    public void Fnv1a_64_gives_the_published_test_vectors()
    {
        // The FNV authors' test vectors for FNV-1a 64: "" -> cbf29ce484222325, "a" -> af63dc4c8601ec8c,
        // "foobar" -> 85944171f73967e8 (values from memory of the reference test suite).
        Assert.Equal(0xcbf29ce484222325UL, Shard.Fnv1a64(""));
        Assert.Equal(0xaf63dc4c8601ec8cUL, Shard.Fnv1a64("a"));
        Assert.Equal(0x85944171f73967e8UL, Shard.Fnv1a64("foobar"));
    }

    [Fact]
    public void Every_file_name_is_in_exactly_one_shard_and_the_shards_are_balanced()
    {
        const int Count = 7;
        var names = Enumerable.Range(0, 14_000).Select(i => $"KP250-{26110000 + i}.csv").ToList();
        var shards = Enumerable.Range(0, Count).Select(i => Shard.TryParse($"{i}/{Count}", out var s) ? s : throw new InvalidOperationException()).ToList();

        var sizes = new int[Count];
        foreach (var name in names)
        {
            var owners = shards.Where(s => s.Owns(Path.Combine("some", "folder", name))).ToList();
            Assert.Single(owners);
            sizes[owners[0].Index]++;
        }

        // 2,000 expected per shard; the binomial SD is sqrt(14000 * 1/7 * 6/7) = 41, so 5 SD is about 205.
        Assert.All(sizes, n => Assert.InRange(n, 1_795, 2_205));
    }

    [Fact]
    public void The_whole_folder_owns_every_file_and_keeps_the_worker_id()
    {
        Assert.True(Shard.All.Owns("anything.csv"));
        Assert.Equal("line3-pc", Shard.All.WorkerIdOf("line3-pc"));
    }

    [Fact]
    public void A_shard_works_under_a_worker_id_of_its_own_that_is_a_valid_identity()
    {
        Assert.True(Shard.TryParse("2/8", out var shard));
        Assert.Equal("line3-pc-shard-2-of-8", shard.WorkerIdOf("line3-pc"));
        Assert.True(WorkerIdentity.IsValid(shard.WorkerIdOf(new string('w', WorkerIdentity.MaxLength))));
    }
}
