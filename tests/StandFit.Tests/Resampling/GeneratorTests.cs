using StandFit.Core.Uncertainty.Resampling;

namespace StandFit.Tests.Resampling;

/// <summary>
/// The generator is fixed by StandFit's own code, so it is checked against the published outputs of
/// the reference implementations: xoshiro256** from the state {1, 2, 3, 4} and splitmix64 from the
/// seed 1234567, both as pinned by the test vectors of the rand_xoshiro crate (rust-random/rngs,
/// xoshiro256starstar.rs and splitmix64.rs, "produced with the reference implementation" of
/// Blackman and Vigna, prng.di.unimi.it).
/// </summary>
public sealed class GeneratorTests
{
    [Fact]
    public void Xoshiro256_star_star_from_state_1_2_3_4_gives_the_reference_outputs()
    {
        // rand_xoshiro, xoshiro256starstar.rs, test "reference".
        ulong[] expected =
        [
            11520, 0, 1509978240, 1215971899390074240, 1216172134540287360,
            607988272756665600, 16172922978634559625, 8476171486693032832,
            10595114339597558777, 2904607092377533576,
        ];
        var rng = Xoshiro256StarStar.FromState(1, 2, 3, 4);
        foreach (var e in expected)
        {
            Assert.Equal(e, rng.NextUInt64());
        }
    }

    [Fact]
    public void Splitmix64_from_seed_1234567_gives_the_reference_outputs()
    {
        // rand_xoshiro, splitmix64.rs, test "reference" (seed 1234567).
        ulong[] expected = [6457827717110365317, 3203168211198807973, 9817491932198370423, 4593380528125082431, 16408922859458223821];
        ulong state = 1234567;
        foreach (var e in expected)
        {
            Assert.Equal(e, SplitMix64.Next(ref state));
        }
    }

    [Fact]
    public void Splitmix64_from_seed_0_gives_the_reference_first_output()
    {
        // Vigna's splitmix64.c: the first output from state 0 is 0xE220A8397B1DCDAF.
        ulong state = 0;
        Assert.Equal(0xE220A8397B1DCDAFUL, SplitMix64.Next(ref state));
    }

    [Fact]
    public void A_seeded_generator_starts_from_four_splitmix64_outputs_of_the_seed()
    {
        ulong state = 1234567;
        var reference = Xoshiro256StarStar.FromState(SplitMix64.Next(ref state), SplitMix64.Next(ref state), SplitMix64.Next(ref state), SplitMix64.Next(ref state));
        var seeded = new Xoshiro256StarStar(1234567);
        for (var i = 0; i < 100; i++)
        {
            Assert.Equal(reference.NextUInt64(), seeded.NextUInt64());
        }
    }

    [Fact]
    public void Bounded_draws_take_the_high_word_of_the_product_and_reject_below_the_threshold()
    {
        // Lemire (2019): index = floor(x32 n / 2^32) for the top 32 bits x32 of a draw, rejected while
        // the low word of x32 n is below 2^32 mod n; 2^32 mod 21 = 4 (4294967296 = 21 * 204522252 + 4).
        Assert.Equal(4u, Xoshiro256StarStar.RejectionThreshold(21));
        var a = new Xoshiro256StarStar(42);
        var b = new Xoshiro256StarStar(42);
        for (var i = 0; i < 10000; i++)
        {
            int expected;
            while (true)
            {
                var product = (b.NextUInt64() >> 32) * 21;
                if ((uint)product >= 4)
                {
                    expected = (int)(product >> 32);
                    break;
                }
            }

            Assert.Equal(expected, a.NextBelow(21));
        }
    }

    [Fact]
    public void A_pairs_resample_takes_two_indices_per_draw_high_half_first()
    {
        // The documented order (docs/uncertainty.md): 32-bit words hi(x1), lo(x1), hi(x2), ... each by
        // Lemire's method; a call starts with a fresh draw and drops a leftover low half.
        var a = new Xoshiro256StarStar(2026);
        var b = new Xoshiro256StarStar(2026);
        var filled = new int[21];
        for (var resample = 0; resample < 500; resample++)
        {
            a.FillBelow(filled, 21, 4);
            var expected = new List<int>();
            while (expected.Count < 21)
            {
                var x = b.NextUInt64();
                foreach (var word in new[] { x >> 32, x & 0xFFFFFFFFUL })
                {
                    var product = word * 21;
                    if (expected.Count < 21 && (uint)product >= 4)
                    {
                        expected.Add((int)(product >> 32));
                    }
                }
            }

            Assert.Equal(expected, filled);
        }
    }

    [Fact]
    public void Bounded_draws_are_uniform_by_a_chi_square_test()
    {
        // 21 cells, 210000 draws: chi-square on 20 df; 45.3 is its 0.999 quantile (any table of chi-square).
        var rng = new Xoshiro256StarStar(7);
        var counts = new int[21];
        for (var i = 0; i < 210000; i++)
        {
            counts[rng.NextBelow(21)]++;
        }

        var chi2 = counts.Sum(c => (c - 10000.0) * (c - 10000.0) / 10000.0);
        Assert.True(chi2 < 45.3, $"chi-square {chi2} on 20 df");
    }

    [Fact]
    public void The_stream_seed_depends_on_the_recipe_seed_the_serial_and_the_file()
    {
        var sha = new string('a', 64);
        var baseSeed = StreamSeed.Derive(12345, "KP250-1", sha);
        Assert.Equal(baseSeed, StreamSeed.Derive(12345, "KP250-1", sha));
        Assert.NotEqual(baseSeed, StreamSeed.Derive(12346, "KP250-1", sha));
        Assert.NotEqual(baseSeed, StreamSeed.Derive(12345, "KP250-2", sha));
        Assert.NotEqual(baseSeed, StreamSeed.Derive(12345, "KP250-1", new string('b', 64)));
    }

    [Fact]
    public void The_stream_seed_is_the_first_eight_bytes_of_the_documented_SHA_256_message()
    {
        // Recomputed here from the documented message layout with the platform's SHA-256.
        var message = new List<byte>();
        message.AddRange(System.Text.Encoding.ASCII.GetBytes("standfit-resampling-1\0"));
        message.AddRange(BitConverter.IsLittleEndian ? BitConverter.GetBytes(12345UL) : [.. BitConverter.GetBytes(12345UL).Reverse()]);
        message.AddRange(System.Text.Encoding.UTF8.GetBytes("KP250-1"));
        message.Add(0);
        message.AddRange(System.Text.Encoding.ASCII.GetBytes("abc"));
        var digest = System.Security.Cryptography.SHA256.HashData([.. message]);
        var expected = System.Buffers.Binary.BinaryPrimitives.ReadUInt64LittleEndian(digest);
        Assert.Equal(expected, StreamSeed.Derive(12345, "KP250-1", "abc"));
    }
}
