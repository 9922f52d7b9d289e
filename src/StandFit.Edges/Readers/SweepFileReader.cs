using System.Collections.Immutable;
using System.Text;
using StandFit.Core.Ingest;
using StandFit.Core.Problems;

namespace StandFit.Edges.Readers;

/// <summary>A sweep file as read from disk: its bytes' SHA-256 and its parsed table (or why it has none).</summary>
/// <remarks><see cref="Metadata"/> is the table's, or, when the table could not be made, what a lenient scan of the leading metadata lines found.</remarks>
public sealed record SweepFile(string Name, string Sha256, long Bytes, Result<SweepTable> Table, ImmutableArray<MetadataEntry> Metadata)
{
    /// <summary>The cell and number format the table was split with (chosen from the leading metadata's part).</summary>
    public SweepFormat Format { get; init; } = SweepFormat.Standard;
}

/// <summary>
/// Reads a sweep file: size limit, then strict decoding (UTF-8, with or without a byte-order mark;
/// UTF-16, binary junk and invalid UTF-8 are rejected with their own reason), then
/// <see cref="SweepTextParser"/>. Failure policy: bad content is a problem value; an I/O error
/// (the file vanished, no permission) throws, and the caller decides.
/// </summary>
public sealed class SweepFileReader
{
    private static readonly UTF8Encoding StrictUtf8 = new(encoderShouldEmitUTF8Identifier: false, throwOnInvalidBytes: true);

    public SweepFileReader(long maxFileBytes)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(maxFileBytes, 1);
        MaxFileBytes = maxFileBytes;
    }

    public long MaxFileBytes { get; }

    /// <summary>When set, the time to read a file's bytes is added to its <c>read</c> stage.</summary>
    public Processing.StageTimes? Times { get; init; }

    /// <param name="path">The file to read.</param>
    /// <param name="formatFor">Chooses the cell format from the leading metadata lines (the part's recipe); standard when null.</param>
    /// <param name="name">The name shown in messages and rows (the input's own name when it is read from a claimed copy).</param>
    public SweepFile Read(string path, Func<ImmutableArray<MetadataEntry>, SweepFormat>? formatFor = null, string? name = null)
    {
        name ??= Path.GetFileName(path);
        var length = new FileInfo(path).Length;
        if (length > MaxFileBytes)
        {
            var hashOfLarge = Hashing.Sha256OfFile(path);
            return new SweepFile(name, hashOfLarge, length, Fail(ReasonCodes.InputTooLarge, Messages.FileTooLarge(length, MaxFileBytes), name), []);
        }

        var bytes = File.ReadAllBytes(path);
        Times?.Lap(Processing.Stage.Read);
        return Parse(name, bytes, formatFor);
    }

    /// <summary>Decodes and parses bytes already in memory (the file's name is used in messages).</summary>
    public static SweepFile Parse(string name, ReadOnlySpan<byte> bytes, Func<ImmutableArray<MetadataEntry>, SweepFormat>? formatFor = null)
    {
        var sha = Hashing.Sha256Hex(bytes);
        var text = Decode(name, bytes);
        if (!text.IsSuccess)
        {
            return new SweepFile(name, sha, bytes.Length, Result<SweepTable>.Failure(text.Problems), []);
        }

        var scanned = SweepTextParser.ScanMetadata(text.Value);
        var format = formatFor?.Invoke(scanned) ?? SweepFormat.Standard;
        var table = SweepTextParser.Parse(name, text.Value, format);
        var metadata = table.IsSuccess ? table.Value.Metadata : scanned;
        return new SweepFile(name, sha, bytes.Length, table, metadata) { Format = format };
    }

    public static Result<string> Decode(string name, ReadOnlySpan<byte> bytes)
    {
        if (bytes.Length >= 2 && ((bytes[0] == 0xFF && bytes[1] == 0xFE) || (bytes[0] == 0xFE && bytes[1] == 0xFF)))
        {
            return Fail(ReasonCodes.InputEncoding, Messages.Utf16File(), name);
        }

        if (bytes.Length >= 3 && bytes[0] == 0xEF && bytes[1] == 0xBB && bytes[2] == 0xBF)
        {
            bytes = bytes[3..];
        }

        var nul = bytes.IndexOf((byte)0);
        if (nul >= 0)
        {
            // UTF-16 without a byte-order mark shows as ASCII interleaved with NUL bytes.
            return LooksLikeUtf16(bytes)
                ? Fail(ReasonCodes.InputEncoding, Messages.Utf16File(), name)
                : Fail(ReasonCodes.InputBinary, Messages.BinaryFile(nul), name);
        }

        for (var i = 0; i < bytes.Length; i++)
        {
            var b = bytes[i];
            if (b < 0x20 && b is not (byte)'\n' and not (byte)'\r' and not (byte)'\t')
            {
                return Fail(ReasonCodes.InputBinary, Messages.BinaryFile(i), name);
            }
        }

        try
        {
            return StrictUtf8.GetString(bytes);
        }
        catch (DecoderFallbackException e)
        {
            return Fail(ReasonCodes.InputEncoding, Messages.InvalidUtf8(e.Index < 0 ? 0 : e.Index), name);
        }
    }

    private static bool LooksLikeUtf16(ReadOnlySpan<byte> bytes)
    {
        var sample = bytes[..Math.Min(bytes.Length, 512)];
        int evenNul = 0, oddNul = 0;
        for (var i = 0; i < sample.Length; i++)
        {
            if (sample[i] == 0)
            {
                if (i % 2 == 0)
                {
                    evenNul++;
                }
                else
                {
                    oddNul++;
                }
            }
        }

        var half = sample.Length / 2;
        return half > 0 && (evenNul > half * 0.8 || oddNul > half * 0.8);
    }

    private static Problem Fail(ReasonCode code, string message, string name) => new(code.Code, message, SourceLocation.WholeFile(name));
}
