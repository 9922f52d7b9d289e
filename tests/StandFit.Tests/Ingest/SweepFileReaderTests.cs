using System.Security.Cryptography;
using System.Text;
using StandFit.Core.Problems;
using StandFit.Edges.Readers;

namespace StandFit.Tests.Ingest;

public sealed class SweepFileReaderTests
{
    private const string Name = "SN-1001.csv";

    private const string Sweep = "# serial: SN-1001\npressure_kPa,output_mV\n0,0.01\n50,10.02\n";

    private static Problem SingleProblem<T>(Result<T> result)
    {
        Assert.False(result.IsSuccess);
        return Assert.Single(result.Problems);
    }

    [Fact]
    public void Plain_utf8_is_decoded_and_parsed()
    {
        var file = SweepFileReader.Parse(Name, Encoding.UTF8.GetBytes(Sweep));

        Assert.Equal(Name, file.Name);
        Assert.Equal(Encoding.UTF8.GetByteCount(Sweep), file.Bytes);
        Assert.Equal<string>(["pressure_kPa", "output_mV"], file.Table.Value.Header);
    }

    [Fact]
    public void A_utf8_byte_order_mark_is_stripped_so_the_first_header_name_matches()
    {
        byte[] bytes = [0xEF, 0xBB, 0xBF, .. Encoding.UTF8.GetBytes("pressure_kPa,output_mV\n0,0.01\n")];

        var file = SweepFileReader.Parse(Name, bytes);

        Assert.Equal("pressure_kPa", file.Table.Value.Header[0]);
        Assert.Equal(bytes.Length, file.Bytes);
    }

    [Fact]
    public void A_utf8_byte_order_mark_before_metadata_still_lets_the_metadata_line_be_read()
    {
        byte[] bytes = [0xEF, 0xBB, 0xBF, .. Encoding.UTF8.GetBytes(Sweep)];

        var table = SweepFileReader.Parse(Name, bytes).Table.Value;

        Assert.Equal("SN-1001", table.Meta("serial"));
    }

    [Fact]
    public void Non_ascii_utf8_text_such_as_a_micro_sign_is_accepted()
    {
        var text = SweepFileReader.Decode(Name, Encoding.UTF8.GetBytes("# unit: µV\nx,y\n1,2\n"));

        Assert.Contains("µV", text.Value, StringComparison.Ordinal);
    }

    [Fact]
    public void Utf16_little_endian_with_a_byte_order_mark_is_rejected_as_input_encoding()
    {
        var bytes = Encoding.Unicode.GetPreamble().Concat(Encoding.Unicode.GetBytes(Sweep)).ToArray();

        var problem = SingleProblem(SweepFileReader.Decode(Name, bytes));

        Assert.Equal("input.encoding", problem.Code);
        Assert.Contains("UTF-16", problem.Message, StringComparison.Ordinal);
        Assert.Equal(SourceLocation.WholeFile(Name), problem.Location);
    }

    [Fact]
    public void Utf16_big_endian_with_a_byte_order_mark_is_rejected_as_input_encoding()
    {
        var bytes = Encoding.BigEndianUnicode.GetPreamble().Concat(Encoding.BigEndianUnicode.GetBytes(Sweep)).ToArray();

        var problem = SingleProblem(SweepFileReader.Decode(Name, bytes));

        Assert.Equal("input.encoding", problem.Code);
        Assert.Contains("UTF-16", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Utf16_little_endian_without_a_byte_order_mark_is_rejected_as_input_encoding_not_binary()
    {
        var bytes = Encoding.Unicode.GetBytes(Sweep);

        var problem = SingleProblem(SweepFileReader.Decode(Name, bytes));

        Assert.Equal("input.encoding", problem.Code);
        Assert.Contains("UTF-16", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Utf16_big_endian_without_a_byte_order_mark_is_rejected_as_input_encoding()
    {
        var problem = SingleProblem(SweepFileReader.Decode(Name, Encoding.BigEndianUnicode.GetBytes(Sweep)));

        Assert.Equal("input.encoding", problem.Code);
    }

    [Fact]
    public void A_nul_byte_in_text_is_rejected_as_input_binary_with_its_offset()
    {
        byte[] bytes = [.. Encoding.UTF8.GetBytes("x,y\n1,2\n"), 0x00, .. Encoding.UTF8.GetBytes("3,4\n")];

        var problem = SingleProblem(SweepFileReader.Decode(Name, bytes));

        Assert.Equal("input.binary", problem.Code);
        Assert.Contains("byte 8 ", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Binary_junk_is_rejected_as_input_binary()
    {
        byte[] bytes = [0x89, 0x50, 0x4E, 0x47, 0x0D, 0x0A, 0x1A, 0x0A, 0x00, 0x00, 0x00, 0x0D, 0x49, 0x48, 0x44, 0x52];

        var problem = SingleProblem(SweepFileReader.Decode(Name, bytes));

        Assert.Equal(ReasonCodes.InputBinary.Code, problem.Code);
    }

    [Fact]
    public void A_control_byte_other_than_tab_cr_and_lf_is_rejected_as_input_binary_with_its_offset()
    {
        byte[] bytes = [.. Encoding.UTF8.GetBytes("x,y\n1,2"), 0x1B, .. Encoding.UTF8.GetBytes("\n")];

        var problem = SingleProblem(SweepFileReader.Decode(Name, bytes));

        Assert.Equal("input.binary", problem.Code);
        Assert.Contains("byte 7 ", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Tabs_and_crlf_line_ends_are_text()
    {
        var text = SweepFileReader.Decode(Name, Encoding.UTF8.GetBytes("x,\ty\r\n1,2\r\n"));

        Assert.Equal("x,\ty\r\n1,2\r\n", text.Value);
    }

    [Fact]
    public void A_lone_windows_1252_byte_is_rejected_as_input_encoding()
    {
        // 0xB5 is 'µ' in Windows-1252 and a stray continuation byte in UTF-8.
        byte[] bytes = [.. Encoding.UTF8.GetBytes("# unit: "), 0xB5, .. Encoding.UTF8.GetBytes("V\nx,y\n1,2\n")];

        var problem = SingleProblem(SweepFileReader.Decode(Name, bytes));

        Assert.Equal("input.encoding", problem.Code);
        Assert.Contains("UTF-8", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_truncated_multi_byte_sequence_at_the_end_is_rejected_as_input_encoding()
    {
        byte[] bytes = [.. Encoding.UTF8.GetBytes("x,y\n1,2\n"), 0xC2];

        Assert.Equal("input.encoding", SingleProblem(SweepFileReader.Decode(Name, bytes)).Code);
    }

    [Theory]
    [InlineData(new byte[] { 0xED, 0xA0, 0x80 })]
    [InlineData(new byte[] { 0xC0, 0xAF })]
    [InlineData(new byte[] { 0xF8, 0x88, 0x80, 0x80, 0x80 })]
    public void Surrogate_overlong_and_out_of_range_utf8_sequences_are_rejected_as_input_encoding(byte[] sequence)
    {
        byte[] bytes = [.. Encoding.UTF8.GetBytes("x,y\n1,"), .. sequence, .. Encoding.UTF8.GetBytes("\n")];

        Assert.Equal("input.encoding", SingleProblem(SweepFileReader.Decode(Name, bytes)).Code);
    }

    [Fact]
    public void No_bytes_at_all_is_rejected_as_input_empty()
    {
        var file = SweepFileReader.Parse(Name, []);

        Assert.Equal("input.empty", SingleProblem(file.Table).Code);
        Assert.Equal(0, file.Bytes);
    }

    [Fact]
    public void A_byte_order_mark_alone_is_rejected_as_input_empty()
    {
        Assert.Equal("input.empty", SingleProblem(SweepFileReader.Parse(Name, [0xEF, 0xBB, 0xBF]).Table).Code);
    }

    [Fact]
    public void The_sha256_of_abc_is_the_fips_180_2_test_vector()
    {
        var file = SweepFileReader.Parse("abc.csv", "abc"u8);

        Assert.Equal("ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad", file.Sha256);
    }

    [Fact]
    public void The_sha256_is_of_the_raw_bytes_including_a_byte_order_mark_even_when_parsing_fails()
    {
        byte[] bytes = [0xEF, 0xBB, 0xBF, .. Encoding.UTF8.GetBytes("x,y\n")];

        var file = SweepFileReader.Parse(Name, bytes);

        Assert.False(file.Table.IsSuccess);
        Assert.Equal(Convert.ToHexStringLower(SHA256.HashData(bytes)), file.Sha256);
    }

    [Fact]
    public void A_file_over_the_size_limit_is_rejected_as_input_too_large_with_its_size_and_hash()
    {
        using var folder = new TempFolder();
        var path = Path.Combine(folder.Path, "big.csv");
        var bytes = Encoding.UTF8.GetBytes("x,y\n1,2\n3,4\n");
        File.WriteAllBytes(path, bytes);

        var file = new SweepFileReader(maxFileBytes: bytes.Length - 1).Read(path);

        var problem = SingleProblem(file.Table);
        Assert.Equal("input.too_large", problem.Code);
        Assert.Equal(SourceLocation.WholeFile("big.csv"), problem.Location);
        Assert.Contains($"has {bytes.Length} bytes", problem.Message, StringComparison.Ordinal);
        Assert.Equal(bytes.Length, file.Bytes);
        Assert.Equal("big.csv", file.Name);
        Assert.Equal(Convert.ToHexStringLower(SHA256.HashData(bytes)), file.Sha256);
    }

    [Fact]
    public void A_file_exactly_at_the_size_limit_is_read_and_parsed()
    {
        using var folder = new TempFolder();
        var path = Path.Combine(folder.Path, "SN-5.csv");
        var bytes = Encoding.UTF8.GetBytes("x,y\n1,2\n3,4\n");
        File.WriteAllBytes(path, bytes);

        var file = new SweepFileReader(maxFileBytes: bytes.Length).Read(path);

        Assert.Equal(2, file.Table.Value.Rows.Length);
        Assert.Equal("SN-5.csv", file.Table.Value.SourceName);
        Assert.Equal(Convert.ToHexStringLower(SHA256.HashData(bytes)), file.Sha256);
    }

    [Fact]
    public void A_size_limit_below_one_byte_is_refused()
    {
        Assert.Throws<ArgumentOutOfRangeException>(() => new SweepFileReader(0));
    }

    [Fact]
    public void A_missing_file_throws_rather_than_becoming_a_problem()
    {
        using var folder = new TempFolder();

        Assert.Throws<FileNotFoundException>(() => new SweepFileReader(1024).Read(Path.Combine(folder.Path, "gone.csv")));
    }

    private sealed class TempFolder : IDisposable
    {
        public TempFolder() => Path = Directory.CreateTempSubdirectory("standfit-reader-").FullName;

        public string Path { get; }

        public void Dispose() => Directory.Delete(Path, recursive: true);
    }
}
